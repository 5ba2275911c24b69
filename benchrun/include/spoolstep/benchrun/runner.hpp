#pragma once
/// The lock-step bench loop: at every scan period the plant's sensors fill
/// the input image, the scenario applies its events, the core scans once,
/// the row is recorded, and the plant advances one period under the new
/// outputs. Time is simulated; nothing reads a clock.
#include <cstdint>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "spoolstep/benchrun/scenario.hpp"
#include "spoolstep/benchrun/trace.hpp"
#include "spoolstep/core/controller.hpp"

namespace spoolstep::benchrun {

/// The plant side of the loop. Public non-virtual methods call private
/// virtual ones, so the loop's contract stays in one place.
class PlantPort {
 public:
  virtual ~PlantPort() = default;
  /// Signals the plant adds to each row (pressures, positions, ...).
  std::vector<Signal> signals() const { return do_signals(); }
  /// Writes the plant-driven inputs (sensors) into `inputs`.
  void read_inputs(core::InputImage& inputs) const { do_read_inputs(inputs); }
  /// Appends the current value of every plant signal, in signals() order.
  void sample(std::vector<double>& values) const { do_sample(values); }
  /// Takes the outputs of the scan just made.
  void apply_outputs(const core::OutputImage& outputs) { do_apply_outputs(outputs); }
  /// Advances the plant by dt_s under the last outputs.
  void advance(double dt_s) { do_advance(dt_s); }
  /// Applies a scenario fault; returns an error text if it cannot.
  std::optional<std::string> inject(const nlohmann::json& fault) { return do_inject(fault); }

 private:
  virtual std::vector<Signal> do_signals() const = 0;
  virtual void do_read_inputs(core::InputImage& inputs) const = 0;
  virtual void do_sample(std::vector<double>& values) const = 0;
  virtual void do_apply_outputs(const core::OutputImage& outputs) = 0;
  virtual void do_advance(double dt_s) = 0;
  virtual std::optional<std::string> do_inject(const nlohmann::json& fault) = 0;
};

struct RunOptions {
  /// Called about every tenth of the run with the simulated time done.
  std::function<void(double done_s, double total_s)> progress;
  /// Called before every scan with the exact inputs and time the core gets
  /// (golden vectors, benchmarks), and after it with the outputs.
  std::function<void(const core::InputImage& inputs, std::uint32_t now_us)> before_scan;
  std::function<void(const core::OutputImage& outputs, const core::Diagnostics& diagnostics)> after_scan;
};

struct RunOutcome {
  bool completed = false;
  std::string error;       ///< set when a plant fault could not be applied
  std::uint64_t scans = 0;
};

/// The core's trace signals for `machine`, in row order.
std::vector<Signal> core_signals(const core::MachineConfig& machine);

/// Runs `scenario` on `machine` with `plant` (may be null: inputs then come
/// only from the scenario) and streams every row to every sink.
RunOutcome run_scenario(const core::MachineConfig& machine, const Scenario& scenario,
                        PlantPort* plant, const std::vector<TraceSink*>& sinks,
                        const RunOptions& options = {});

}  // namespace spoolstep::benchrun
