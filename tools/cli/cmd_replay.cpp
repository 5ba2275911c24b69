// spoolstep replay: the core alone against a scripted input timeline (no
// plant model): every input comes from the scenario, and the command prints
// each change of state, step, digital input and coil as it happens.
#include <fstream>
#include <iostream>

#include <fmt/format.h>

#include "command_registry.hpp"
#include "run_common.hpp"
#include "spoolstep/benchrun/fault_log.hpp"
#include "spoolstep/benchrun/report.hpp"
#include "spoolstep/benchrun/sinks.hpp"

namespace spoolstep::cli {
namespace {

struct ReplayOptions {
  std::string machine_path;
  std::string timeline_path;
  std::string trace_path;
  bool quiet = false;
};

int run_replay(const ReplayOptions& o) {
  auto machine = load_machine_or_report(o.machine_path, "replay");
  if (machine && !plant_section_ok_or_report(*machine, o.machine_path, "spoolstep replay: ")) return kExitBadInput;
  if (!machine) return kExitBadInput;
  auto scenario = load_scenario_or_report(o.timeline_path, machine->config, nullptr, "replay");
  if (!scenario) return kExitBadInput;

  if (!o.trace_path.empty()) {
    if (overwrites_an_input(o.trace_path, {o.machine_path, o.timeline_path})) {
      std::cerr << "spoolstep replay: --trace " << o.trace_path << " is one of the input files; choose another name\n";
      return kExitBadInput;
    }
    std::error_code ec;
    if (std::filesystem::is_directory(o.trace_path, ec)) {
      std::cerr << "spoolstep replay: --trace " << o.trace_path << " is a directory; give a file name\n";
      return kExitBadInput;
    }
  }
  std::vector<benchrun::TraceSink*> sinks;
  benchrun::ChangePrinter printer(std::cout, machine->config);
  if (!o.quiet) sinks.push_back(&printer);
  benchrun::ExpectationChecker checker(*scenario, machine->config);
  sinks.push_back(&checker);
  std::ofstream trace;
  std::unique_ptr<benchrun::CsvTraceWriter> csv;
  const std::string partial = o.trace_path + ".partial";
  if (!o.trace_path.empty()) {
    trace.open(partial, std::ios::binary | std::ios::trunc);
    if (!trace) {
      std::cerr << "spoolstep replay: cannot write " << o.trace_path << "\n";
      return kExitBadInput;
    }
    csv = std::make_unique<benchrun::CsvTraceWriter>(trace);
    sinks.push_back(csv.get());
  }
  const double period_s = static_cast<double>(machine->config.safety.scan_period_us) / 1e6;
  benchrun::FaultLog fault_log(machine->config, period_s);
  benchrun::RunOptions options;
  options.observers.push_back(&fault_log);
  const benchrun::RunOutcome outcome = benchrun::run_scenario(machine->config, *scenario, {}, sinks, options);
  if (!outcome.completed()) {
    if (!o.trace_path.empty()) {
      trace.close();
      std::remove(partial.c_str());
    }
    std::cerr << "spoolstep replay: the run ended early " << outcome.error << " (" << runtime::to_string(outcome.outcome)
              << "); the outputs were set to the safe state; no trace written\n";
    return kExitInternal;
  }
  if (!o.trace_path.empty()) {
    trace.close();
    if (!trace || std::rename(partial.c_str(), o.trace_path.c_str()) != 0) {
      std::remove(partial.c_str());
      std::cerr << "spoolstep replay: could not finish writing " << o.trace_path << "\n";
      return kExitInternal;
    }
  }
  std::cout << fmt::format("\n{} scans, {:.3f} s simulated\n", outcome.scans, scenario->duration_s);
  for (const auto& n : fault_log.notices()) {
    std::cout << fmt::format("  notice at {:.3f} s: {}\n", n.t_s, n.text);
  }
  for (const auto& f : fault_log.entries()) {
    std::cout << fmt::format("  fault at {:.3f} s (stop category {}): {}\n", f.t_s, f.category, f.text);
  }
  for (const auto& r : checker.results()) {
    std::cout << fmt::format("  {:4}  {:<40} {}\n", r.passed ? "pass" : "FAIL", r.name, r.detail);
  }
  std::cout << "Caution: " << benchrun::kSafetyCaution << "\n";
  return checker.all_passed() ? kExitOk : kExitFailed;
}

const bool kRegistered = register_command(Command{
    "replay",
    [](CLI::App& sub) {
      auto options = std::make_shared<ReplayOptions>();
      sub.add_option("machine", options->machine_path, "Machine file (JSON)")->required()->check(CLI::ExistingFile);
      sub.add_option("timeline", options->timeline_path, "Scenario file with the input timeline (JSON)")
          ->required()->check(CLI::ExistingFile);
      sub.add_option("--trace", options->trace_path, "Also write every scan as CSV to this file");
      sub.add_flag("-q,--quiet", options->quiet, "Print only the expectation results");
      sub.footer("Exit codes: 0 all expectations passed, 1 an expectation failed, 2 bad input, 3 an internal error or a write failure.");
      return [options] { return run_replay(*options); };
    },
    "Run the control core alone against a scripted input timeline and print what it does"});

}  // namespace
}  // namespace spoolstep::cli
