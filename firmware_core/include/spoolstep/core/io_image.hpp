#pragma once
/// What goes into one scan (inputs, operator commands) and what comes out
/// (outputs, diagnostics). Plain data with fixed capacities.
#include <array>
#include <cstdint>

#include "spoolstep/core/capacity.hpp"
#include "spoolstep/core/config.hpp"

namespace spoolstep::core {

struct AnalogSample {
  float value = 0.0f;       ///< mA for 4-20 mA inputs, else engineering units
  bool healthy = false;     ///< the I/O layer's own verdict (channel fault, out of range ADC)
  std::uint32_t age_us = 0; ///< time since the I/O layer last refreshed this value
};

/// Soft operator commands from an HMI or a test script. Each one the machine
/// file enables (OperatorConfig::soft_commands) is OR-ed with the file's
/// condition for the same signal; the others are refused and logged. The
/// emergency stop is not here on purpose: it must come from a hardwired input.
struct OperatorCommands {
  bool reset = false;
  bool cycle_start = false;
  bool cycle_stop = false;
  bool select_auto = false;
  bool continuous = false;
  bool pump_start = false;
  bool pump_stop = false;
  bool stop = false;  ///< operator stop (category 2), see OperatorConfig::stop
  std::array<Direction, kMaxFunctions> jog{};  ///< hold-to-run per function (manual mode)
};

struct InputImage {
  std::array<bool, kMaxDigitalInputs> digital{};
  std::uint32_t digital_age_us = 0;  ///< time since the digital block was last refreshed
  std::array<AnalogSample, kMaxAnalogInputs> analog{};
  OperatorCommands commands;
};

struct PropChannel {
  float value = 0.0f;  ///< mA or percent, as the channel's unit says
  float dither_amplitude_ma = 0.0f;
  float dither_frequency_hz = 0.0f;
};

struct OutputImage {
  std::array<bool, kMaxCoils> coils{};
  std::array<PropChannel, kMaxPropOutputs> prop{};
};

/// The machine's lifecycle state. What each allows the outputs to do:
enum class MachineState : std::uint8_t {
  kPowerUp = 0,    ///< after power-on: all outputs off, nothing moves until a reset
  kManual,         ///< hold-to-run jog only; pump may run
  kAutoIdle,       ///< automatic selected, no cycle: functions stopped, pump may run
  kAutoCycle,      ///< the step chain runs
  kAutoEndCycle,   ///< cycle stop requested: the chain finishes its cycle, then idles
  kAutoHeld,       ///< a permissive stopped the chain mid-cycle: no motion, the step is kept;
                   ///< only a new cycle start resumes (closing a guard never restarts by itself)
  kStopping,       ///< a category 1 stop ramps down; then kFaulted with power off
  kFaulted,        ///< latched fault or emergency stop: no motion; needs release and reset
};
inline constexpr std::size_t kMachineStateCount = 8;

enum class FaultCode : std::uint8_t {
  kNone = 0,
  kEmergencyStop,       ///< subject: -
  kTrip,                ///< subject: interlock index
  kStepSupervision,     ///< subject: step, detail: the first unmet condition node
  kAnalogInputFault,    ///< subject: analog input, detail: AnalogFaultReason
  kDigitalInputsStale,  ///< subject: -
  kScanWatchdog,        ///< detail: none (the late interval is in the event)
  kPressureNotReady,    ///< power unit did not reach pressure in time
  kConfigInvalid,       ///< the configuration failed the core's own check
  kOutputInvariant,     ///< the output check caught two solenoids of one valve on: all outputs forced off
  kTimeSource,          ///< the time stamps froze or ran backwards: nothing timed can be trusted
  kStopTimeout,         ///< a controlled stop did not finish in time: escalated to category 0
};

enum class AnalogFaultReason : std::uint8_t {
  kUnhealthy = 0,     ///< the I/O layer flagged the channel
  kStale = 1,         ///< older than max_age_us
  kNe43FailLow = 2,   ///< NAMUR NE 43: 3.6 mA or less
  kNe43FailHigh = 3,  ///< NAMUR NE 43: 21 mA or more
  kNotFinite = 4,     ///< NaN or infinity from the I/O layer
};

struct Fault {
  FaultCode code = FaultCode::kNone;
  std::uint8_t subject = 0;
  std::uint16_t detail = 0;
  StopCategory category = StopCategory::kCat0;
  std::uint32_t raised_at_us = 0;
  bool cause_present = false;  ///< the cause was seen this scan; a reset cannot clear it yet
};

enum class EventCode : std::uint8_t {
  kStateChanged = 0,   ///< subject: new MachineState, detail: old state
  kStepChanged,        ///< subject: new step, detail: old step
  kFaultRaised,        ///< subject: FaultCode, detail: fault subject
  kFaultsCleared,      ///< by a reset
  kPermissiveLost,     ///< subject: interlock index
  kEndOfTravel,        ///< subject: function, detail: direction
  kPowerUnitState,     ///< subject: PowerUnitState
  kTwoHandBlocked,     ///< subject: device; the second hand came too late
  kStartRefused,       ///< subject: StartRefusal, detail: the first unmet node of the initial step's transition
  kTwoHandReleased,    ///< subject: device; a hand came off while the cycle it started ran (the cycle holds)
  kSoftCommandRefused, ///< subject: SoftCommand the machine file does not enable (logged when it is first given)
};

/// Why a cycle start was refused (subject of kStartRefused).
enum class StartRefusal : std::uint8_t {
  kNotReady = 0,      ///< the initial step's transition does not hold (detail: its first unmet node)
  kStopPressed = 1,   ///< the operator stop is pressed: it overrides every start
  kRepeatNotReady = 2,  ///< a continuous repeat whose start conditions do not hold ended the cycle
};

struct Event {
  std::uint32_t time_us = 0;
  EventCode code = EventCode::kStateChanged;
  std::uint8_t subject = 0;
  std::uint16_t detail = 0;
};

/// Fixed ring of the most recent events. `total` counts every event ever
/// pushed, so a reader can tell how many it missed.
struct EventLog {
  std::array<Event, kEventLogCapacity> ring{};
  std::uint32_t total = 0;

  /// Append one event, overwriting the oldest when full.
  void push(const Event& event) {
    ring[total % kEventLogCapacity] = event;
    ++total;
  }
  /// Number of events currently held.
  std::uint32_t size() const {
    return total < kEventLogCapacity ? total : static_cast<std::uint32_t>(kEventLogCapacity);
  }
  /// The i-th held event, oldest first.
  const Event& at(std::uint32_t i) const {
    const std::uint32_t first = total - size();
    return ring[(first + i) % kEventLogCapacity];
  }
};

enum class PowerUnitState : std::uint8_t {
  kOff = 0,
  kStartingUnloaded,  ///< motor on, dump open
  kLoading,           ///< dump closed, waiting for pressure ready
  kReady,
};

enum class MotionState : std::uint8_t {
  kStopped = 0,
  kExtending,
  kRetracting,
  kStopping,      ///< ramping down to zero
  kReversalDwell, ///< centred, waiting out reversal_dwell_us
};

struct FunctionStatus {
  MotionState motion = MotionState::kStopped;
  Direction demand = Direction::kNone;  ///< what the mode logic asked for this scan
  float command = 0.0f;        ///< ramped signed speed, -1 (full retract) .. +1 (full extend)
  float target = 0.0f;
  Direction detent_side = Direction::kNone;  ///< detented valves: side the spool was last shifted to
  bool blocked = false;        ///< a permissive or trip holds this function's demand off
};

struct Diagnostics {
  MachineState state = MachineState::kPowerUp;
  bool auto_selected = false;
  std::uint8_t active_step = 0;
  std::uint32_t step_elapsed_us = 0;
  std::uint32_t completed_cycles = 0;
  std::array<Fault, kMaxActiveFaults> faults{};
  std::uint8_t fault_count = 0;
  bool faults_overflowed = false;  ///< a fault could not be recorded since the last reset (acts as category 0)
  std::uint32_t interlock_ok = 0;       ///< bit per interlock: condition currently true
  std::uint32_t interlock_latched = 0;  ///< bit per trip interlock: latched until reset
  std::array<bool, kMaxTwoHandDevices> two_hand_held{};
  std::array<float, kMaxAnalogInputs> analog_value{};  ///< engineering units after scaling
  std::array<FunctionStatus, kMaxFunctions> functions{};
  PowerUnitState power_unit = PowerUnitState::kOff;
  std::uint32_t last_scan_interval_us = 0;
  EventLog events;
};

}  // namespace spoolstep::core
