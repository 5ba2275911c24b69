#pragma once
// The demo machine (config/press_cell.json) changed in JSON by a test, run
// in closed loop with its plant model over a scenario written in the test.
#include <gtest/gtest.h>

#include <fstream>
#include <functional>
#include <memory>
#include <sstream>
#include <string>

#include "spoolstep/benchrun/fault_log.hpp"
#include "spoolstep/benchrun/plant_adapter.hpp"
#include "spoolstep/benchrun/runner.hpp"
#include "spoolstep/benchrun/scenario.hpp"
#include "spoolstep/machine_file/machine_file.hpp"

namespace spoolstep::benchrun::testing {

inline nlohmann::json demo_machine() {
  std::ifstream in(std::string(SPOOLSTEP_SOURCE_DIR) + "/config/press_cell.json");
  std::ostringstream text;
  text << in.rdbuf();
  return nlohmann::json::parse(text.str(), nullptr, /*allow_exceptions=*/true, /*ignore_comments=*/true);
}

/// Keeps every event the core logs, in order, and calls `each` after every scan.
class EventRecorder final : public runtime::ScanObserver {
 public:
  EventRecorder(std::vector<core::Event>& events, std::function<void(const core::Diagnostics&)> each)
      : events_(events), each_(std::move(each)) {}
  void after_scan(const runtime::ScanView& scan) override {
    const core::Diagnostics& d = scan.diagnostics;
    for (; seen_ < d.events.total; ++seen_) {
      if (d.events.total - seen_ <= core::kEventLogCapacity) events_.push_back(d.events.ring[seen_ % core::kEventLogCapacity]);
    }
    if (each_) each_(d);
  }

 private:
  std::vector<core::Event>& events_;
  std::function<void(const core::Diagnostics&)> each_;
  std::uint32_t seen_ = 0;
};

/// What a closed-loop run observed, scan by scan.
struct BenchRun {
  std::unique_ptr<machine_file::LoadedMachine> machine;
  std::unique_ptr<hostsim::Plant> plant;
  std::vector<core::Event> events;  // every event the core logged, in order
  std::vector<FaultEntry> faults;
  std::vector<NoticeEntry> notices;
  bool ok = false;
};

/// Runs `machine_json` with `scenario_json`; `each` is called after every
/// scan with the plant (before it advances) and the core's diagnostics.
inline BenchRun run_bench(const nlohmann::json& machine_json, const nlohmann::json& scenario_json,
                          const std::function<void(const hostsim::Plant&, const core::Diagnostics&)>& each = {}) {
  BenchRun r;
  auto load = machine_file::load_machine_text(machine_json.dump(), "machine.json");
  for (const auto& e : load.errors) ADD_FAILURE() << e.to_string();
  if (!load.ok()) return r;
  r.machine = std::move(load.machine);
  const core::MachineConfig& m = r.machine->config;
  auto built = hostsim::build_plant(r.machine->plant, m, "machine.json");
  if (auto* errors = std::get_if<std::vector<hostsim::PlantError>>(&built)) {
    for (const auto& e : *errors) ADD_FAILURE() << e.to_string();
    return r;
  }
  r.plant = std::move(std::get<std::unique_ptr<hostsim::Plant>>(built));
  PlantAdapter adapter(*r.plant);
  const PlantFacts facts = plant_facts(*r.plant, m, adapter.signals());
  auto scenario = load_scenario_text(scenario_json.dump(), "scenario.json", m, &facts);
  for (const auto& e : scenario.errors) ADD_FAILURE() << e.to_string();
  if (!scenario.ok()) return r;
  FaultLog log(m, static_cast<double>(m.safety.scan_period_us) * 1e-6);
  hostsim::Plant& plant = *r.plant;
  EventRecorder recorder(r.events, [&](const core::Diagnostics& d) {
    if (each) each(plant, d);
  });
  RunOptions options;
  options.observers = {&log, &recorder};
  const RunOutcome outcome = run_scenario(m, *scenario.scenario, adapter.backend(), {}, options);
  EXPECT_TRUE(outcome.completed()) << outcome.error;
  r.faults = log.entries();
  r.notices = log.notices();
  r.ok = outcome.completed();
  return r;
}

}  // namespace spoolstep::benchrun::testing
