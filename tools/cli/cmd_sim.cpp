// spoolstep sim: the control core and the hydraulic plant model in
// lock-step at the core's scan period, driven by a scenario. Writes
// trace.csv, summary.json, io.vcd and report.html into --out, which appears
// whole or not at all.
#include <cmath>
#include <fstream>
#include <iostream>

#include <fmt/format.h>

#include "command_registry.hpp"
#include "run_common.hpp"
#include "spoolstep/benchrun/report.hpp"
#include "spoolstep/benchrun/sinks.hpp"
#include "spoolstep/hostsim/plant.hpp"

namespace spoolstep::cli {
namespace {

using hostsim::FaultKind;

struct FaultName {
  const char* name;
  FaultKind kind;
  const char* target_kind;  // what the target names
};

const FaultName kFaultNames[] = {
    {"stuck_spool", FaultKind::kStuckSpool, "function"},
    {"coil_open", FaultKind::kCoilOpen, "output"},
    {"coil_short", FaultKind::kCoilShort, "output"},
    {"sensor_wire_break", FaultKind::kSensorWireBreak, "input"},
    {"sensor_stuck", FaultKind::kSensorStuck, "input"},
    {"sensor_drift", FaultKind::kSensorDrift, "input"},
    {"sensor_fail_low", FaultKind::kSensorFailLow, "input"},
    {"sensor_fail_high", FaultKind::kSensorFailHigh, "input"},
    {"seal_leak", FaultKind::kSealLeak, "cylinder"},
    {"pump_failure", FaultKind::kPumpFailure, "none"},
    {"load_change", FaultKind::kLoadChange, "cylinder"},
};

benchrun::SignalGroup group_of(const std::string& name) {
  auto ends = [&](const char* suffix) {
    const std::string s(suffix);
    return name.size() >= s.size() && name.compare(name.size() - s.size(), s.size(), s) == 0;
  };
  if (ends(".p_bar")) return benchrun::SignalGroup::kPressure;
  if (ends(".x_mm")) return benchrun::SignalGroup::kPosition;
  if (ends(".v_mm_s")) return benchrun::SignalGroup::kVelocity;
  if (ends(".spool")) return benchrun::SignalGroup::kSpool;
  return benchrun::SignalGroup::kOther;
}

std::string unit_of(const std::string& name) {
  const auto dot = name.rfind('.');
  const std::string tail = dot == std::string::npos ? "" : name.substr(dot + 1);
  if (tail == "p_bar") return "bar";
  if (tail == "x_mm") return "mm";
  if (tail == "v_mm_s") return "mm/s";
  if (tail == "q_l_min") return "L/min";
  return "";
}

// The plant model behind the bench loop's PlantPort.
class PlantAdapter final : public benchrun::PlantPort {
 public:
  explicit PlantAdapter(hostsim::Plant& plant) : plant_(plant) {
    const hostsim::PlantSnapshot snap = plant_.snapshot();
    for (const std::string& n : *snap.names) {
      signals_.push_back(benchrun::Signal{"plant." + n, unit_of(n), benchrun::SignalKind::kAnalog, group_of(n)});
    }
  }
  std::optional<std::string> last_error;

 private:
  std::vector<benchrun::Signal> do_signals() const override { return signals_; }
  void do_read_inputs(core::InputImage& inputs) const override { plant_.read_inputs(inputs); }
  void do_sample(std::vector<double>& values) const override {
    const hostsim::PlantSnapshot snap = plant_.snapshot();
    values.insert(values.end(), snap.values.begin(), snap.values.end());
  }
  void do_apply_outputs(const core::OutputImage& outputs) override { plant_.apply_outputs(outputs); }
  void do_advance(double dt_s) override {
    if (!plant_.advance(dt_s) && !last_error) {
      last_error = fmt::format("the plant integrator's step size collapsed at {:.6f} s", plant_.time_s());
    }
  }
  std::optional<std::string> do_inject(const nlohmann::json& fault) override {
    const std::string kind = fault.value("kind", "");
    for (const FaultName& f : kFaultNames) {
      if (kind != f.name) continue;
      hostsim::PlantFault pf{f.kind, fault.value("target", ""), fault.value("value", 0.0)};
      if (!plant_.inject(pf)) return fmt::format("the plant has no {} named '{}'", f.target_kind, pf.target);
      return std::nullopt;
    }
    return fmt::format("unknown plant fault kind '{}'", kind);
  }

  hostsim::Plant& plant_;
  std::vector<benchrun::Signal> signals_;
};

// Which inputs the plant drives: an input the plant writes has the same
// value whatever it held before; one it leaves alone keeps the probe value.
benchrun::PlantFacts plant_facts(const hostsim::Plant& plant, const core::MachineConfig& machine,
                                 const std::vector<benchrun::Signal>& signals) {
  benchrun::PlantFacts facts;
  core::InputImage low{}, high{};
  for (auto& d : high.digital) d = true;
  for (auto& a : low.analog) a.value = -12345.0f;
  for (auto& a : high.analog) a.value = 12345.0f;
  plant.read_inputs(low);
  plant.read_inputs(high);
  facts.plant_digital.resize(machine.digital_input_count);
  facts.plant_analog.resize(machine.analog_input_count);
  for (std::size_t i = 0; i < facts.plant_digital.size(); ++i) facts.plant_digital[i] = low.digital[i] == high.digital[i];
  for (std::size_t i = 0; i < facts.plant_analog.size(); ++i) facts.plant_analog[i] = low.analog[i].value == high.analog[i].value;
  for (const auto& s : signals) facts.signal_names.push_back(s.name);
  facts.check_fault = [](const nlohmann::json& f) -> std::optional<std::string> {
    if (!f.is_object()) return "a plant fault is an object: {\"kind\": ..., \"target\": ..., \"value\": ...}";
    for (const auto& [key, value] : f.items()) {
      if (key != "kind" && key != "target" && key != "value")
        return fmt::format("unknown field '{}' in a plant fault (fields: kind, target, value)", key);
    }
    if (!f.contains("kind") || !f["kind"].is_string()) return "a plant fault needs \"kind\" (a string)";
    const std::string kind = f["kind"].get<std::string>();
    const FaultName* found = nullptr;
    for (const FaultName& n : kFaultNames) found = kind == n.name ? &n : found;
    if (found == nullptr) {
      std::string all;
      for (const FaultName& n : kFaultNames) all += (all.empty() ? "" : ", ") + std::string(n.name);
      return fmt::format("unknown plant fault kind '{}' (kinds: {})", kind, all);
    }
    if (std::string(found->target_kind) != "none" && (!f.contains("target") || !f["target"].is_string()))
      return fmt::format("a {} fault needs \"target\": the {} name", kind, found->target_kind);
    if (f.contains("value") && !f["value"].is_number()) return "\"value\" must be a number";
    return std::nullopt;
  };
  return facts;
}

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
    std::cerr << "spoolstep sim: " << o.machine_path
              << ": the machine file has no \"plant\" section. Add one (see docs/plant-model.md), or use 'spoolstep replay' to run the core alone.\n";
    return kExitBadInput;
  }
  hostsim::BuildResult built = hostsim::build_plant(machine->plant, machine->config, o.machine_path);
  if (auto* errors = std::get_if<std::vector<hostsim::PlantError>>(&built)) {
    for (const auto& e : *errors) std::cerr << "spoolstep sim: " << e.message() << "\n";
    return kExitBadInput;
  }
  hostsim::Plant& plant = *std::get<std::unique_ptr<hostsim::Plant>>(built);
  PlantAdapter adapter(plant);
  const benchrun::PlantFacts facts = plant_facts(plant, machine->config, adapter.signals());
  auto scenario = load_scenario_or_report(o.scenario_path, machine->config, &facts, "sim");
  if (!scenario) return kExitBadInput;

  benchrun::StagedDirectory out(o.out_dir);
  if (!out.error().empty()) {
    std::cerr << "spoolstep sim: " << out.error() << "\n";
    return kExitBadInput;
  }
  std::ofstream csv_file(out.file("trace.csv"), std::ios::binary);
  std::ofstream vcd_file(out.file("io.vcd"), std::ios::binary);
  benchrun::CsvTraceWriter csv(csv_file);
  benchrun::VcdWriter vcd(vcd_file, "spoolstep");
  benchrun::ExpectationChecker checker(*scenario, machine->config);
  benchrun::FigureCollector figures;
  const double period_s = static_cast<double>(machine->config.safety.scan_period_us) * 1e-6;
  benchrun::PlotCollector plots(scenario->duration_s, period_s);
  const benchrun::RunOutcome outcome =
      benchrun::run_scenario(machine->config, *scenario, &adapter, {&csv, &vcd, &checker, &figures, &plots},
                             o.quiet ? benchrun::RunOptions{} : progress_on_stderr("sim"));

  benchrun::RunReport report;
  report.machine_path = o.machine_path;
  report.scenario_path = o.scenario_path;
  report.scenario_description = scenario->description;
  report.machine = &machine->config;
  report.duration_s = scenario->duration_s;
  report.scans = outcome.scans;
  report.completed = outcome.completed && !adapter.last_error;
  report.run_error = !outcome.error.empty() ? outcome.error : adapter.last_error.value_or("");
  report.expectations = checker.results();
  report.figures = &figures;
  report.plots = &plots;
  std::ofstream(out.file("summary.json"), std::ios::binary) << benchrun::summary_json(report).dump(2) << "\n";
  std::ofstream(out.file("report.html"), std::ios::binary) << benchrun::report_html(report);
  csv_file.close();
  vcd_file.close();
  if (!csv_file || !vcd_file || !out.commit()) {
    std::cerr << "spoolstep sim: could not write the results: " << out.error() << "\n";
    return kExitInternal;
  }

  std::cout << fmt::format("{} scans, {:.3f} s simulated\n", outcome.scans, scenario->duration_s);
  if (!report.run_error.empty()) std::cout << "run stopped early: " << report.run_error << "\n";
  std::cout << fmt::format("  {:4}  {:<44} {}\n", "", "expectation", "observed");
  for (const auto& r : checker.results()) {
    std::cout << fmt::format("  {:4}  {:<44} {}\n", r.passed ? "pass" : "FAIL", r.name, r.detail);
  }
  for (double c : figures.cycle_times_s()) std::cout << fmt::format("  cycle time {:.3f} s\n", c);
  for (const auto& p : figures.peak_pressures())
    std::cout << fmt::format("  peak {} {:.1f} {} at {:.3f} s\n", p.signal, p.value, p.unit, p.at_s);
  std::cout << "results in " << o.out_dir << "/ (report.html, trace.csv, io.vcd, summary.json)\n";
  std::cout << "Caution: " << benchrun::kSafetyCaution << "\n";
  const bool passed = report.completed && checker.all_passed();
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
      sub.footer("Exit codes: 0 every expectation passed, 1 an expectation failed or the run stopped early, "
                 "2 bad input (nothing written), 3 internal error.");
      return [options] { return run_sim(*options); };
    },
    "Run the control core against the hydraulic plant model in closed loop and report"});

}  // namespace
}  // namespace spoolstep::cli
