// The parameter table: the one place where every machine-file parameter's
// type, unit, default, limits and meaning are written. The loader reads its
// limits and defaults from here and `spoolstep check --reference` prints it.
#include "spoolstep/machine_file/parameters.hpp"

#include <array>

#include "spoolstep/core/valve_kinds.hpp"

namespace spoolstep::machine_file {
namespace {

// The choices of the valve kind and the centre are the keys of the core's
// tables (core/valve_kinds.hpp), joined with '|' at compile time, so the
// reference and the loader can never list a kind the core does not know.
template <std::size_t N>
struct FixedText {
  std::array<char, N> text{};
};
template <std::size_t N, typename Row, std::size_t M>
constexpr FixedText<N> join_keys(const Row (&rows)[M], std::size_t first) {
  FixedText<N> out;
  std::size_t n = 0;
  for (std::size_t i = first; i < M; ++i) {
    if (i > first) out.text[n++] = '|';
    for (const char* c = rows[i].key; *c != '\0'; ++c) out.text[n++] = *c;
  }
  out.text[n] = '\0';
  return out;
}
constexpr auto kValveKindChoices = join_keys<256>(core::kValveKinds, 0);
constexpr auto kCentreChoices = join_keys<128>(core::kCentres, 1);  // "none" (4/2) is never written in a file

using T = ParamType;
constexpr Presence kReq{Presence::Kind::kAlways, ""};
constexpr Presence kOpt{Presence::Kind::kOptional, ""};
constexpr Presence kInObject{Presence::Kind::kInObject, ""};
constexpr Presence required_when(std::string_view when) { return Presence{Presence::Kind::kWhen, when}; }
// The valve kind decides which outputs it needs: the "Valve kinds" table of
// the reference, printed from core::kValveKinds.
constexpr Presence kWhenTheValveKindNeedsIt = required_when("the valve kind needs it (Valve kinds table)");
constexpr double kNoLimit = 0.0;

// Longest time the file may give in milliseconds: one hour. The core keeps
// times in 32-bit microseconds, which would wrap after about 71 minutes.
constexpr double kMaxTimeMs = 3600000.0;

constexpr const char* kStopCategoryNote =
    "Stop categories are those of IEC 60204-1 clause 9.2.2: 0, 1 or 2.";

// clang-format off
constexpr std::array kTable = {
  Parameter{"/format", T::kChoice, "", kReq, "", kNoLimit, kNoLimit, "spoolstep-machine/1",
            "Format tag and version of the machine file.", ""},
  Parameter{"/machine/name", T::kName, "", kReq, "", kNoLimit, kNoLimit, "",
            "Name of the machine, used in diagnostics and reports.", ""},
  Parameter{"/machine/description", T::kText, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Free text: what the machine is and where its data comes from.", ""},

  Parameter{"/timing/scan_period_us", T::kInteger, "us", kOpt, "1000", 100, 100000, "",
            "Nominal scan period the host runners use.", ""},
  Parameter{"/timing/watchdog_ms", T::kInteger, "ms", kOpt, "20", 1, 10000, "",
            "A scan later than this after the previous one forces safe outputs; at least two scan periods.", ""},
  Parameter{"/timing/max_digital_age_ms", T::kInteger, "ms", kOpt, "50", 1, 60000, "",
            "Digital inputs older than this fault the machine.",
            "The check cannot be switched off: a frozen input image must stop the machine."},
  Parameter{"/timing/input_fault_stop_category", T::kInteger, "", kOpt, "0", 0, 1, "",
            "Stop category on a stale or faulty input: 0 or 1.",
            "spoolstep's own rule: a stop that keeps power on (category 2) must not rely on faulty inputs; use 0 or 1."},
  Parameter{"/timing/supervision_stop_category", T::kInteger, "", kOpt, "1", 0, 2, "",
            "Stop category when a step overruns its supervision time.", kStopCategoryNote},

  Parameter{"/inputs/digital/*/name", T::kName, "", kReq, "", kNoLimit, kNoLimit, "",
            "Name of the digital input (unique among all I/O points).", ""},
  Parameter{"/inputs/digital/*/description", T::kText, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Free text: device, wiring, contact type.", ""},
  Parameter{"/inputs/analog/*/name", T::kName, "", kReq, "", kNoLimit, kNoLimit, "",
            "Name of the analog input (unique among all I/O points).", ""},
  Parameter{"/inputs/analog/*/description", T::kText, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Free text: sensor and wiring.", ""},
  Parameter{"/inputs/analog/*/unit", T::kText, "", kReq, "", kNoLimit, kNoLimit, "",
            "Engineering unit of the value (at most 23 characters), e.g. bar, mm, degC.", ""},
  Parameter{"/inputs/analog/*/signal", T::kChoice, "", kReq, "", kNoLimit, kNoLimit, "4-20mA|engineering",
            "4-20mA: the I/O delivers loop current, scaled by range, NAMUR NE 43 fault bands apply; engineering: already scaled.", ""},
  Parameter{"/inputs/analog/*/range", T::kRange, "input's unit", kReq, "", kNoLimit, kNoLimit, "",
            "[value at 4 mA, value at 20 mA]; also the plausible span of an engineering signal.", ""},
  Parameter{"/inputs/analog/*/max_age_ms", T::kInteger, "ms", kOpt, "50", 0, 60000, "",
            "A sample older than this faults the input (0: check off).", ""},

  Parameter{"/outputs/coils/*/name", T::kName, "", kReq, "", kNoLimit, kNoLimit, "",
            "Name of the on/off output (solenoid, contactor).", ""},
  Parameter{"/outputs/coils/*/description", T::kText, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Free text.", ""},
  Parameter{"/outputs/proportional/*/name", T::kName, "", kReq, "", kNoLimit, kNoLimit, "",
            "Name of the proportional output channel.", ""},
  Parameter{"/outputs/proportional/*/description", T::kText, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Free text.", ""},
  Parameter{"/outputs/proportional/*/unit", T::kChoice, "", kReq, "", kNoLimit, kNoLimit, "mA|percent",
            "mA: solenoid current (two-solenoid valves); percent: signed command (valves with on-board electronics).", ""},

  Parameter{"/power_unit/description", T::kText, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Free text.", ""},
  Parameter{"/power_unit/motor", T::kCoil, "", kInObject, "", kNoLimit, kNoLimit, "",
            "Coil of the pump motor contactor.", ""},
  Parameter{"/power_unit/dump_valve", T::kCoil, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Coil of the dump (unloading) valve: energised = pump loaded; off dumps to tank.", ""},
  Parameter{"/power_unit/unloaded_start_ms", T::kInteger, "ms", kOpt, "1000", 0, 60000, "",
            "Motor runs unloaded this long before the dump valve closes.", ""},
  Parameter{"/power_unit/pressure_ready", T::kCondition, "", kOpt, "", kNoLimit, kNoLimit, "",
            "True when system pressure is up; absent: ready once loaded.", ""},
  Parameter{"/power_unit/pressure_ready_timeout_ms", T::kInteger, "ms", kOpt, "5000", 100, 600000, "",
            "Fault if pressure_ready is not reached this long after loading.", ""},
  Parameter{"/power_unit/start", T::kCondition, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Operator condition; its rising edge starts the pump.", ""},
  Parameter{"/power_unit/stop", T::kCondition, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Operator condition; while true the pump stops (category 1).", ""},

  Parameter{"/operator/emergency_stop", T::kDigitalInput, "", kReq, "", kNoLimit, kNoLimit, "",
            "Emergency stop input, normally closed: true = not pressed.", ""},
  Parameter{"/operator/emergency_stop_category", T::kInteger, "", kOpt, "0", 0, 1, "",
            "Stop category of the emergency stop.",
            // IEC 60204-1 via check-values.md 3.1 [SRC] gt-engineering.it chapter 9 summary:
            // the emergency stop shall function as stop category 0 or 1.
            "IEC 60204-1 allows only stop category 0 or 1 for an emergency stop; use 0 or 1."},
  Parameter{"/operator/reset", T::kCondition, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Rising edge resets latched faults (it never starts motion).", ""},
  Parameter{"/operator/cycle_start", T::kCondition, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Rising edge starts a cycle in automatic mode.", ""},
  Parameter{"/operator/cycle_stop", T::kCondition, "", kOpt, "", kNoLimit, kNoLimit, "",
            "True requests a stop at the end of the cycle.", ""},
  Parameter{"/operator/auto_mode", T::kCondition, "", kOpt, "", kNoLimit, kNoLimit, "",
            "True selects automatic mode, false manual.", ""},
  Parameter{"/operator/continuous", T::kCondition, "", kOpt, "", kNoLimit, kNoLimit, "",
            "True: cycle continuously; false: single cycle.", ""},
  Parameter{"/operator/stop", T::kCondition, "", kOpt, "", kNoLimit, kNoLimit, "",
            "True stops motion under control (category 2): a cycle holds, jogs stop, no start is accepted.", ""},
  Parameter{"/operator/soft_commands", T::kSoftCommandList, "", kOpt, "[]", kNoLimit, kNoLimit, "",
            "Soft commands (HMI, command channel, scenario 'command'/'jog') the core accepts: reset, cycle_start, cycle_stop, "
            "select_auto, continuous, pump_start, pump_stop, stop, jog. Any other is refused and logged.",
            "None by default, so a command channel acts only where the file says so. A soft command never replaces a "
            "physical control the file requires: no cycle_start where a two-hand device starts the cycle, no "
            "select_auto where auto_mode names a selector."},

  Parameter{"/two_hand/*/name", T::kName, "", kReq, "", kNoLimit, kNoLimit, "",
            "Name of the two-hand control device.", ""},
  Parameter{"/two_hand/*/description", T::kText, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Free text.", ""},
  Parameter{"/two_hand/*/left", T::kDigitalInput, "", kReq, "", kNoLimit, kNoLimit, "",
            "Left-hand button input.", ""},
  Parameter{"/two_hand/*/right", T::kDigitalInput, "", kReq, "", kNoLimit, kNoLimit, "",
            "Right-hand button input (a different input from left).", ""},
  Parameter{"/two_hand/*/max_sync_ms", T::kInteger, "ms", kOpt, "500", 1, 500, "",
            "Both buttons must be pressed within this time of each other.",
            // ISO 13851 type III synchronous actuation within 0.5 s: from memory.
            "ISO 13851 type III allows at most 500 ms between the two hands."},
  Parameter{"/two_hand/*/release_holds", T::kGuardList, "", kOpt, "all", kNoLimit, kNoLimit, "",
            "Motions a cycle started with this device holds when either hand comes off: 'f.extend', 'f.retract', 'f', 'all'; [] holds none.",
            // ISO 13851 type III continuous actuation: from memory, clause not confirmed.
            "ISO 13851 type III asks for continuous actuation while the motion is hazardous, so the default holds every motion of the cycle; "
            "name fewer only where the later motions are not hazardous (spoolstep check warns about each one left out)."},

  Parameter{"/functions/*/name", T::kName, "", kReq, "", kNoLimit, kNoLimit, "",
            "Name of the function (one actuator on one directional valve); not 'all' or 'pump'.", ""},
  Parameter{"/functions/*/description", T::kText, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Free text.", ""},
  Parameter{"/functions/*/valve/kind", T::kChoice, "", kReq, "", kNoLimit, kNoLimit,
            kValveKindChoices.text.data(),
            "Directional valve type; decides which outputs and settings the valve needs.", ""},
  Parameter{"/functions/*/valve/description", T::kText, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Free text, e.g. why this centre was chosen.", ""},
  Parameter{"/functions/*/valve/centre", T::kChoice, "", required_when("the valve is 4/3 (not allowed on 4/2)"), "", kNoLimit, kNoLimit,
            kCentreChoices.text.data(),
            "Flow paths of the 4/3 spool in its centre position.", ""},
  Parameter{"/functions/*/valve/coil_extend", T::kCoil, "", kWhenTheValveKindNeedsIt, "", kNoLimit, kNoLimit, "",
            "Solenoid valves: coil that shifts P->A (extend).", ""},
  Parameter{"/functions/*/valve/coil_retract", T::kCoil, "", kWhenTheValveKindNeedsIt, "", kNoLimit, kNoLimit, "",
            "Double-solenoid valves: coil that shifts P->B (retract).", ""},
  Parameter{"/functions/*/valve/channel_extend", T::kPropOutput, "", kWhenTheValveKindNeedsIt, "", kNoLimit, kNoLimit, "",
            "Two-solenoid proportional: mA channel for P->A.", ""},
  Parameter{"/functions/*/valve/channel_retract", T::kPropOutput, "", kWhenTheValveKindNeedsIt, "", kNoLimit, kNoLimit, "",
            "Two-solenoid proportional: mA channel for P->B.", ""},
  Parameter{"/functions/*/valve/channel", T::kPropOutput, "", kWhenTheValveKindNeedsIt, "", kNoLimit, kNoLimit, "",
            "Signed proportional: the one percent channel (+ extend, - retract).", ""},
  Parameter{"/functions/*/valve/enable", T::kCoil, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Optional valve-electronics enable coil, on while not in a category 0/1 stop.", ""},
  Parameter{"/functions/*/valve/current_extend_ma/crack", T::kNumber, "mA", kInObject, "", 0, 3000, "",
            "Two-solenoid proportional: current at which the P->A edge starts to open.",
            // Proportional solenoid maxima about 0.6-3 A: check-values.md 4.15 [PRACTICE], common practice, no source.
            "Proportional solenoid currents are at most about 3 A (common practice, no source)."},
  Parameter{"/functions/*/valve/current_extend_ma/max", T::kNumber, "mA", kInObject, "", 1, 3000, "",
            "Two-solenoid proportional: current at full P->A opening; above crack.",
            "Proportional solenoid currents are at most about 3 A (common practice, no source)."},
  Parameter{"/functions/*/valve/current_retract_ma/crack", T::kNumber, "mA", kInObject, "", 0, 3000, "",
            "Two-solenoid proportional: current at which the P->B edge starts to open.",
            "Proportional solenoid currents are at most about 3 A (common practice, no source)."},
  Parameter{"/functions/*/valve/current_retract_ma/max", T::kNumber, "mA", kInObject, "", 1, 3000, "",
            "Two-solenoid proportional: current at full P->B opening; above crack.",
            "Proportional solenoid currents are at most about 3 A (common practice, no source)."},
  Parameter{"/functions/*/valve/deadband_jump_percent", T::kNumber, "%", kOpt, "0", 0, 50, "",
            "Signed proportional: a command just above 0 jumps to this to cross the spool overlap.", ""},
  Parameter{"/functions/*/valve/dither/amplitude_ma", T::kNumber, "mA", kOpt, "0", 0, 500, "",
            "Proportional: dither amplitude passed to the amplifier (0: off).", ""},
  Parameter{"/functions/*/valve/dither/frequency_hz", T::kNumber, "Hz", kInObject, "", 1, 1000, "",
            "Proportional: dither frequency.", ""},
  Parameter{"/functions/*/valve/detent_pulse_ms", T::kInteger, "ms", kOpt, "100", 10, 2000, "",
            "Detented 4/2 valves: length of the coil pulse that shifts the spool.", ""},
  Parameter{"/functions/*/extended_end", T::kDigitalInput, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Input that is true at the extended end of travel.", ""},
  Parameter{"/functions/*/retracted_end", T::kDigitalInput, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Input that is true at the retracted end of travel.", ""},
  Parameter{"/functions/*/position/input", T::kAnalogInput, "", kInObject, "", kNoLimit, kNoLimit, "",
            "Analog position input of the actuator.", ""},
  Parameter{"/functions/*/position/extend_limit", T::kNumber, "input's unit", kInObject, "", -1e9, 1e9, "",
            "Extending stops at this position; inside the input range, above retract_limit.", ""},
  Parameter{"/functions/*/position/retract_limit", T::kNumber, "input's unit", kInObject, "", -1e9, 1e9, "",
            "Retracting stops at this position; inside the input range.", ""},
  Parameter{"/functions/*/position/release_band", T::kNumber, "input's unit", kOpt, "", 0, 1e9, "",
            "A reached position limit counts as reached until the position is back inside the window by this much "
            "(absent: 1 % of the input's range); a motion stopped at its end moves towards it again only after its jog or step demand is released.",
            // Hysteresis against a load ringing back out of the limit: common practice, no source.
            "The band must exceed the transmitter's noise and the load's ring-back (common practice, no source); below the distance between the limits."},
  Parameter{"/functions/*/slowdown/description", T::kText, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Free text, e.g. how the zone was sized.", ""},
  Parameter{"/functions/*/slowdown/extend_zone", T::kNumber, "input's unit", kOpt, "0", 0, 1e9, "",
            "Proportional: zone before extend_limit in which extending creeps at speed_percent (0: none); needs the position input.",
            // Stopping a moving mass on trapped oil peaks at v*sqrt(beta*m/V): textbook physics (check-values.md 4.9, derived).
            "The zone must let the decel ramp bring the speed down before the end; less than the distance between the limits."},
  Parameter{"/functions/*/slowdown/retract_zone", T::kNumber, "input's unit", kOpt, "0", 0, 1e9, "",
            "Proportional: zone after retract_limit in which retracting creeps at speed_percent (0: none); needs the position input.",
            "The zone must let the decel ramp bring the speed down before the end; less than the distance between the limits."},
  Parameter{"/functions/*/slowdown/extend_input", T::kDigitalInput, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Proportional: slow-down switch, true inside the zone before the extended end; extending creeps while it is true.", ""},
  Parameter{"/functions/*/slowdown/retract_input", T::kDigitalInput, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Proportional: slow-down switch, true inside the zone before the retracted end; retracting creeps while it is true.", ""},
  Parameter{"/functions/*/slowdown/speed_percent", T::kNumber, "%", kOpt, "10", 1, 100, "",
            "Proportional: creep speed inside a slow-down zone, reached on the motion's decel ramp; the cut at the end is made from it.", ""},
  Parameter{"/functions/*/reversal_dwell_ms", T::kInteger, "ms", kOpt, "100", 0, 10000, "",
            "Both sides off at least this long before the direction reverses.", ""},
  Parameter{"/functions/*/quick_stop_ms", T::kInteger, "ms", kOpt, "100", 1, 10000, "",
            "Proportional: full-scale deceleration time of a category 1 or 2 stop.", ""},
  Parameter{"/functions/*/jog/extend", T::kCondition, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Hold-to-run extend in manual mode.", ""},
  Parameter{"/functions/*/jog/retract", T::kCondition, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Hold-to-run retract in manual mode.", ""},
  Parameter{"/functions/*/jog/speed_percent", T::kNumber, "%", kOpt, "10", 1, 100, "",
            "Proportional: jog speed in percent of full valve opening.", ""},
  Parameter{"/functions/*/ramps/*/name", T::kName, "", kReq, "", kNoLimit, kNoLimit, "",
            "Name of the ramp (proportional only); ramp 0 is the default.", ""},
  Parameter{"/functions/*/ramps/*/description", T::kText, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Free text.", ""},
  Parameter{"/functions/*/ramps/*/profile", T::kChoice, "", kOpt, "linear", kNoLimit, kNoLimit, "linear|s_curve",
            "Ramp shape; s_curve limits jerk.", ""},
  Parameter{"/functions/*/ramps/*/extend_accel_ms", T::kInteger, "ms", kOpt, "500", 0, 60000, "",
            "Time for a full-scale speed increase while extending.", ""},
  Parameter{"/functions/*/ramps/*/extend_decel_ms", T::kInteger, "ms", kOpt, "500", 0, 60000, "",
            "Time for a full-scale speed decrease while extending.", ""},
  Parameter{"/functions/*/ramps/*/retract_accel_ms", T::kInteger, "ms", kOpt, "500", 0, 60000, "",
            "Time for a full-scale speed increase while retracting.", ""},
  Parameter{"/functions/*/ramps/*/retract_decel_ms", T::kInteger, "ms", kOpt, "500", 0, 60000, "",
            "Time for a full-scale speed decrease while retracting.", ""},
  Parameter{"/functions/*/ramps/*/jerk_ms", T::kInteger, "ms", kOpt, "0", 0, 60000, "",
            "s_curve only: time over which the acceleration builds up.", ""},

  Parameter{"/interlocks/*/name", T::kName, "", kReq, "", kNoLimit, kNoLimit, "",
            "Name of the interlock.", ""},
  Parameter{"/interlocks/*/description", T::kText, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Free text.", ""},
  Parameter{"/interlocks/*/kind", T::kChoice, "", kReq, "", kNoLimit, kNoLimit, "permissive|trip",
            "permissive: must hold to move, loss stops; trip: loss latches a fault until reset.", ""},
  Parameter{"/interlocks/*/stop_category", T::kInteger, "", kOpt, "1", 0, 2, "",
            "Stop category of the guarded motions when the condition is lost.", kStopCategoryNote},
  Parameter{"/interlocks/*/condition", T::kCondition, "", kReq, "", kNoLimit, kNoLimit, "",
            "Healthy while true.", ""},
  Parameter{"/interlocks/*/guards", T::kGuardList, "", kReq, "", kNoLimit, kNoLimit, "",
            "What it stops: 'f.extend', 'f.retract', 'f' (both motions of function f), 'pump', 'all'.", ""},

  Parameter{"/sequence/initial_step", T::kStep, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Initial step; must be the first step (written out for the reader).", ""},
  Parameter{"/sequence/steps/*/name", T::kName, "", kReq, "", kNoLimit, kNoLimit, "",
            "Name of the step; the first step is the initial step.", ""},
  Parameter{"/sequence/steps/*/description", T::kText, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Free text.", ""},
  Parameter{"/sequence/steps/*/actions/*/function", T::kFunction, "", kReq, "", kNoLimit, kNoLimit, "",
            "Function the action moves while the step is active.", ""},
  Parameter{"/sequence/steps/*/actions/*/direction", T::kChoice, "", kReq, "", kNoLimit, kNoLimit, "extend|retract",
            "Direction of the motion.", ""},
  Parameter{"/sequence/steps/*/actions/*/speed_percent", T::kNumber, "%", required_when("the function is proportional"), "100", 1, 100, "",
            "Speed in percent of full valve opening; solenoid valves shift fully: absent or 100.", ""},
  Parameter{"/sequence/steps/*/actions/*/ramp", T::kRamp, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Ramp of the function to use (proportional only); absent: the function's first ramp.", ""},
  Parameter{"/sequence/steps/*/min_time_ms", T::kInteger, "ms", kOpt, "0", 0, kMaxTimeMs, "",
            "No transition out of the step fires before this.", ""},
  Parameter{"/sequence/steps/*/supervision_ms", T::kInteger, "ms", required_when("the step has actions (and then not 0)"), "0", 0, kMaxTimeMs, "",
            "Fault if the step is still active after this; 0 = unsupervised.", ""},
  Parameter{"/sequence/transitions/*/from", T::kStep, "", kReq, "", kNoLimit, kNoLimit, "",
            "Step the transition leaves.", ""},
  Parameter{"/sequence/transitions/*/to", T::kStep, "", kReq, "", kNoLimit, kNoLimit, "",
            "Step the transition activates.", ""},
  Parameter{"/sequence/transitions/*/condition", T::kCondition, "", kReq, "", kNoLimit, kNoLimit, "",
            "Transition condition; fires when true (and the step's min_time has passed).", ""},
  Parameter{"/sequence/transitions/*/description", T::kText, "", kOpt, "", kNoLimit, kNoLimit, "",
            "Free text.", ""},

  // Condition forms: "<condition>" stands for any place a condition is written.
  Parameter{"<condition>/input", T::kDigitalInput, "", kReq, "", kNoLimit, kNoLimit, "",
            "True while the digital input is true (a bare string means the same).", ""},
  Parameter{"<condition>/not", T::kCondition, "", kReq, "", kNoLimit, kNoLimit, "",
            "Negation of the condition.", ""},
  Parameter{"<condition>/all", T::kCondition, "", kReq, "", kNoLimit, kNoLimit, "",
            "List of conditions; true when all are true.", ""},
  Parameter{"<condition>/any", T::kCondition, "", kReq, "", kNoLimit, kNoLimit, "",
            "List of conditions; true when any is true.", ""},
  Parameter{"<condition>/analog", T::kAnalogInput, "", kReq, "", kNoLimit, kNoLimit, "",
            "Analog comparison; give exactly one of above or below.", ""},
  Parameter{"<condition>/above", T::kNumber, "input's unit", kOpt, "", -1e9, 1e9, "",
            "True above this value; inside the input's range.", ""},
  Parameter{"<condition>/below", T::kNumber, "input's unit", kOpt, "", -1e9, 1e9, "",
            "True below this value; inside the input's range.", ""},
  Parameter{"<condition>/hysteresis", T::kNumber, "input's unit", kOpt, "0", 0, 1e9, "",
            "Switching back needs the value this far past the threshold.", ""},
  Parameter{"<condition>/on_delay_ms", T::kInteger, "ms", kReq, "", 0, kMaxTimeMs, "",
            "True once 'of' has been true this long.", ""},
  Parameter{"<condition>/off_delay_ms", T::kInteger, "ms", kReq, "", 0, kMaxTimeMs, "",
            "Stays true until 'of' has been false this long.", ""},
  Parameter{"<condition>/debounce_ms", T::kInteger, "ms", kReq, "", 0, kMaxTimeMs, "",
            "Follows 'of' once it has been stable this long.", ""},
  Parameter{"<condition>/of", T::kCondition, "", kReq, "", kNoLimit, kNoLimit, "",
            "The condition a delay or debounce acts on.", ""},
  Parameter{"<condition>/function", T::kFunction, "", kReq, "", kNoLimit, kNoLimit, "",
            "Function whose state is tested (with 'is').", ""},
  Parameter{"<condition>/is", T::kChoice, "", kReq, "", kNoLimit, kNoLimit,
            "at_extended_end|at_retracted_end|extending|retracting|stopped",
            "Function state; motion states are those of the previous scan.", ""},
  Parameter{"<condition>/interlock", T::kInterlock, "", kReq, "", kNoLimit, kNoLimit, "",
            "True while the named interlock's condition is true.", ""},
  Parameter{"<condition>/step", T::kStep, "", kReq, "", kNoLimit, kNoLimit, "",
            "True while the named step is active.", ""},
  Parameter{"<condition>/two_hand", T::kTwoHand, "", kReq, "", kNoLimit, kNoLimit, "",
            "True while the named two-hand device gives a valid command.", ""},
  Parameter{"<condition>/mode", T::kChoice, "", kReq, "", kNoLimit, kNoLimit, "manual|automatic",
            "True while the machine is in this mode.", ""},
  Parameter{"<condition>/power_unit", T::kChoice, "", kReq, "", kNoLimit, kNoLimit, "ready",
            "True while the power unit is running with pressure up.", ""},
};
// clang-format on

}  // namespace

std::size_t parameter_count() { return kTable.size(); }

const Parameter& parameter_at(std::size_t index) { return kTable.at(index); }

const Parameter* find_parameter(std::string_view key) {
  for (const auto& row : kTable) {
    if (row.key == key) return &row;
  }
  return nullptr;
}

std::string_view to_string(ParamType type) {
  switch (type) {
    case ParamType::kInteger: return "integer";
    case ParamType::kNumber: return "number";
    case ParamType::kChoice: return "choice";
    case ParamType::kText: return "text";
    case ParamType::kName: return "name";
    case ParamType::kDigitalInput: return "digital input";
    case ParamType::kAnalogInput: return "analog input";
    case ParamType::kCoil: return "coil";
    case ParamType::kPropOutput: return "proportional output";
    case ParamType::kFunction: return "function";
    case ParamType::kStep: return "step";
    case ParamType::kRamp: return "ramp";
    case ParamType::kInterlock: return "interlock";
    case ParamType::kTwoHand: return "two-hand device";
    case ParamType::kCondition: return "condition";
    case ParamType::kRange: return "[low, high]";
    case ParamType::kGuardList: return "guard list";
    case ParamType::kSoftCommandList: return "soft command list";
  }
  return "?";
}

std::vector<std::string_view> valve_keys_of(const core::ValveKindRow& row) {
  std::vector<std::string_view> keys;
  const auto drives = [&](std::uint8_t bits) { return (row.outputs & bits) != 0; };
  if (row.has_centre) keys.push_back("centre");
  if (drives(core::kDrivesCoilExtend)) keys.push_back("coil_extend");
  if (drives(core::kDrivesCoilRetract)) keys.push_back("coil_retract");
  if (drives(core::kDrivesCurrentExtend)) keys.push_back("channel_extend");
  if (drives(core::kDrivesCurrentRetract)) keys.push_back("channel_retract");
  if (drives(core::kDrivesCurrentExtend)) keys.push_back("current_extend_ma");
  if (drives(core::kDrivesCurrentRetract)) keys.push_back("current_retract_ma");
  if (drives(core::kDrivesSignedCommand)) keys.push_back("channel");
  if (drives(core::kDrivesSignedCommand)) keys.push_back("deadband_jump_percent");
  if (row.meters) keys.push_back("dither");
  if (row.detented) keys.push_back("detent_pulse_ms");
  return keys;
}

}  // namespace spoolstep::machine_file
