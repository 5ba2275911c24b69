// Scan cost of the control core on the demo machine.
//
// BM_CoreScan_BusiestState: the demo press cell in its busiest state: an
// automatic cycle in fast approach with the press ramp accelerating, the
// clamp held, every interlock and condition evaluated each scan. The state
// is restored from a snapshot every 100 scans (outside the timing) so the
// ramp never settles.
// BM_CoreScan_WholeCycle: the average scan over the recorded inputs of the
// demo replay timeline (a full cycle, a guard opening, an e-stop, a reset).
#include <benchmark/benchmark.h>

#include <cstdlib>
#include <iostream>
#include <vector>

#include "spoolstep/benchrun/runner.hpp"
#include "spoolstep/benchrun/scenario.hpp"
#include "spoolstep/core/controller.hpp"
#include "spoolstep/machine_file/machine_file.hpp"

namespace {

using namespace spoolstep;

struct Recorded {
  std::unique_ptr<machine_file::LoadedMachine> machine;
  std::vector<core::InputImage> inputs;
  std::vector<std::uint32_t> times;
};

const Recorded& recorded() {
  static Recorded r = [] {
    Recorded rec;
    const std::string dir = SPOOLSTEP_SOURCE_DIR;
    auto load = machine_file::load_machine_file(dir + "/config/press_cell.json");
    if (!load.ok()) {
      std::cerr << "cannot load the demo machine\n";
      std::abort();
    }
    rec.machine = std::move(load.machine);
    auto scenario = benchrun::load_scenario_file(dir + "/config/scenarios/press_cell_replay.json",
                                                 rec.machine->config, nullptr);
    if (!scenario.ok()) {
      std::cerr << "cannot load the demo replay timeline\n";
      std::abort();
    }
    struct InputRecorder final : runtime::ScanObserver {
      explicit InputRecorder(Recorded& r) : rec(r) {}
      void before_scan(const core::InputImage& in, std::uint32_t now) override {
        rec.inputs.push_back(in);
        rec.times.push_back(now);
      }
      void after_scan(const runtime::ScanView&) override {}
      Recorded& rec;
    } recorder(rec);
    benchrun::RunOptions options;
    options.observers.push_back(&recorder);
    const benchrun::RunOutcome outcome = benchrun::run_scenario(rec.machine->config, *scenario.scenario, {}, {}, options);
    if (!outcome.completed()) {
      std::cerr << "the demo replay timeline did not run: " << outcome.error << "\n";
      std::abort();
    }
    return rec;
  }();
  return r;
}

void BM_CoreScan_BusiestState(benchmark::State& state) {
  const Recorded& rec = recorded();
  const core::MachineConfig& config = rec.machine->config;
  core::Controller controller;
  if (!controller.init(config).is_ok()) state.SkipWithError("demo configuration invalid");
  core::OutputImage out{};
  // Run the recorded inputs up to 3.36 s: fast approach has just begun.
  std::size_t k = 0;
  for (; k < rec.times.size() && rec.times[k] <= 3360000u; ++k) controller.scan(rec.inputs[k], rec.times[k], out);
  const auto& step = config.steps[controller.diagnostics().active_step];
  if (std::string(machine_file::name_view(step.name)) != "fast_approach") state.SkipWithError("not in fast_approach");
  const core::Controller snapshot = controller;
  const core::InputImage input = rec.inputs[k];
  std::uint32_t now = rec.times[k];
  int since_restore = 0;
  for (auto _ : state) {
    controller.scan(input, now, out);
    benchmark::DoNotOptimize(out);
    now += 1000;
    if (++since_restore == 100) {
      state.PauseTiming();
      controller = snapshot;
      now = rec.times[k];
      since_restore = 0;
      state.ResumeTiming();
    }
  }
  state.counters["press_command"] = controller.diagnostics().functions[1].command;
}
BENCHMARK(BM_CoreScan_BusiestState);

void BM_CoreScan_WholeCycle(benchmark::State& state) {
  const Recorded& rec = recorded();
  core::Controller controller;
  if (!controller.init(rec.machine->config).is_ok()) state.SkipWithError("demo configuration invalid");
  core::OutputImage out{};
  std::size_t k = 0;
  for (auto _ : state) {
    controller.scan(rec.inputs[k], rec.times[k], out);
    benchmark::DoNotOptimize(out);
    if (++k == rec.inputs.size()) {
      k = 0;
      state.PauseTiming();
      if (!controller.init(rec.machine->config).is_ok()) state.SkipWithError("init failed");
      state.ResumeTiming();
    }
  }
}
BENCHMARK(BM_CoreScan_WholeCycle);

}  // namespace
