#include "spoolstep/benchrun/fault_log.hpp"

#include <algorithm>

#include <fmt/format.h>

#include "spoolstep/core/analog.hpp"
#include "spoolstep/core/soft_command.hpp"
#include "spoolstep/machine_file/machine_file.hpp"

namespace spoolstep::benchrun {
namespace {

using machine_file::name_view;
using core::FaultCode;

std::string analog_reason(std::uint16_t detail) {
  switch (static_cast<core::AnalogFaultReason>(detail)) {
    case core::AnalogFaultReason::kUnhealthy: return "the I/O layer flags the channel";
    case core::AnalogFaultReason::kStale: return "the sample is older than max_age_ms";
    case core::AnalogFaultReason::kNe43FailLow:
      return fmt::format("NAMUR NE 43 failure current, {:g} mA or less (wire break?)", core::kNe43FailLowMa);
    case core::AnalogFaultReason::kNe43FailHigh:
      return fmt::format("NAMUR NE 43 failure current, {:g} mA or more", core::kNe43FailHighMa);
    case core::AnalogFaultReason::kNotFinite: return "the value is not a finite number";
  }
  return "unknown reason";
}

}  // namespace

std::string describe_fault(const core::MachineConfig& m, const core::Fault& f) {
  switch (f.code) {
    case FaultCode::kNone: return "no fault";
    case FaultCode::kEmergencyStop: return "emergency stop pressed (or its circuit open)";
    case FaultCode::kTrip:
      return f.subject < m.interlock_count
                 ? fmt::format("trip '{}' latched", name_view(m.interlocks[f.subject].name))
                 : "trip latched";
    case FaultCode::kStepSupervision: {
      const std::string step = f.subject < m.step_count ? std::string(name_view(m.steps[f.subject].name)) : "?";
      if (f.detail < m.node_count) {
        return fmt::format("step '{}' took longer than its supervision time: '{}' did not come true", step,
                           name_view(m.nodes[f.detail].label));
      }
      return fmt::format("step '{}' took longer than its supervision time", step);
    }
    case FaultCode::kAnalogInputFault:
      return f.subject < m.analog_input_count
                 ? fmt::format("analog input '{}': {}", name_view(m.analog_inputs[f.subject].name),
                               analog_reason(f.detail))
                 : "analog input fault";
    case FaultCode::kDigitalInputsStale: return "the digital input image is older than max_digital_age_ms";
    case FaultCode::kScanWatchdog: return "scan watchdog: too long since the previous scan";
    case FaultCode::kPressureNotReady: return "the power unit did not reach pressure in time";
    case FaultCode::kConfigInvalid: return "the configuration failed the core's own check";
    case FaultCode::kOutputInvariant: return "both solenoids of one valve were about to be on: all outputs forced off";
    case FaultCode::kTimeSource: return "the time stamps froze or ran backwards";
    case FaultCode::kStopTimeout: return "a controlled stop did not finish in time: cut to category 0";
  }
  return "unknown fault";
}

std::string describe_notice(const core::MachineConfig& m, const core::Event& e) {
  switch (e.code) {
    case core::EventCode::kStartRefused: {
      const std::string unmet = e.detail < m.node_count
                                    ? fmt::format(": '{}' does not hold", name_view(m.nodes[e.detail].label))
                                    : std::string();
      switch (static_cast<core::StartRefusal>(e.subject)) {
        case core::StartRefusal::kNotReady: return "cycle start refused (not stored)" + unmet;
        case core::StartRefusal::kStopPressed: return "cycle start refused: the operator stop is pressed";
        case core::StartRefusal::kRepeatNotReady: return "continuous cycling ended: the next cycle cannot start" + unmet;
      }
      return "cycle start refused";
    }
    case core::EventCode::kSoftCommandRefused:
      return fmt::format("soft command '{}' refused: operator.soft_commands does not enable it",
                         core::soft_command_name(static_cast<core::SoftCommand>(e.subject)));
    case core::EventCode::kTwoHandBlocked:
      return e.subject < m.two_hand_count
                 ? fmt::format("two-hand '{}': the second hand did not follow within the sync time; no start; "
                               "release both and try again",
                               name_view(m.two_hand[e.subject].name))
                 : "two-hand: the second hand did not follow within the sync time; no start";
    case core::EventCode::kTwoHandReleased:
      return e.subject < m.two_hand_count
                 ? fmt::format("two-hand '{}' let go during the cycle it started: from here its release_holds "
                               "motions are blocked until a new two-hand start (expected after the hazardous stroke; "
                               "a hold if one of them is still to come)",
                               name_view(m.two_hand[e.subject].name))
                 : "two-hand let go during the cycle it started: its release_holds motions are blocked";
    default:
      return "";
  }
}

void FaultLog::observe(const core::Diagnostics& d) {
  const double t_s = static_cast<double>(scans_++) * period_s_;
  // Events pushed since the previous scan (the ring holds the most recent
  // kEventLogCapacity; more in one scan than that cannot happen in practice).
  const std::uint32_t fresh = d.events.total - events_seen_;
  const std::uint32_t held = d.events.size();
  for (std::uint32_t i = fresh > held ? 0 : held - fresh; i < held; ++i) {
    std::string text = describe_notice(machine_, d.events.at(i));
    if (!text.empty()) notices_.push_back(NoticeEntry{t_s, std::move(text)});
  }
  events_seen_ = d.events.total;
  std::vector<std::uint32_t> now;
  for (std::uint8_t i = 0; i < d.fault_count; ++i) {
    const core::Fault& f = d.faults[i];
    const std::uint32_t key = (static_cast<std::uint32_t>(f.code) << 16) | f.subject;
    now.push_back(key);
    if (std::find(active_.begin(), active_.end(), key) == active_.end()) {
      entries_.push_back(FaultEntry{t_s, describe_fault(machine_, f), static_cast<std::uint8_t>(f.category)});
    }
  }
  active_ = std::move(now);
}

}  // namespace spoolstep::benchrun
