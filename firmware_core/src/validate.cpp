// The core's own check of a configuration. The host loader gives friendlier
// messages; this check guards the target, where the configuration may come
// from an exported header or a hand edit, so the scan never indexes out of
// its tables.
#include <cmath>

#include "spoolstep/core/controller.hpp"
#include "spoolstep/core/soft_command.hpp"

namespace spoolstep::core {
namespace {

// Longest quick stop the core accepts: a controlled stop must end.
constexpr std::uint32_t kMaxQuickStopUs = 10000000;

bool io_ok(std::uint8_t index, std::uint8_t count) { return index == kNoIndex8 || index < count; }
bool finite(float x) { return std::isfinite(x); }
bool category_ok(StopCategory c) { return c <= StopCategory::kCat2; }
bool cond_ok(std::uint16_t index, std::uint16_t count) {
  return index == kNoCondition || index < count;
}

Status check_counts(const MachineConfig& c) {
  if (c.digital_input_count > kMaxDigitalInputs) return Status::error(StatusCode::kCapacityExceeded, "digital_inputs", 0);
  if (c.analog_input_count > kMaxAnalogInputs) return Status::error(StatusCode::kCapacityExceeded, "analog_inputs", 0);
  if (c.coil_count > kMaxCoils) return Status::error(StatusCode::kCapacityExceeded, "coils", 0);
  if (c.prop_output_count > kMaxPropOutputs) return Status::error(StatusCode::kCapacityExceeded, "prop_outputs", 0);
  if (c.function_count > kMaxFunctions) return Status::error(StatusCode::kCapacityExceeded, "functions", 0);
  if (c.two_hand_count > kMaxTwoHandDevices) return Status::error(StatusCode::kCapacityExceeded, "two_hand", 0);
  if (c.node_count > kMaxConditionNodes) return Status::error(StatusCode::kCapacityExceeded, "nodes", 0);
  if (c.child_slot_count > kMaxConditionChildren) return Status::error(StatusCode::kCapacityExceeded, "child_slots", 0);
  if (c.interlock_count > kMaxInterlocks) return Status::error(StatusCode::kCapacityExceeded, "interlocks", 0);
  if (c.step_count > kMaxSteps) return Status::error(StatusCode::kCapacityExceeded, "steps", 0);
  if (c.transition_count > kMaxTransitions) return Status::error(StatusCode::kCapacityExceeded, "transitions", 0);
  return Status::ok();
}

Status check_nodes(const MachineConfig& c) {
  for (std::uint16_t i = 0; i < c.node_count; ++i) {
    const ConditionNode& n = c.nodes[i];
    switch (n.op) {
      case ConditionOp::kTrue:
      case ConditionOp::kFalse:
      case ConditionOp::kPowerUnitReady:
        break;
      case ConditionOp::kModeIs:
        if (n.b > 1) return Status::error(StatusCode::kBadValue, "nodes", i);
        break;
      case ConditionOp::kDigitalInput:
        if (n.a >= c.digital_input_count) return Status::error(StatusCode::kIndexOutOfRange, "nodes", i);
        break;
      case ConditionOp::kAnalogAbove:
      case ConditionOp::kAnalogBelow:
        if (n.a >= c.analog_input_count) return Status::error(StatusCode::kIndexOutOfRange, "nodes", i);
        if (!(n.hysteresis >= 0.0f) || !finite(n.threshold) || !finite(n.hysteresis))
          return Status::error(StatusCode::kBadValue, "nodes", i);
        break;
      case ConditionOp::kFunctionState:
        if (n.a >= c.function_count || n.b > static_cast<std::uint16_t>(FunctionCondition::kStopped))
          return Status::error(StatusCode::kIndexOutOfRange, "nodes", i);
        break;
      case ConditionOp::kStepActive:
        if (n.a >= c.step_count) return Status::error(StatusCode::kIndexOutOfRange, "nodes", i);
        break;
      case ConditionOp::kTwoHandHeld:
        if (n.a >= c.two_hand_count) return Status::error(StatusCode::kIndexOutOfRange, "nodes", i);
        break;
      case ConditionOp::kNodeRef:
      case ConditionOp::kNot:
      case ConditionOp::kOnDelay:
      case ConditionOp::kOffDelay:
      case ConditionOp::kDebounce:
        if (n.a >= i) return Status::error(StatusCode::kBadOrder, "nodes", i);
        break;
      case ConditionOp::kAll:
      case ConditionOp::kAny:
        if (n.a + n.b > c.child_slot_count) return Status::error(StatusCode::kIndexOutOfRange, "nodes", i);
        for (std::uint16_t k = 0; k < n.b; ++k) {
          if (c.child_slots[n.a + k] >= i) return Status::error(StatusCode::kBadOrder, "nodes", i);
        }
        break;
      default:
        return Status::error(StatusCode::kBadValue, "nodes", i);
    }
  }
  return Status::ok();
}

// Marks an output channel as owned; a second owner is an error.
bool claim(std::uint8_t index, std::uint64_t& owned) {
  if (index == kNoIndex8) return true;
  const std::uint64_t bit = std::uint64_t{1} << index;
  if (owned & bit) return false;
  owned |= bit;
  return true;
}

Status check_functions(const MachineConfig& c, std::uint64_t& coils_owned) {
  std::uint64_t props_owned = 0;
  for (std::uint8_t i = 0; i < c.function_count; ++i) {
    const FunctionConfig& f = c.functions[i];
    if (!io_ok(f.coil_extend, c.coil_count) || !io_ok(f.coil_retract, c.coil_count) ||
        !io_ok(f.enable_coil, c.coil_count) || !io_ok(f.prop_extend, c.prop_output_count) ||
        !io_ok(f.prop_retract, c.prop_output_count) ||
        !io_ok(f.extended_end_input, c.digital_input_count) ||
        !io_ok(f.retracted_end_input, c.digital_input_count) ||
        !io_ok(f.position_input, c.analog_input_count) || !cond_ok(f.jog_extend, c.node_count) ||
        !io_ok(f.extend_slowdown_input, c.digital_input_count) ||
        !io_ok(f.retract_slowdown_input, c.digital_input_count) ||
        !cond_ok(f.jog_retract, c.node_count))
      return Status::error(StatusCode::kIndexOutOfRange, "functions", i);
    if (!claim(f.coil_extend, coils_owned) || !claim(f.coil_retract, coils_owned) ||
        !claim(f.enable_coil, coils_owned) || !claim(f.prop_extend, props_owned) ||
        !claim(f.prop_retract, props_owned))
      return Status::error(StatusCode::kOutputShared, "functions", i);
    // Exactly the outputs the kind's row names are set (kValveKinds).
    const ValveKindRow* kind = valve_kind_row(f.valve);
    if (kind == nullptr) return Status::error(StatusCode::kBadValue, "functions", i);
    const auto needs = [&](std::uint8_t bits) { return (kind->outputs & bits) != 0; };
    const bool prop_extend_ma = needs(kDrivesCurrentExtend);
    const bool prop_signed = needs(kDrivesSignedCommand);
    bool outputs_ok = (f.coil_extend != kNoIndex8) == needs(kDrivesCoilExtend) &&
                      (f.coil_retract != kNoIndex8) == needs(kDrivesCoilRetract) &&
                      (f.prop_extend != kNoIndex8) == (prop_extend_ma || prop_signed) &&
                      (f.prop_retract != kNoIndex8) == needs(kDrivesCurrentRetract);
    if (outputs_ok && prop_extend_ma) outputs_ok = c.prop_outputs[f.prop_extend].unit == PropUnit::kMilliamp;
    if (outputs_ok && prop_signed) outputs_ok = c.prop_outputs[f.prop_extend].unit == PropUnit::kPercent;
    if (outputs_ok && needs(kDrivesCurrentRetract)) outputs_ok = c.prop_outputs[f.prop_retract].unit == PropUnit::kMilliamp;
    if (prop_extend_ma && !(f.current_extend.crack_ma >= 0.0f && f.current_extend.crack_ma < f.current_extend.max_ma))
      return Status::error(StatusCode::kBadValue, "functions", i);
    if (needs(kDrivesCurrentRetract) &&
        !(f.current_retract.crack_ma >= 0.0f && f.current_retract.crack_ma < f.current_retract.max_ma))
      return Status::error(StatusCode::kBadValue, "functions", i);
    if (prop_signed && !(f.deadband_jump_percent >= 0.0f && f.deadband_jump_percent < 100.0f))
      return Status::error(StatusCode::kBadValue, "functions", i);
    if (!outputs_ok) return Status::error(StatusCode::kMissingOutput, "functions", i);
    if (is_proportional(f.valve) && f.ramp_count == 0)
      return Status::error(StatusCode::kBadValue, "functions", i);
    if (f.ramp_count > kMaxRampsPerFunction)
      return Status::error(StatusCode::kCapacityExceeded, "functions", i);
    if (!(f.jog_speed_percent >= 0.0f && f.jog_speed_percent <= 100.0f))
      return Status::error(StatusCode::kBadValue, "functions", i);
    if (centre_row(f.centre) == nullptr || !finite(f.extend_limit) || !finite(f.retract_limit))
      return Status::error(StatusCode::kBadValue, "functions", i);
    // The release band must leave room between the two limits.
    if (!finite(f.limit_release_band) || f.limit_release_band < 0.0f ||
        (f.position_input != kNoIndex8 && !(f.limit_release_band < f.extend_limit - f.retract_limit)))
      return Status::error(StatusCode::kBadValue, "functions", i);
    // A slow-down meters, so it needs a proportional valve, a creep speed,
    // and zones inside the window (position zones need the transmitter).
    const bool zones = f.extend_slowdown != 0.0f || f.retract_slowdown != 0.0f;
    const bool slows = zones || f.extend_slowdown_input != kNoIndex8 || f.retract_slowdown_input != kNoIndex8;
    if (!finite(f.extend_slowdown) || !finite(f.retract_slowdown) || f.extend_slowdown < 0.0f ||
        f.retract_slowdown < 0.0f || (zones && f.position_input == kNoIndex8) ||
        (zones && !(f.extend_slowdown < f.extend_limit - f.retract_limit &&
                    f.retract_slowdown < f.extend_limit - f.retract_limit)) ||
        (slows && (!is_proportional(f.valve) ||
                   !(f.slowdown_speed_percent > 0.0f && f.slowdown_speed_percent <= 100.0f))))
      return Status::error(StatusCode::kBadValue, "functions", i);
    // A proportional valve's quick stop must be a ramp that ends.
    if (is_proportional(f.valve) && (f.quick_stop_us == 0 || f.quick_stop_us > kMaxQuickStopUs))
      return Status::error(StatusCode::kBadValue, "functions", i);
    if (kind->detented && f.detent_pulse_us == 0)
      return Status::error(StatusCode::kBadValue, "functions", i);
    for (std::uint8_t k = 0; k < f.ramp_count; ++k) {
      if (f.ramps[k].profile > RampProfile::kSCurve) return Status::error(StatusCode::kBadValue, "functions", i);
    }
  }
  return Status::ok();
}

}  // namespace

Status validate_config(const MachineConfig& c) {
  Status status = check_counts(c);
  if (!status.is_ok()) return status;
  status = check_nodes(c);
  if (!status.is_ok()) return status;
  std::uint64_t coils_owned = 0;
  status = check_functions(c, coils_owned);
  if (!status.is_ok()) return status;
  for (std::uint8_t i = 0; i < c.analog_input_count; ++i) {
    const AnalogInputConfig& ai = c.analog_inputs[i];
    if (ai.signal > AnalogSignal::kCurrent4To20 || !finite(ai.range_min) || !finite(ai.range_max) ||
        ai.range_min == ai.range_max)
      return Status::error(StatusCode::kBadValue, "analog_inputs", i);
  }
  for (std::uint8_t i = 0; i < c.prop_output_count; ++i) {
    if (c.prop_outputs[i].unit > PropUnit::kPercent) return Status::error(StatusCode::kBadValue, "prop_outputs", i);
  }

  const PowerUnitConfig& pu = c.power_unit;
  if (pu.present) {
    if (!io_ok(pu.motor_coil, c.coil_count) || !io_ok(pu.dump_coil, c.coil_count) ||
        !cond_ok(pu.pressure_ready, c.node_count) || !cond_ok(pu.start, c.node_count) ||
        !cond_ok(pu.stop, c.node_count))
      return Status::error(StatusCode::kIndexOutOfRange, "power_unit", 0);
    if (pu.motor_coil == kNoIndex8) return Status::error(StatusCode::kMissingOutput, "power_unit", 0);
    if (!claim(pu.motor_coil, coils_owned) || !claim(pu.dump_coil, coils_owned))
      return Status::error(StatusCode::kOutputShared, "power_unit", 0);
  }
  const OperatorConfig& op = c.operator_panel;
  if (op.estop_input == kNoIndex8 || op.estop_input >= c.digital_input_count)
    return Status::error(StatusCode::kIndexOutOfRange, "operator", 0);
  if (op.estop_category > StopCategory::kCat1)  // IEC 60204-1: e-stop is category 0 or 1
    return Status::error(StatusCode::kBadValue, "operator", 0);
  const SafetyConfig& safety = c.safety;
  // The scan watchdog and the stale-input check are not optional: a core
  // that cannot tell a stalled loop or a frozen I/O image keeps driving.
  if (safety.watchdog_us == 0 || safety.max_digital_age_us == 0 || safety.scan_period_us == 0 ||
      !category_ok(safety.input_fault_category) || !category_ok(safety.supervision_category))
    return Status::error(StatusCode::kBadValue, "safety", 0);
  if (!cond_ok(op.reset, c.node_count) || !cond_ok(op.cycle_start, c.node_count) ||
      !cond_ok(op.cycle_stop, c.node_count) || !cond_ok(op.auto_mode, c.node_count) ||
      !cond_ok(op.continuous, c.node_count) || !cond_ok(op.stop, c.node_count))
    return Status::error(StatusCode::kIndexOutOfRange, "operator", 0);

  // A soft command never replaces a control the file requires from a
  // physical device: a two-hand start (ISO 13851, from memory: the hands are
  // to be on the device while the hazard lasts) or a mode selector.
  if ((op.soft_commands & ~((1u << kSoftCommandCount) - 1u)) != 0)
    return Status::error(StatusCode::kBadValue, "operator", 0);
  if ((op.soft_commands & soft_command_bit(SoftCommand::kCycleStart)) != 0 &&
      two_hand_devices_read_by(c, op.cycle_start) != 0)
    return Status::error(StatusCode::kBadValue, "operator", 0);
  if ((op.soft_commands & soft_command_bit(SoftCommand::kSelectAuto)) != 0 && op.auto_mode != kNoCondition)
    return Status::error(StatusCode::kBadValue, "operator", 0);
  for (std::uint8_t i = 0; i < c.two_hand_count; ++i) {
    const TwoHandConfig& t = c.two_hand[i];
    if (t.left_input >= c.digital_input_count || t.right_input >= c.digital_input_count)
      return Status::error(StatusCode::kIndexOutOfRange, "two_hand", i);
    if ((t.release_holds & ~kAllMotionBits) != 0) return Status::error(StatusCode::kBadValue, "two_hand", i);
  }
  const std::uint32_t all_guards = ((std::uint32_t{1} << (c.function_count * 2u)) - 1u) | kPowerUnitGuardBit;
  for (std::uint8_t i = 0; i < c.interlock_count; ++i) {
    const InterlockConfig& il = c.interlocks[i];
    if (il.condition == kNoCondition || il.condition >= c.node_count || (il.guards & ~all_guards) != 0)
      return Status::error(StatusCode::kIndexOutOfRange, "interlocks", i);
    if (!category_ok(il.stop_category) || il.kind > InterlockKind::kTrip)
      return Status::error(StatusCode::kBadValue, "interlocks", i);
  }
  for (std::uint8_t i = 0; i < c.step_count; ++i) {
    const StepConfig& s = c.steps[i];
    if (s.action_count > kMaxActionsPerStep) return Status::error(StatusCode::kCapacityExceeded, "steps", i);
    for (std::uint8_t k = 0; k < s.action_count; ++k) {
      const StepAction& a = s.actions[k];
      if (a.function >= c.function_count) return Status::error(StatusCode::kIndexOutOfRange, "steps", i);
      const FunctionConfig& f = c.functions[a.function];
      if (is_proportional(f.valve) && a.ramp >= f.ramp_count)
        return Status::error(StatusCode::kIndexOutOfRange, "steps", i);
      if (!(a.speed_percent >= 0.0f && a.speed_percent <= 100.0f) || a.direction > Direction::kRetract)
        return Status::error(StatusCode::kBadValue, "steps", i);
    }
    if (s.supervision_us != 0 && s.supervision_us < s.min_time_us)  // would always fault
      return Status::error(StatusCode::kBadValue, "steps", i);
  }
  for (std::uint8_t i = 0; i < c.transition_count; ++i) {
    const TransitionConfig& t = c.transitions[i];
    if (t.from_step >= c.step_count || t.to_step >= c.step_count || t.condition >= c.node_count)
      return Status::error(StatusCode::kIndexOutOfRange, "transitions", i);
  }
  return Status::ok();
}

}  // namespace spoolstep::core
