#pragma once
/// The one scan loop on the host. Every host program that runs the control
/// core (bench runs, and the rack runtimes) drives it through this loop:
///
///   sleep until the scan's time -> read inputs -> scan -> observers -> write outputs -> advance the model
///
/// Time comes from the clock it is given (simulated on the bench). On any
/// port error the loop writes the safe output image (all off) once, stops
/// scanning, and says in words what failed and when: nothing goes on on
/// stale data.
#include <atomic>
#include <cstdint>
#include <string>
#include <vector>

#include "spoolstep/core/controller.hpp"
#include "spoolstep/io/clock.hpp"
#include "spoolstep/io/ports.hpp"

namespace spoolstep::runtime {

/// What the observers see of one scan.
struct ScanView {
  std::uint64_t scan_time_us = 0;  ///< the schedule's time of this scan (machine time on the bench)
  std::uint32_t core_now_us = 0;   ///< the time stamp the core got
  const core::InputImage& inputs;
  const core::OutputImage& outputs;
  const core::Diagnostics& diagnostics;
};

/// Watches the loop (trace writers, expectation checks, fault logs, golden
/// vectors). Observers never change the images.
class ScanObserver {
 public:
  virtual ~ScanObserver() = default;
  /// Just before the core scans, with the exact inputs and time stamp it gets.
  virtual void before_scan(const core::InputImage& /*inputs*/, std::uint32_t /*core_now_us*/) {}
  /// After the scan, before its outputs are written.
  virtual void after_scan(const ScanView& scan) = 0;
};

/// How a run of the loop ended. Only kCompleted is a finished run.
enum class LoopOutcome : std::uint8_t {
  kCompleted = 0,    ///< every scheduled scan ran
  kConfigRejected,   ///< the core refused the configuration; no scan ran, no output was written
  kInputFailed,      ///< an input port failed: safe outputs written, run ended
  kOutputFailed,     ///< the output port failed: safe outputs written (attempted), run ended
  kModelFailed,      ///< the simulated backend could not go on: safe outputs written, run ended
  kStopRequested,    ///< the caller asked to stop (a signal): safe outputs written, run ended
};

/// Short name of an outcome ("completed", "input port failed", ...).
const char* to_string(LoopOutcome outcome);

struct LoopResult {
  LoopOutcome outcome = LoopOutcome::kCompleted;
  std::string error;                 ///< what failed, in words, with the time ("at 12.345 s: ...")
  std::uint64_t scans = 0;           ///< scans the core ran
  std::uint64_t ended_at_us = 0;     ///< schedule time of the last scan started
  bool completed() const { return outcome == LoopOutcome::kCompleted; }
};

struct LoopSchedule {
  std::uint64_t period_us = 1000;
  std::uint64_t end_us = 0;  ///< the last scan runs at the last multiple of the period at or before this
};

/// The period the loop runs a machine at (the machine file's scan period).
std::uint64_t scan_period_us(const core::MachineConfig& machine);

/// The one wording of a configuration the core rejects.
std::string core_rejection_text(const core::Status& status);

class ScanLoop {
 public:
  /// `model` may be null (nothing to advance between scans). Every reference
  /// must outlive the loop.
  ScanLoop(io::InputPort& input, io::OutputPort& output, io::Clock& clock, io::Steppable* model = nullptr)
      : input_(input), output_(output), clock_(clock), model_(model) {}

  /// Observers are called in the order they were added.
  void add_observer(ScanObserver& observer) { observers_.push_back(&observer); }

  /// Initialises a fresh controller with `machine` and runs the schedule.
  /// `stop_requested` (may be null) is polled once per scan.
  LoopResult run(const core::MachineConfig& machine, const LoopSchedule& schedule,
                 const std::atomic<bool>* stop_requested = nullptr);

  /// The controller of the last run (its diagnostics after the run).
  const core::Controller& controller() const { return controller_; }

 private:
  /// Writes the safe image once; returns the words to add if that failed too.
  std::string write_safe_outputs(std::uint64_t scan_time_us);

  io::InputPort& input_;
  io::OutputPort& output_;
  io::Clock& clock_;
  io::Steppable* model_;
  std::vector<ScanObserver*> observers_;
  core::Controller controller_;
};

}  // namespace spoolstep::runtime
