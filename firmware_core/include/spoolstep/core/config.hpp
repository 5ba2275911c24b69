#pragma once
/// The machine configuration the core runs: plain data with fixed capacities,
/// produced on the host by the machine-file loader or compiled in as constant
/// data by `spoolstep export`. The core never changes it. Times are in
/// microseconds (`_us`), speeds in percent of full valve opening, analog
/// values in the engineering unit the machine file names for the input.
#include <array>
#include <cstdint>

#include "spoolstep/core/capacity.hpp"
#include "spoolstep/core/valve_kinds.hpp"

namespace spoolstep::core {

/// A fixed-size NUL-terminated name, so the target can name things in its
/// diagnostics without a heap.
struct Name {
  std::array<char, kMaxNameLength + 1> text{};
};

/// IEC 60204-1 clause 9.2.2 stop categories.
enum class StopCategory : std::uint8_t {
  kCat0 = 0,  ///< remove power at once: every coil and current off, valves spring-centre
  kCat1 = 1,  ///< controlled stop on the quick-stop ramp, then remove power
  kCat2 = 2,  ///< controlled stop, power (pump, valve enables) stays available
};

enum class Direction : std::uint8_t { kNone = 0, kExtend = 1, kRetract = 2 };

enum class RampProfile : std::uint8_t {
  kLinear = 0,
  kSCurve = 1,  ///< jerk-limited: acceleration rises over jerk_us
};

/// One named ramp of a proportional function. Times are for a full-scale
/// change (0 to 100 %); a smaller change takes proportionally less time.
/// An S-curve adds jerk_us to each full-scale change (acceleration
/// 100 %/accel, jerk = acceleration/jerk_us).
struct RampConfig {
  Name name;
  RampProfile profile = RampProfile::kLinear;
  std::uint32_t extend_accel_us = 0;
  std::uint32_t extend_decel_us = 0;
  std::uint32_t retract_accel_us = 0;
  std::uint32_t retract_decel_us = 0;
  std::uint32_t jerk_us = 0;  ///< S-curve only
};

/// Current range of one proportional solenoid. A command just above zero
/// jumps to the crack current (the deadband jump); full command is max_ma.
struct SolenoidCurrent {
  float crack_ma = 0.0f;
  float max_ma = 0.0f;
};

struct FunctionConfig {
  Name name;
  ValveKind valve = ValveKind::kSolenoid43SpringCentred;
  ValveCentre centre = ValveCentre::kClosed;
  std::uint8_t coil_extend = kNoIndex8;   ///< solenoid kinds: coil for P->A
  std::uint8_t coil_retract = kNoIndex8;  ///< solenoid kinds: coil for P->B (none on 4/2 spring return)
  std::uint8_t prop_extend = kNoIndex8;   ///< two-solenoid proportional: channel for P->A; signed: the one channel
  std::uint8_t prop_retract = kNoIndex8;  ///< two-solenoid proportional: channel for P->B
  std::uint8_t enable_coil = kNoIndex8;   ///< optional valve-electronics enable, on while not in a cat 0/1 stop
  SolenoidCurrent current_extend;         ///< two-solenoid proportional
  SolenoidCurrent current_retract;
  float deadband_jump_percent = 0.0f;     ///< signed-command proportional: |command| just above 0 jumps here
  float dither_amplitude_ma = 0.0f;       ///< passed through to the amplifier
  float dither_frequency_hz = 0.0f;
  std::uint8_t extended_end_input = kNoIndex8;   ///< digital input, true = end reached
  std::uint8_t retracted_end_input = kNoIndex8;
  std::uint8_t position_input = kNoIndex8;       ///< analog input for the position window
  float extend_limit = 0.0f;    ///< position window, in the position input's unit; used when position_input set
  float retract_limit = 0.0f;
  /// A position limit, once reached, counts as reached until the position is
  /// back inside the window by this much (hysteresis), so a load ringing on
  /// its oil springs cannot re-open the valve towards the limit. The band is
  /// the machine's own: larger than the transmitter's noise and the load's
  /// ring-back (common practice, no source); the loader's default is 1 % of
  /// the position input's range.
  float limit_release_band = 0.0f;
  /// Slow-down before an end of travel (proportional valves only): inside a
  /// zone the motion's speed is limited to slowdown_speed_percent, reached on
  /// its ramp's deceleration, so the cut at the end switch or the limit is
  /// made from creep speed. Cutting a moving mass at full speed traps it on
  /// the oil's spring: the peak is v*sqrt(beta*m/V) above the line pressure
  /// (hydraulic spring, textbook physics). A zone's length is the machine's
  /// (its speed, its mass, its decel ramp), so the file sets it; 0 or no
  /// input: no slow-down (`spoolstep check` warns for a proportional
  /// function with an end of travel and no slow-down).
  float extend_slowdown = 0.0f;   ///< zone before extend_limit, in the position input's unit (0: none)
  float retract_slowdown = 0.0f;  ///< zone after retract_limit, in the position input's unit (0: none)
  std::uint8_t extend_slowdown_input = kNoIndex8;   ///< digital input, true = inside the zone before the extended end
  std::uint8_t retract_slowdown_input = kNoIndex8;  ///< digital input, true = inside the zone before the retracted end
  float slowdown_speed_percent = 0.0f;  ///< creep speed inside a zone, percent of full valve opening
  std::uint32_t reversal_dwell_us = 0;  ///< both sides off at least this long before reversing
  std::uint32_t detent_pulse_us = 0;    ///< detented valves: coil pulse that shifts the spool
  std::uint32_t quick_stop_us = 0;      ///< full-scale decel time of a category 1/2 stop (proportional)
  float jog_speed_percent = 0.0f;       ///< manual hold-to-run speed (proportional)
  std::uint16_t jog_extend = kNoCondition;   ///< condition: hold-to-run extend in manual mode
  std::uint16_t jog_retract = kNoCondition;
  std::array<RampConfig, kMaxRampsPerFunction> ramps{};  ///< ramp 0 is the default
  std::uint8_t ramp_count = 0;
};

/// Operations of the compiled condition form. Nodes are evaluated in index
/// order once per scan; a node only reads nodes with a lower index.
enum class ConditionOp : std::uint8_t {
  kTrue = 0,
  kFalse,
  kDigitalInput,   ///< a: input index
  kAnalogAbove,    ///< a: analog index; true above threshold, falls below threshold - hysteresis
  kAnalogBelow,    ///< a: analog index; true below threshold, rises above threshold + hysteresis
  kFunctionState,  ///< a: function, b: FunctionCondition
  kNodeRef,        ///< a: node (a named interlock's condition), value copied
  kStepActive,     ///< a: step index
  kTwoHandHeld,    ///< a: two-hand device index
  kModeIs,         ///< b: 0 manual, 1 automatic
  kPowerUnitReady,
  kNot,            ///< a: child node
  kAll,            ///< a: first slot in child_slots, b: count
  kAny,            ///< a: first slot in child_slots, b: count
  kOnDelay,        ///< a: child; true once the child has been true for time_us
  kOffDelay,       ///< a: child; stays true until the child has been false for time_us
  kDebounce,       ///< a: child; follows the child once it has been stable for time_us
};

/// Function states a condition can test. Motion states are those of the
/// previous scan (a condition cannot depend on the outputs it decides);
/// end states read the end-of-travel inputs of this scan.
enum class FunctionCondition : std::uint8_t {
  kAtExtendedEnd = 0,
  kAtRetractedEnd,
  kExtending,
  kRetracting,
  kStopped,
};

struct ConditionNode {
  ConditionOp op = ConditionOp::kFalse;
  std::uint16_t a = 0;
  std::uint16_t b = 0;
  float threshold = 0.0f;
  float hysteresis = 0.0f;
  std::uint32_t time_us = 0;
  Name label;  ///< what the machine file wrote, for diagnostics ("guard_closed", "press_pressure > 120")
};

enum class InterlockKind : std::uint8_t {
  kPermissive = 0,  ///< must hold to start and to keep moving; loss stops the guarded motions
  kTrip = 1,        ///< loss latches a fault and stops the guarded motions until reset
};

struct InterlockConfig {
  Name name;
  InterlockKind kind = InterlockKind::kPermissive;
  StopCategory stop_category = StopCategory::kCat1;
  std::uint16_t condition = kNoCondition;  ///< healthy when true
  std::uint32_t guards = 0;  ///< bit (function*2 + direction-1) per motion, kPowerUnitGuardBit for the pump
};

/// ISO 13851 type III two-hand device: both inputs within max_sync_us of
/// each other; release of either ends the command; both released before the
/// next command.
struct TwoHandConfig {
  Name name;
  std::uint8_t left_input = kNoIndex8;
  std::uint8_t right_input = kNoIndex8;
  std::uint32_t max_sync_us = 500000;
  /// Motions a cycle started with this device holds (kAutoHeld) when either
  /// hand comes off. ISO 13851 type III asks for continuous actuation during
  /// the hazardous phase (from memory, clause not confirmed), so the default
  /// is every motion of the cycle. A cycle whose later motions are not
  /// hazardous (the return stroke of an opened tool) names the hazardous ones
  /// only; `spoolstep check` warns about each motion of the cycle left out.
  std::uint32_t release_holds = kAllMotionBits;
};

enum class AnalogSignal : std::uint8_t {
  kEngineering = 0,  ///< the value arrives already in engineering units
  kCurrent4To20 = 1, ///< the value is the loop current in mA; NAMUR NE 43 bands apply
};

struct AnalogInputConfig {
  Name name;
  Name unit;
  AnalogSignal signal = AnalogSignal::kEngineering;
  float range_min = 0.0f;  ///< engineering value at 4 mA
  float range_max = 0.0f;  ///< engineering value at 20 mA
  std::uint32_t max_age_us = 0;  ///< older samples fault the input (0: check off)
};

enum class PropUnit : std::uint8_t { kMilliamp = 0, kPercent = 1 };

struct PropOutputConfig {
  Name name;
  PropUnit unit = PropUnit::kMilliamp;
};

struct PowerUnitConfig {
  bool present = false;
  std::uint8_t motor_coil = kNoIndex8;
  std::uint8_t dump_coil = kNoIndex8;     ///< energised = dump closed = pump loaded; off dumps to tank
  std::uint32_t unloaded_start_us = 0;    ///< motor runs unloaded this long before the dump closes
  std::uint16_t pressure_ready = kNoCondition;
  std::uint32_t pressure_ready_timeout_us = 0;
  std::uint16_t start = kNoCondition;     ///< operator condition, rising edge starts
  std::uint16_t stop = kNoCondition;      ///< operator condition, true stops (category 1)
};

struct OperatorConfig {
  std::uint8_t estop_input = kNoIndex8;  ///< normally closed: true = not pressed
  StopCategory estop_category = StopCategory::kCat0;
  std::uint16_t reset = kNoCondition;        ///< rising edge
  std::uint16_t cycle_start = kNoCondition;  ///< rising edge
  std::uint16_t cycle_stop = kNoCondition;   ///< true requests stop at end of cycle
  std::uint16_t auto_mode = kNoCondition;    ///< true selects automatic, false manual
  std::uint16_t continuous = kNoCondition;   ///< true: continuous cycling; false: single cycle
  /// True requests a stop (IEC 60204-1 stop function, here category 2:
  /// controlled, power kept): an automatic cycle holds, jogs stop, and no
  /// start is accepted while it is true. Overrides every start.
  std::uint16_t stop = kNoCondition;
  /// Bit per SoftCommand (soft_command.hpp) the core accepts from
  /// OperatorCommands. Default none: a command channel acts only where the
  /// file says so, and never in place of a control the file requires from a
  /// physical device (validate_config refuses a soft cycle start where a
  /// two-hand device starts the cycle, and a soft select_auto where a
  /// selector sets the mode).
  std::uint16_t soft_commands = 0;
};

struct StepAction {
  std::uint8_t function = 0;
  Direction direction = Direction::kNone;
  float speed_percent = 100.0f;
  std::uint8_t ramp = 0;
};

struct StepConfig {
  Name name;
  std::array<StepAction, kMaxActionsPerStep> actions{};
  std::uint8_t action_count = 0;
  std::uint32_t min_time_us = 0;      ///< no transition fires before this
  std::uint32_t supervision_us = 0;   ///< 0: unsupervised; else a fault if still active after this
};

struct TransitionConfig {
  std::uint8_t from_step = 0;
  std::uint8_t to_step = 0;
  std::uint16_t condition = kNoCondition;
};

struct SafetyConfig {
  std::uint32_t scan_period_us = 1000;         ///< nominal, for the host runners
  std::uint32_t watchdog_us = 0;               ///< longer since the previous scan forces safe outputs
  std::uint32_t max_digital_age_us = 0;        ///< stale digital image faults (0: check off)
  StopCategory input_fault_category = StopCategory::kCat0;
  StopCategory supervision_category = StopCategory::kCat1;
};

struct MachineConfig {
  Name name;
  SafetyConfig safety;
  std::array<Name, kMaxDigitalInputs> digital_inputs{};
  std::uint8_t digital_input_count = 0;
  std::array<AnalogInputConfig, kMaxAnalogInputs> analog_inputs{};
  std::uint8_t analog_input_count = 0;
  std::array<Name, kMaxCoils> coils{};
  std::uint8_t coil_count = 0;
  std::array<PropOutputConfig, kMaxPropOutputs> prop_outputs{};
  std::uint8_t prop_output_count = 0;
  std::array<FunctionConfig, kMaxFunctions> functions{};
  std::uint8_t function_count = 0;
  PowerUnitConfig power_unit;
  OperatorConfig operator_panel;
  std::array<TwoHandConfig, kMaxTwoHandDevices> two_hand{};
  std::uint8_t two_hand_count = 0;
  std::array<ConditionNode, kMaxConditionNodes> nodes{};
  std::uint16_t node_count = 0;
  std::array<std::uint16_t, kMaxConditionChildren> child_slots{};
  std::uint16_t child_slot_count = 0;
  std::array<InterlockConfig, kMaxInterlocks> interlocks{};
  std::uint8_t interlock_count = 0;
  std::array<StepConfig, kMaxSteps> steps{};   ///< step 0 is the initial step
  std::uint8_t step_count = 0;
  std::array<TransitionConfig, kMaxTransitions> transitions{};  ///< per step, earlier rows win
  std::uint8_t transition_count = 0;
};

/// Guard bit of one motion.
constexpr std::uint32_t motion_bit(std::uint8_t function, Direction direction) {
  return direction == Direction::kNone
             ? 0u
             : 1u << (function * 2u + (direction == Direction::kExtend ? 0u : 1u));
}

}  // namespace spoolstep::core
