#pragma once
/// A bench run: the runtime's scan loop on a simulated clock, with the
/// scenario's timeline as a decorator over the backend's input port (it
/// plays the inputs the scenario sets, its plant faults and its late scans)
/// and the trace sinks as observers of the loop. Nothing reads a clock.
#include <cstdint>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "spoolstep/benchrun/scenario.hpp"
#include "spoolstep/benchrun/trace.hpp"
#include "spoolstep/core/controller.hpp"
#include "spoolstep/io/ports.hpp"
#include "spoolstep/runtime/scan_loop.hpp"

namespace spoolstep::benchrun {

/// Signals a backend adds to each trace row (the plant's pressures, positions, ...).
class TraceSource {
 public:
  virtual ~TraceSource() = default;
  /// The signals, in the order sample() appends their values.
  std::vector<Signal> signals() const { return do_signals(); }
  /// Appends the present value of every signal, in signals() order.
  void sample(std::vector<double>& values) const { do_sample(values); }

 private:
  virtual std::vector<Signal> do_signals() const = 0;
  virtual void do_sample(std::vector<double>& values) const = 0;
};

/// Takes a scenario's plant faults.
class FaultTarget {
 public:
  virtual ~FaultTarget() = default;
  /// Applies a scenario fault from now on; returns an error text if it cannot.
  std::optional<std::string> inject(const nlohmann::json& fault) { return do_inject(fault); }

 private:
  virtual std::optional<std::string> do_inject(const nlohmann::json& fault) = 0;
};

/// What sits behind the core in a bench run. Every member may be null: a
/// run of the core alone has none (the scenario then sets every input and
/// the outputs go nowhere).
struct BenchBackend {
  io::InputPort* sensors = nullptr;
  io::OutputPort* actuators = nullptr;
  io::Steppable* model = nullptr;
  const TraceSource* trace = nullptr;
  FaultTarget* faults = nullptr;
};

struct RunOptions {
  /// Called about every tenth of the run with the simulated time done.
  std::function<void(double done_s, double total_s)> progress;
  /// Further observers of the loop (fault logs, golden vectors, benchmarks),
  /// called before the trace sinks get the scan's row.
  std::vector<runtime::ScanObserver*> observers;
};

struct RunOutcome {
  runtime::LoopOutcome outcome = runtime::LoopOutcome::kCompleted;
  std::string error;  ///< what ended the run early, with the time; empty when completed
  std::uint64_t scans = 0;
  bool completed() const { return outcome == runtime::LoopOutcome::kCompleted; }
};

/// The core's trace signals for `machine`, in row order.
std::vector<Signal> core_signals(const core::MachineConfig& machine);

/// Runs `scenario` on `machine` against `backend` and streams every row to
/// every sink. On a backend failure the loop has written safe outputs once
/// and the outcome says what failed; the sinks have had end() either way.
RunOutcome run_scenario(const core::MachineConfig& machine, const Scenario& scenario, const BenchBackend& backend,
                        const std::vector<TraceSink*>& sinks, const RunOptions& options = {});

}  // namespace spoolstep::benchrun
