// The closed loop on the demo machine: core and plant in lock-step at the
// 1 ms scan period over the demo scenario (press_cell_cycle.json, 16 s of
// machine time), without any trace writer. The counter sim_s_per_wall_s is
// simulated seconds per wall-clock second.
#include <benchmark/benchmark.h>

#include <cstdlib>
#include <iostream>

#include "spoolstep/benchrun/plant_adapter.hpp"
#include "spoolstep/benchrun/runner.hpp"
#include "spoolstep/machine_file/machine_file.hpp"

namespace {

using namespace spoolstep;

void BM_ClosedLoop_DemoCycle(benchmark::State& state) {
  const std::string dir = SPOOLSTEP_SOURCE_DIR;
  auto load = machine_file::load_machine_file(dir + "/config/press_cell.json");
  if (!load.ok()) {
    state.SkipWithError("cannot load the demo machine");
    return;
  }
  const core::MachineConfig& machine = load.machine->config;
  double simulated_s = 0.0;
  for (auto _ : state) {
    state.PauseTiming();
    auto built = hostsim::build_plant(load.machine->plant, machine, "press_cell.json");
    auto* plant = std::get_if<std::unique_ptr<hostsim::Plant>>(&built);
    if (plant == nullptr) {
      state.SkipWithError("cannot build the demo plant");
      return;
    }
    benchrun::PlantAdapter adapter(**plant);
    const benchrun::PlantFacts facts = benchrun::plant_facts(**plant, machine, adapter.signals());
    auto scenario = benchrun::load_scenario_file(dir + "/config/scenarios/press_cell_cycle.json", machine, &facts);
    if (!scenario.ok()) {
      state.SkipWithError("cannot load the demo scenario");
      return;
    }
    state.ResumeTiming();
    const benchrun::RunOutcome outcome = benchrun::run_scenario(machine, *scenario.scenario, adapter.backend(), {});
    if (!outcome.completed()) {
      state.SkipWithError(outcome.error.c_str());
      return;
    }
    simulated_s += scenario.scenario->duration_s;
    const hostsim::SolverStats& st = (*plant)->solver_stats();
    state.counters["steps"] = static_cast<double>(st.accepted);
    state.counters["rejected"] = static_cast<double>(st.rejected);
    state.counters["rhs"] = static_cast<double>(st.rhs_calls);
    state.counters["jacobians"] = static_cast<double>(st.jacobians);
    state.counters["lu"] = static_cast<double>(st.factorisations);
  }
  state.counters["sim_s_per_wall_s"] = benchmark::Counter(simulated_s, benchmark::Counter::kIsRate);
}
BENCHMARK(BM_ClosedLoop_DemoCycle)->Unit(benchmark::kMillisecond)->UseRealTime();

}  // namespace
