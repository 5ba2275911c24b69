// Bench runs whose plant fails: the run ends with safe outputs and a reason
// naming the time; an expectation never counts a non-finite value as within.
#include <gtest/gtest.h>

#include <cmath>
#include <limits>

#include "spoolstep/benchrun/plant_adapter.hpp"
#include "spoolstep/benchrun/runner.hpp"
#include "spoolstep/benchrun/sinks.hpp"
#include "spoolstep/machine_file/machine_file.hpp"

namespace spoolstep {
namespace {

const std::string kDir = SPOOLSTEP_SOURCE_DIR;

// Passes every image on to the plant and keeps the last one.
class Tee final : public io::OutputPort {
 public:
  explicit Tee(io::OutputPort& inner) : inner_(inner) {}
  core::OutputImage last{};
  std::uint64_t writes = 0;

 private:
  io::PortStatus do_write(const core::OutputImage& out, std::uint64_t t_us) override {
    last = out;
    ++writes;
    return inner_.write(out, t_us);
  }
  io::OutputPort& inner_;
};

bool all_off(const core::OutputImage& out) {
  for (bool c : out.coils) {
    if (c) return false;
  }
  for (const auto& p : out.prop) {
    if (p.value != 0.0f) return false;
  }
  return true;
}

struct DemoRun {
  std::unique_ptr<machine_file::LoadedMachine> machine;
  std::unique_ptr<hostsim::Plant> plant;
  std::unique_ptr<benchrun::PlantAdapter> adapter;
  std::unique_ptr<benchrun::Scenario> scenario;

  explicit DemoRun(const std::string& scenario_text) {
    auto load = machine_file::load_machine_file(kDir + "/config/press_cell.json");
    EXPECT_TRUE(load.ok());
    machine = std::move(load.machine);
    auto built = hostsim::build_plant(machine->plant, machine->config, "press_cell.json");
    plant = std::move(std::get<std::unique_ptr<hostsim::Plant>>(built));
    adapter = std::make_unique<benchrun::PlantAdapter>(*plant);
    const benchrun::PlantFacts facts = benchrun::plant_facts(*plant, machine->config, adapter->signals());
    auto s = benchrun::load_scenario_text(scenario_text, "failing.json", machine->config, &facts);
    for (const auto& e : s.errors) ADD_FAILURE() << e.to_string();
    scenario = std::move(s.scenario);
  }
};

// The README's demo start (reset, automatic, pump, two-hand start), then a
// load of 1e308 N on the ram while it moves: the plant's state cannot stay
// finite under it.
const char* kAbsurdLoad = R"({
  "format": "spoolstep-scenario/1",
  "description": "Invented: an absurd load change makes the plant model fail mid-run.",
  "duration_s": 6.0,
  "initial": {"inputs": {"estop_ok": true, "guard_door_closed": true, "pump_stop_ok": true, "stop_ok": true, "oil_level_ok": true},
              "analog": {"oil_temperature": 40}},
  "timeline": [
    {"at_s": 0.2, "pulse": "reset_pb"},
    {"at_s": 0.5, "set": {"auto_selected": true}},
    {"at_s": 0.6, "pulse": "pump_start_pb"},
    {"at_s": 3.0, "pulse": ["two_hand_left", "two_hand_right"], "ms": 2500},
    {"at_s": 3.6, "plant_fault": {"kind": "load_change", "target": "press_cyl", "value": 1e308}}
  ],
  "expect": [
    {"name": "rod-side pressure stays below 250 bar", "kind": "stays_within", "signal": "plant.press_cyl.B.p_bar", "max": 250},
    {"name": "the ram stops short of the part", "kind": "final_within", "signal": "plant.press_cyl.x_mm", "min": 0, "max": 440}
  ]
})";

TEST(BenchFailure, PlantStateThatTurnsNonFiniteEndsTheRunWithSafeOutputsAndTheTime) {
  DemoRun run(kAbsurdLoad);
  ASSERT_TRUE(run.scenario);
  Tee tee(*run.adapter);
  benchrun::BenchBackend backend = run.adapter->backend();
  backend.actuators = &tee;
  benchrun::ExpectationChecker checker(*run.scenario, run.machine->config);
  const benchrun::RunOutcome outcome = benchrun::run_scenario(run.machine->config, *run.scenario, backend, {&checker});
  EXPECT_EQ(outcome.outcome, runtime::LoopOutcome::kModelFailed) << outcome.error;
  EXPECT_NE(outcome.error.find("at 3.6"), std::string::npos) << "names the time: " << outcome.error;
  EXPECT_LT(outcome.scans, 6001u);
  EXPECT_TRUE(all_off(tee.last)) << "the last image the plant got is the safe one";
  EXPECT_FALSE(checker.all_passed()) << "a run that broke never passes";
}

TEST(BenchFailure, ExpectationsCountNonFiniteSamplesAsFailures) {
  DemoRun run(R"({
    "format": "spoolstep-scenario/1", "duration_s": 1.0,
    "initial": {"inputs": {"estop_ok": true, "guard_door_closed": true}},
    "timeline": [{"at_s": 0.2, "set": {"guard_door_closed": false}}],
    "expect": [
      {"name": "within", "kind": "stays_within", "signal": "plant.press_cyl.A.p_bar", "min": 0, "max": 250},
      {"name": "still", "kind": "still_while_off", "signal": "plant.press_cyl.v_mm_s", "tolerance": 1.0,
       "while_off": "guard_door_closed", "grace_ms": 300},
      {"name": "final", "kind": "final_within", "signal": "plant.press_cyl.x_mm", "min": 0, "max": 440}
    ]})");
  ASSERT_TRUE(run.scenario);
  const std::vector<benchrun::Signal> signals = [&] {
    std::vector<benchrun::Signal> s = benchrun::core_signals(run.machine->config);
    const auto extra = run.adapter->signals();
    s.insert(s.end(), extra.begin(), extra.end());
    return s;
  }();
  const int guard = benchrun::find_signal(signals, "di.guard_door_closed");
  ASSERT_GE(guard, 0);
  benchrun::ExpectationChecker checker(*run.scenario, run.machine->config);
  checker.begin(signals);
  const double nan = std::numeric_limits<double>::quiet_NaN();
  for (int k = 0; k <= 1000; ++k) {
    std::vector<double> row(signals.size(), k < 100 ? 0.0 : nan);  // the plant state went NaN at 0.1 s
    row[static_cast<std::size_t>(guard)] = k < 200 ? 1.0 : 0.0;   // guard open from 0.2 s
    checker.row(k * 1e-3, row);
  }
  checker.end(1.0);
  ASSERT_EQ(checker.results().size(), 3u);
  for (const auto& r : checker.results()) {
    EXPECT_FALSE(r.passed) << r.name << ": " << r.detail;
  }
  EXPECT_NE(checker.results()[0].detail.find("not finite"), std::string::npos) << checker.results()[0].detail;
  EXPECT_NE(checker.results()[1].detail.find("not finite"), std::string::npos) << checker.results()[1].detail;
}

}  // namespace
}  // namespace spoolstep
