#include "spoolstep/runtime/scan_loop.hpp"

#include <fmt/format.h>

namespace spoolstep::runtime {
namespace {

std::string at_time(std::uint64_t t_us, const std::string& what) {
  return fmt::format("at {:.3f} s: {}", static_cast<double>(t_us) * 1e-6, what);
}

}  // namespace

const char* to_string(LoopOutcome outcome) {
  switch (outcome) {
    case LoopOutcome::kCompleted: return "completed";
    case LoopOutcome::kConfigRejected: return "configuration rejected";
    case LoopOutcome::kInputFailed: return "input port failed";
    case LoopOutcome::kOutputFailed: return "output port failed";
    case LoopOutcome::kModelFailed: return "plant model failed";
    case LoopOutcome::kStopRequested: return "stopped on request";
  }
  return "unknown outcome";
}

std::uint64_t scan_period_us(const core::MachineConfig& machine) {
  return machine.safety.scan_period_us == 0 ? 1000 : machine.safety.scan_period_us;
}

std::string core_rejection_text(const core::Status& status) {
  return fmt::format("the control core rejects this configuration ({} in {} row {})", core::to_string(status.code()),
                     status.where(), status.index());
}

std::string ScanLoop::write_safe_outputs(std::uint64_t scan_time_us) {
  const io::PortStatus s = output_.write(io::safe_outputs(), scan_time_us);
  return s.is_ok() ? std::string() : "; writing the safe outputs failed too: " + s.what();
}

LoopResult ScanLoop::run(const core::MachineConfig& machine, const LoopSchedule& schedule,
                         const std::atomic<bool>* stop_requested) {
  LoopResult result;
  const core::Status status = controller_.init(machine);
  if (!status.is_ok()) {
    result.outcome = LoopOutcome::kConfigRejected;
    result.error = core_rejection_text(status);
    return result;
  }
  core::InputImage inputs{};
  core::OutputImage outputs{};
  const std::uint64_t period = schedule.period_us == 0 ? 1000 : schedule.period_us;
  for (std::uint64_t t_us = 0; t_us <= schedule.end_us; t_us += period) {
    result.ended_at_us = t_us;
    clock_.sleep_until(t_us);
    if (stop_requested != nullptr && stop_requested->load()) {
      result.outcome = LoopOutcome::kStopRequested;
      result.error = at_time(t_us, "the run was asked to stop") + write_safe_outputs(t_us);
      return result;
    }
    const io::PortStatus read = input_.read(inputs, t_us);
    if (!read.is_ok()) {
      // The core never sees inputs that could not be read: the outputs go
      // to the safe state in this scan instead.
      result.outcome = LoopOutcome::kInputFailed;
      result.error = at_time(t_us, read.what()) + write_safe_outputs(t_us);
      return result;
    }
    const auto now_us = static_cast<std::uint32_t>(clock_.now_us() & 0xFFFFFFFFu);
    for (ScanObserver* o : observers_) o->before_scan(inputs, now_us);
    controller_.scan(inputs, now_us, outputs);
    ++result.scans;
    const ScanView view{t_us, now_us, inputs, outputs, controller_.diagnostics()};
    for (ScanObserver* o : observers_) o->after_scan(view);
    const io::PortStatus written = output_.write(outputs, t_us);
    if (!written.is_ok()) {
      result.outcome = LoopOutcome::kOutputFailed;
      result.error = at_time(t_us, written.what()) + write_safe_outputs(t_us);
      return result;
    }
    if (model_ != nullptr) {
      const io::PortStatus advanced = model_->advance(period);
      if (!advanced.is_ok()) {
        result.outcome = LoopOutcome::kModelFailed;
        result.error = advanced.what() + write_safe_outputs(t_us);
        return result;
      }
    }
  }
  return result;
}

}  // namespace spoolstep::runtime
