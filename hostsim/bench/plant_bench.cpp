// Plant model benchmarks (Google Benchmark). Built by the project's
// spoolstep_bench target; no main() here.
//
//   BM_PlantStep    one 1 ms control period of the demo press plant, cycling
//                   through the open-loop press cycle (the average period cost)
//   BM_PressCycle   the whole 4.5 s press cycle per iteration, per solver
//
// Counter sim_s_per_s: simulated seconds per wall second (the real-time factor).
#include <benchmark/benchmark.h>

#include <memory>

#include <nlohmann/json.hpp>

#include "spoolstep/hostsim/demo.hpp"

namespace {

using namespace spoolstep::hostsim;

std::unique_ptr<Plant> make_demo(const char* method) {
  nlohmann::json plant = demo_plant_json();
  if (method != nullptr) plant["solver"] = {{"method", method}};
  auto result = build_plant(plant, demo_machine(), "demo");
  if (auto* p = std::get_if<std::unique_ptr<Plant>>(&result)) return std::move(*p);
  return nullptr;
}

const char* method_of(const benchmark::State& state) { return state.range(0) == 0 ? "ros2" : "rosenbrock4"; }

void BM_PlantStep(benchmark::State& state) {
  const Timeline cycle = demo_press_cycle();
  const double period = 1e-3;
  const long periods = static_cast<long>(cycle.end_s / period);
  std::unique_ptr<Plant> plant = make_demo(method_of(state));
  if (!plant) {
    state.SkipWithError("demo plant did not build");
    return;
  }
  long k = 0;
  std::size_t next = 0;
  for (auto _ : state) {
    if (k == periods) {  // start the cycle again on a fresh plant (rare, untimed)
      state.PauseTiming();
      plant = make_demo(method_of(state));
      k = 0;
      next = 0;
      state.ResumeTiming();
    }
    const double now = static_cast<double>(k) * period;
    while (next < cycle.events.size() && cycle.events[next].time_s <= now + 0.5 * period) {
      const TimelineEvent& e = cycle.events[next++];
      if (e.what == TimelineEvent::What::kSpool) (void)plant->set_spool_target(e.function, e.target);
      if (e.what == TimelineEvent::What::kPump) plant->set_pump(e.running, e.loaded);
    }
    benchmark::DoNotOptimize(plant->advance(period));
    ++k;
  }
  state.counters["sim_s_per_s"] =
      benchmark::Counter(static_cast<double>(state.iterations()) * period, benchmark::Counter::kIsRate);
}
BENCHMARK(BM_PlantStep)->Arg(0)->Arg(1)->ArgName("odeint");

void BM_PressCycle(benchmark::State& state) {
  const Timeline cycle = demo_press_cycle();
  for (auto _ : state) {
    state.PauseTiming();
    std::unique_ptr<Plant> plant = make_demo(method_of(state));
    Trace trace;
    trace.rows.reserve(5000);
    trace.time_s.reserve(5000);
    state.ResumeTiming();
    benchmark::DoNotOptimize(run_open_loop(*plant, cycle, 1e-3, trace));
  }
  state.counters["sim_s_per_s"] =
      benchmark::Counter(static_cast<double>(state.iterations()) * cycle.end_s, benchmark::Counter::kIsRate);
}
BENCHMARK(BM_PressCycle)->Arg(0)->Arg(1)->ArgName("odeint")->Unit(benchmark::kMillisecond);

}  // namespace
