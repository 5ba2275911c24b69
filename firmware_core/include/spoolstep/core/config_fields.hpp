#pragma once
/// One list of the fields of every configuration struct, as member pointers
/// with their names. The exporter (the firmware header) and the comparator
/// (that the header equals the loader's configuration) both walk these lists,
/// so neither can forget a field. Each list is checked at compile time
/// against the struct's own member count: a field added to a struct and not
/// here fails the build, padding or not.
///
/// A visitor is called as `visitor(name, member_pointer)` for each field.
#include <cstddef>
#include <utility>

#include "spoolstep/core/config.hpp"

namespace spoolstep::core::fields {

/// Tag selecting a struct's field list.
template <typename T>
struct Of {};

template <typename V> constexpr void each(V&& v, Of<Name>) { v("text", &Name::text); }
template <typename V> constexpr void each(V&& v, Of<RampConfig>) {
  v("name", &RampConfig::name);
  v("profile", &RampConfig::profile);
  v("extend_accel_us", &RampConfig::extend_accel_us);
  v("extend_decel_us", &RampConfig::extend_decel_us);
  v("retract_accel_us", &RampConfig::retract_accel_us);
  v("retract_decel_us", &RampConfig::retract_decel_us);
  v("jerk_us", &RampConfig::jerk_us);
}
template <typename V> constexpr void each(V&& v, Of<SolenoidCurrent>) {
  v("crack_ma", &SolenoidCurrent::crack_ma);
  v("max_ma", &SolenoidCurrent::max_ma);
}
template <typename V> constexpr void each(V&& v, Of<FunctionConfig>) {
  using F = FunctionConfig;
  v("name", &F::name);
  v("valve", &F::valve);
  v("centre", &F::centre);
  v("coil_extend", &F::coil_extend);
  v("coil_retract", &F::coil_retract);
  v("prop_extend", &F::prop_extend);
  v("prop_retract", &F::prop_retract);
  v("enable_coil", &F::enable_coil);
  v("current_extend", &F::current_extend);
  v("current_retract", &F::current_retract);
  v("deadband_jump_percent", &F::deadband_jump_percent);
  v("dither_amplitude_ma", &F::dither_amplitude_ma);
  v("dither_frequency_hz", &F::dither_frequency_hz);
  v("extended_end_input", &F::extended_end_input);
  v("retracted_end_input", &F::retracted_end_input);
  v("position_input", &F::position_input);
  v("extend_limit", &F::extend_limit);
  v("retract_limit", &F::retract_limit);
  v("limit_release_band", &F::limit_release_band);
  v("extend_slowdown", &F::extend_slowdown);
  v("retract_slowdown", &F::retract_slowdown);
  v("extend_slowdown_input", &F::extend_slowdown_input);
  v("retract_slowdown_input", &F::retract_slowdown_input);
  v("slowdown_speed_percent", &F::slowdown_speed_percent);
  v("reversal_dwell_us", &F::reversal_dwell_us);
  v("detent_pulse_us", &F::detent_pulse_us);
  v("quick_stop_us", &F::quick_stop_us);
  v("jog_speed_percent", &F::jog_speed_percent);
  v("jog_extend", &F::jog_extend);
  v("jog_retract", &F::jog_retract);
  v("ramps", &F::ramps);
  v("ramp_count", &F::ramp_count);
}
template <typename V> constexpr void each(V&& v, Of<ConditionNode>) {
  v("op", &ConditionNode::op);
  v("a", &ConditionNode::a);
  v("b", &ConditionNode::b);
  v("threshold", &ConditionNode::threshold);
  v("hysteresis", &ConditionNode::hysteresis);
  v("time_us", &ConditionNode::time_us);
  v("label", &ConditionNode::label);
}
template <typename V> constexpr void each(V&& v, Of<InterlockConfig>) {
  v("name", &InterlockConfig::name);
  v("kind", &InterlockConfig::kind);
  v("stop_category", &InterlockConfig::stop_category);
  v("condition", &InterlockConfig::condition);
  v("guards", &InterlockConfig::guards);
}
template <typename V> constexpr void each(V&& v, Of<TwoHandConfig>) {
  v("name", &TwoHandConfig::name);
  v("left_input", &TwoHandConfig::left_input);
  v("right_input", &TwoHandConfig::right_input);
  v("max_sync_us", &TwoHandConfig::max_sync_us);
  v("release_holds", &TwoHandConfig::release_holds);
}
template <typename V> constexpr void each(V&& v, Of<AnalogInputConfig>) {
  v("name", &AnalogInputConfig::name);
  v("unit", &AnalogInputConfig::unit);
  v("signal", &AnalogInputConfig::signal);
  v("range_min", &AnalogInputConfig::range_min);
  v("range_max", &AnalogInputConfig::range_max);
  v("max_age_us", &AnalogInputConfig::max_age_us);
}
template <typename V> constexpr void each(V&& v, Of<PropOutputConfig>) {
  v("name", &PropOutputConfig::name);
  v("unit", &PropOutputConfig::unit);
}
template <typename V> constexpr void each(V&& v, Of<PowerUnitConfig>) {
  using P = PowerUnitConfig;
  v("present", &P::present);
  v("motor_coil", &P::motor_coil);
  v("dump_coil", &P::dump_coil);
  v("unloaded_start_us", &P::unloaded_start_us);
  v("pressure_ready", &P::pressure_ready);
  v("pressure_ready_timeout_us", &P::pressure_ready_timeout_us);
  v("start", &P::start);
  v("stop", &P::stop);
}
template <typename V> constexpr void each(V&& v, Of<OperatorConfig>) {
  using O = OperatorConfig;
  v("estop_input", &O::estop_input);
  v("estop_category", &O::estop_category);
  v("reset", &O::reset);
  v("cycle_start", &O::cycle_start);
  v("cycle_stop", &O::cycle_stop);
  v("auto_mode", &O::auto_mode);
  v("continuous", &O::continuous);
  v("stop", &O::stop);
  v("soft_commands", &O::soft_commands);
}
template <typename V> constexpr void each(V&& v, Of<StepAction>) {
  v("function", &StepAction::function);
  v("direction", &StepAction::direction);
  v("speed_percent", &StepAction::speed_percent);
  v("ramp", &StepAction::ramp);
}
template <typename V> constexpr void each(V&& v, Of<StepConfig>) {
  v("name", &StepConfig::name);
  v("actions", &StepConfig::actions);
  v("action_count", &StepConfig::action_count);
  v("min_time_us", &StepConfig::min_time_us);
  v("supervision_us", &StepConfig::supervision_us);
}
template <typename V> constexpr void each(V&& v, Of<TransitionConfig>) {
  v("from_step", &TransitionConfig::from_step);
  v("to_step", &TransitionConfig::to_step);
  v("condition", &TransitionConfig::condition);
}
template <typename V> constexpr void each(V&& v, Of<SafetyConfig>) {
  v("scan_period_us", &SafetyConfig::scan_period_us);
  v("watchdog_us", &SafetyConfig::watchdog_us);
  v("max_digital_age_us", &SafetyConfig::max_digital_age_us);
  v("input_fault_category", &SafetyConfig::input_fault_category);
  v("supervision_category", &SafetyConfig::supervision_category);
}
template <typename V> constexpr void each(V&& v, Of<MachineConfig>) {
  using M = MachineConfig;
  v("name", &M::name);
  v("safety", &M::safety);
  v("digital_inputs", &M::digital_inputs);
  v("digital_input_count", &M::digital_input_count);
  v("analog_inputs", &M::analog_inputs);
  v("analog_input_count", &M::analog_input_count);
  v("coils", &M::coils);
  v("coil_count", &M::coil_count);
  v("prop_outputs", &M::prop_outputs);
  v("prop_output_count", &M::prop_output_count);
  v("functions", &M::functions);
  v("function_count", &M::function_count);
  v("power_unit", &M::power_unit);
  v("operator_panel", &M::operator_panel);
  v("two_hand", &M::two_hand);
  v("two_hand_count", &M::two_hand_count);
  v("nodes", &M::nodes);
  v("node_count", &M::node_count);
  v("child_slots", &M::child_slots);
  v("child_slot_count", &M::child_slot_count);
  v("interlocks", &M::interlocks);
  v("interlock_count", &M::interlock_count);
  v("steps", &M::steps);
  v("step_count", &M::step_count);
  v("transitions", &M::transitions);
  v("transition_count", &M::transition_count);
}

// ---- compile-time completeness -------------------------------------------

/// True when T has a field list here.
template <typename T, typename = void>
struct has_fields : std::false_type {};
struct FieldCounter {
  std::size_t count = 0;
  template <typename S, typename M>
  constexpr void operator()(const char*, M S::*) { ++count; }
};
template <typename T>
struct has_fields<T, std::void_t<decltype(each(std::declval<FieldCounter&>(), Of<T>{}))>> : std::true_type {};

/// Fields the list of T names.
template <typename T>
constexpr std::size_t listed_field_count() {
  FieldCounter counter;
  each(counter, Of<T>{});
  return counter.count;
}

/// Converts to any member type; used only in unevaluated context to count
/// an aggregate's members by how many initialisers it takes.
template <typename Aggregate>
struct AnyMember {
  template <typename T, typename = std::enable_if_t<!std::is_same_v<T, Aggregate>>>
  constexpr operator T() const;  // never defined
};
template <typename T, typename... A>
constexpr auto takes_initialisers(int) -> decltype(T{std::declval<A>()...}, true) {
  return true;
}
template <typename T, typename... A>
constexpr bool takes_initialisers(...) {
  return false;
}
/// The number of members of aggregate T (the most initialisers T{...} takes).
template <typename T, typename... A>
constexpr std::size_t member_count() {
  if constexpr (takes_initialisers<T, A..., AnyMember<T>>(0)) {
    return member_count<T, A..., AnyMember<T>>();
  } else {
    return sizeof...(A);
  }
}

/// True when the field list of T names every member of T.
template <typename T>
constexpr bool lists_every_member() {
  return listed_field_count<T>() == member_count<T>();
}

#define SPOOLSTEP_FIELDS_COMPLETE(T) \
  static_assert(lists_every_member<T>(), #T ": a member is missing from its field list in core/config_fields.hpp")
SPOOLSTEP_FIELDS_COMPLETE(Name);
SPOOLSTEP_FIELDS_COMPLETE(RampConfig);
SPOOLSTEP_FIELDS_COMPLETE(SolenoidCurrent);
SPOOLSTEP_FIELDS_COMPLETE(FunctionConfig);
SPOOLSTEP_FIELDS_COMPLETE(ConditionNode);
SPOOLSTEP_FIELDS_COMPLETE(InterlockConfig);
SPOOLSTEP_FIELDS_COMPLETE(TwoHandConfig);
SPOOLSTEP_FIELDS_COMPLETE(AnalogInputConfig);
SPOOLSTEP_FIELDS_COMPLETE(PropOutputConfig);
SPOOLSTEP_FIELDS_COMPLETE(PowerUnitConfig);
SPOOLSTEP_FIELDS_COMPLETE(OperatorConfig);
SPOOLSTEP_FIELDS_COMPLETE(StepAction);
SPOOLSTEP_FIELDS_COMPLETE(StepConfig);
SPOOLSTEP_FIELDS_COMPLETE(TransitionConfig);
SPOOLSTEP_FIELDS_COMPLETE(SafetyConfig);
SPOOLSTEP_FIELDS_COMPLETE(MachineConfig);
#undef SPOOLSTEP_FIELDS_COMPLETE

}  // namespace spoolstep::core::fields
