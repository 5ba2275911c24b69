// spoolstep sim: the control core and the hydraulic plant model in
// lock-step at the core's scan period, driven by a scenario. Writes
// trace.csv, summary.json, io.vcd and report.html into --out, which appears
// whole or not at all.
#include <filesystem>
#include <fstream>
#include <iostream>

#include <fmt/format.h>

#include "command_registry.hpp"
#include "run_common.hpp"
#include "staged_directory.hpp"
#include "spoolstep/benchrun/report.hpp"
#include "spoolstep/benchrun/fault_log.hpp"
#include "spoolstep/benchrun/sinks.hpp"
#include "spoolstep/benchrun/plant_adapter.hpp"

namespace spoolstep::cli {
namespace {

using benchrun::PlantAdapter;
using benchrun::plant_facts;

struct SimOptions {
  std::string machine_path;
  std::string scenario_path;
  std::string out_dir;
  bool quiet = false;
};

int run_sim(const SimOptions& o) {
  auto machine = load_machine_or_report(o.machine_path, "sim");
  if (!machine) return kExitBadInput;
  if (machine->plant.is_null()) {
    const jsondoc::Diagnostic missing{o.machine_path, "/plant", "missing the plant section a bench run needs",
                                      "Add one (see docs/plant-model.md), or use 'spoolstep replay' to run the "
                                      "core alone."};
    std::cerr << "spoolstep sim: " << missing.to_string() << "\n";
    return kExitBadInput;
  }
  hostsim::BuildResult built = hostsim::build_plant(machine->plant, machine->config, o.machine_path);
  if (auto* errors = std::get_if<std::vector<hostsim::PlantError>>(&built)) {
    for (const auto& e : *errors) std::cerr << "spoolstep sim: " << e.to_string() << "\n";
    return kExitBadInput;
  }
  hostsim::Plant& plant = *std::get<std::unique_ptr<hostsim::Plant>>(built);
  PlantAdapter adapter(plant);
  const benchrun::PlantFacts facts = plant_facts(plant, machine->config, adapter.signals());
  auto scenario = load_scenario_or_report(o.scenario_path, machine->config, &facts, "sim");
  if (!scenario) return kExitBadInput;

  {
    // --out is replaced whole: it must not hold the files this run reads.
    std::error_code ec;
    const auto out_dir = std::filesystem::weakly_canonical(o.out_dir, ec);
    for (const std::string& input : {o.machine_path, o.scenario_path}) {
      const auto in = std::filesystem::weakly_canonical(input, ec);
      const auto rel = in.lexically_relative(out_dir);
      if (!ec && !rel.empty() && *rel.begin() != "..") {
        std::cerr << "spoolstep sim: --out " << o.out_dir << " contains the input " << input
                  << ", and a run replaces that directory; choose another --out\n";
        return kExitBadInput;
      }
    }
  }
  StagedDirectory out(o.out_dir);
  if (!out.error().empty()) {
    std::cerr << "spoolstep sim: " << out.error() << "\n";
    return out.write_failed() ? kExitInternal : kExitBadInput;
  }
  std::ofstream csv_file(out.file("trace.csv"), std::ios::binary);
  std::ofstream vcd_file(out.file("io.vcd"), std::ios::binary);
  benchrun::CsvTraceWriter csv(csv_file);
  benchrun::VcdWriter vcd(vcd_file, "spoolstep");
  benchrun::ExpectationChecker checker(*scenario, machine->config);
  benchrun::FigureCollector figures;
  const double period_s = static_cast<double>(machine->config.safety.scan_period_us) * 1e-6;
  benchrun::PlotCollector plots(scenario->duration_s, period_s);
  benchrun::FaultLog fault_log(machine->config, period_s);
  benchrun::RunOptions options = o.quiet ? benchrun::RunOptions{} : progress_on_stderr("sim");
  options.observers.push_back(&fault_log);
  const benchrun::RunOutcome outcome = benchrun::run_scenario(machine->config, *scenario, adapter.backend(),
                                                              {&csv, &vcd, &checker, &figures, &plots}, options);
  if (!outcome.completed()) {
    // A run the plant (or the loop) could not finish has no results worth
    // keeping: the staging folder goes away with `out`, --out stays as it was.
    std::cerr << "spoolstep sim: the run ended early " << outcome.error << " ("
              << runtime::to_string(outcome.outcome)
              << "); the outputs were set to the safe state. Nothing was written to " << o.out_dir
              << "; earlier results, if any, are untouched\n";
    return kExitInternal;
  }

  benchrun::RunReport report;
  report.machine_path = o.machine_path;
  report.scenario_path = o.scenario_path;
  report.scenario_description = scenario->description;
  report.machine = &machine->config;
  report.duration_s = scenario->duration_s;
  report.scans = outcome.scans;
  report.completed = true;
  report.expectations = checker.results();
  report.faults = fault_log.entries();
  report.notices = fault_log.notices();
  report.figures = &figures;
  report.plots = &plots;
  std::ofstream summary_file(out.file("summary.json"), std::ios::binary);
  summary_file << benchrun::summary_json(report).dump(2) << "\n";
  std::ofstream report_file(out.file("report.html"), std::ios::binary);
  report_file << benchrun::report_html(report);
  csv_file.close();
  vcd_file.close();
  summary_file.close();
  report_file.close();
  if (!csv_file || !vcd_file || !summary_file || !report_file) {
    // Nothing replaces --out: the staging folder goes away with `out`.
    std::cerr << "spoolstep sim: could not write the results into " << o.out_dir
              << ".partial (disk full or not writable?); the previous results, if any, are untouched\n";
    return kExitInternal;
  }
  if (!out.commit()) {
    std::cerr << "spoolstep sim: could not write the results: " << out.error() << "\n";
    return kExitInternal;
  }

  const double simulated_s = outcome.scans == 0 ? 0.0 : static_cast<double>(outcome.scans - 1) * period_s;
  std::cout << fmt::format("{} scans, {:.3f} s simulated\n", outcome.scans, simulated_s);
  std::cout << fmt::format("  {:4}  {:<44} {}\n", "", "expectation", "observed");
  for (const auto& r : checker.results()) {
    std::cout << fmt::format("  {:4}  {:<44} {}\n", r.passed ? "pass" : "FAIL", r.name, r.detail);
  }
  for (const auto& n : fault_log.notices()) {
    std::cout << fmt::format("  notice at {:.3f} s: {}\n", n.t_s, n.text);
  }
  for (const auto& f : fault_log.entries()) {
    std::cout << fmt::format("  fault at {:.3f} s (stop category {}): {}\n", f.t_s, f.category, f.text);
  }
  for (double c : figures.cycle_times_s()) std::cout << fmt::format("  cycle time {:.3f} s\n", c);
  for (const auto& p : figures.peak_pressures())
    std::cout << fmt::format("  peak {} {:.1f} {} at {:.3f} s\n", p.signal, p.value, p.unit, p.at_s);
  std::cout << "results in " << o.out_dir << "/ (report.html, trace.csv, io.vcd, summary.json)\n";
  std::cout << "Caution: " << benchrun::kSafetyCaution << "\n";
  const bool passed = checker.all_passed();
  return passed ? kExitOk : kExitFailed;
}

const bool kRegistered = register_command(Command{
    "sim",
    [](CLI::App& sub) {
      auto options = std::make_shared<SimOptions>();
      sub.add_option("machine", options->machine_path, "Machine file with a plant section (JSON)")
          ->required()->check(CLI::ExistingFile);
      sub.add_option("scenario", options->scenario_path, "Scenario: timeline and expectations (JSON)")
          ->required()->check(CLI::ExistingFile);
      sub.add_option("--out", options->out_dir, "Output directory (created or replaced whole)")->required();
      sub.add_flag("-q,--quiet", options->quiet, "No progress lines");
      sub.footer("Exit codes: 0 every expectation passed, 1 an expectation failed (the results are written), "
                 "2 bad input (nothing written), 3 the run could not finish (the plant model failed: "
                 "nothing written) or the results could not be written (earlier results are left untouched).");
      return [options] { return run_sim(*options); };
    },
    "Run the control core against the hydraulic plant model in closed loop and report"});

}  // namespace
}  // namespace spoolstep::cli
