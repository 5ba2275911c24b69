#pragma once
// Field-by-field comparison of two machine configurations, floats by their
// bits, names by all their bytes. Written independently of the exporter in
// tools/cli/cmd_export.cpp, so that a field the exporter forgets shows up
// here as a difference. If a struct grows, the size checks below fail:
// add the new field here and in the exporter.
#include <cstdint>
#include <cstring>
#include <sstream>
#include <string>
#include <vector>

#include "spoolstep/core/config.hpp"

namespace spoolstep::firmware::testing {

using namespace spoolstep::core;

static_assert(sizeof(FunctionConfig) == 288 && sizeof(ConditionNode) == 44 && sizeof(StepConfig) == 84 &&
                  sizeof(InterlockConfig) == 32 && sizeof(AnalogInputConfig) == 64 &&
                  sizeof(PowerUnitConfig) == 20 && sizeof(OperatorConfig) == 16 && sizeof(MachineConfig) == 18872,
              "a configuration struct changed: update config_compare.hpp and cmd_export.cpp");

class ConfigDiff {
 public:
  std::vector<std::string> differences;

  template <typename T>
  void same(const std::string& path, const T& a, const T& b) {
    if constexpr (std::is_same_v<T, float>) {
      std::uint32_t x = 0, y = 0;
      std::memcpy(&x, &a, 4);
      std::memcpy(&y, &b, 4);
      if (x != y) note(path, a, b);
    } else if constexpr (std::is_enum_v<T>) {
      if (a != b) note(path, static_cast<unsigned>(a), static_cast<unsigned>(b));
    } else if constexpr (std::is_same_v<T, Name>) {
      if (std::memcmp(a.text.data(), b.text.data(), a.text.size()) != 0) note(path, a.text.data(), b.text.data());
    } else {
      if (a != b) note(path, +a, +b);
    }
  }

 private:
  template <typename V>
  void note(const std::string& path, const V& a, const V& b) {
    std::ostringstream o;
    o << path << ": " << a << " vs " << b;
    differences.push_back(o.str());
  }
};

#define SPOOLSTEP_SAME(field) d.same(p + "." #field, a.field, b.field)

inline void compare(ConfigDiff& d, const std::string& p, const RampConfig& a, const RampConfig& b) {
  SPOOLSTEP_SAME(name); SPOOLSTEP_SAME(profile); SPOOLSTEP_SAME(extend_accel_us); SPOOLSTEP_SAME(extend_decel_us);
  SPOOLSTEP_SAME(retract_accel_us); SPOOLSTEP_SAME(retract_decel_us); SPOOLSTEP_SAME(jerk_us);
}
inline void compare(ConfigDiff& d, const std::string& p, const FunctionConfig& a, const FunctionConfig& b) {
  SPOOLSTEP_SAME(name); SPOOLSTEP_SAME(valve); SPOOLSTEP_SAME(centre); SPOOLSTEP_SAME(coil_extend);
  SPOOLSTEP_SAME(coil_retract); SPOOLSTEP_SAME(prop_extend); SPOOLSTEP_SAME(prop_retract); SPOOLSTEP_SAME(enable_coil);
  SPOOLSTEP_SAME(current_extend.crack_ma); SPOOLSTEP_SAME(current_extend.max_ma);
  SPOOLSTEP_SAME(current_retract.crack_ma); SPOOLSTEP_SAME(current_retract.max_ma);
  SPOOLSTEP_SAME(deadband_jump_percent); SPOOLSTEP_SAME(dither_amplitude_ma); SPOOLSTEP_SAME(dither_frequency_hz);
  SPOOLSTEP_SAME(extended_end_input); SPOOLSTEP_SAME(retracted_end_input); SPOOLSTEP_SAME(position_input);
  SPOOLSTEP_SAME(extend_limit); SPOOLSTEP_SAME(retract_limit); SPOOLSTEP_SAME(reversal_dwell_us);
  SPOOLSTEP_SAME(detent_pulse_us); SPOOLSTEP_SAME(quick_stop_us); SPOOLSTEP_SAME(jog_speed_percent);
  SPOOLSTEP_SAME(jog_extend); SPOOLSTEP_SAME(jog_retract); SPOOLSTEP_SAME(ramp_count);
  for (std::size_t i = 0; i < kMaxRampsPerFunction; ++i)
    compare(d, p + ".ramps[" + std::to_string(i) + "]", a.ramps[i], b.ramps[i]);
}
inline void compare(ConfigDiff& d, const std::string& p, const ConditionNode& a, const ConditionNode& b) {
  SPOOLSTEP_SAME(op); SPOOLSTEP_SAME(a); SPOOLSTEP_SAME(b); SPOOLSTEP_SAME(threshold); SPOOLSTEP_SAME(hysteresis);
  SPOOLSTEP_SAME(time_us); SPOOLSTEP_SAME(label);
}
inline void compare(ConfigDiff& d, const std::string& p, const InterlockConfig& a, const InterlockConfig& b) {
  SPOOLSTEP_SAME(name); SPOOLSTEP_SAME(kind); SPOOLSTEP_SAME(stop_category); SPOOLSTEP_SAME(condition);
  SPOOLSTEP_SAME(guards);
}
inline void compare(ConfigDiff& d, const std::string& p, const TwoHandConfig& a, const TwoHandConfig& b) {
  SPOOLSTEP_SAME(name); SPOOLSTEP_SAME(left_input); SPOOLSTEP_SAME(right_input); SPOOLSTEP_SAME(max_sync_us);
  SPOOLSTEP_SAME(release_holds);
}
inline void compare(ConfigDiff& d, const std::string& p, const AnalogInputConfig& a, const AnalogInputConfig& b) {
  SPOOLSTEP_SAME(name); SPOOLSTEP_SAME(unit); SPOOLSTEP_SAME(signal); SPOOLSTEP_SAME(range_min);
  SPOOLSTEP_SAME(range_max); SPOOLSTEP_SAME(max_age_us);
}
inline void compare(ConfigDiff& d, const std::string& p, const PropOutputConfig& a, const PropOutputConfig& b) {
  SPOOLSTEP_SAME(name); SPOOLSTEP_SAME(unit);
}
inline void compare(ConfigDiff& d, const std::string& p, const StepConfig& a, const StepConfig& b) {
  SPOOLSTEP_SAME(name); SPOOLSTEP_SAME(action_count); SPOOLSTEP_SAME(min_time_us); SPOOLSTEP_SAME(supervision_us);
  for (std::size_t i = 0; i < kMaxActionsPerStep; ++i) {
    const std::string q = p + ".actions[" + std::to_string(i) + "]";
    d.same(q + ".function", a.actions[i].function, b.actions[i].function);
    d.same(q + ".direction", a.actions[i].direction, b.actions[i].direction);
    d.same(q + ".speed_percent", a.actions[i].speed_percent, b.actions[i].speed_percent);
    d.same(q + ".ramp", a.actions[i].ramp, b.actions[i].ramp);
  }
}
inline void compare(ConfigDiff& d, const std::string& p, const TransitionConfig& a, const TransitionConfig& b) {
  SPOOLSTEP_SAME(from_step); SPOOLSTEP_SAME(to_step); SPOOLSTEP_SAME(condition);
}
inline void compare(ConfigDiff& d, const std::string& p, const Name& a, const Name& b) { d.same(p, a, b); }
inline void compare(ConfigDiff& d, const std::string& p, const std::uint16_t& a, const std::uint16_t& b) {
  d.same(p, a, b);
}

template <typename T, std::size_t N>
void compare_table(ConfigDiff& d, const std::string& p, const std::array<T, N>& a, const std::array<T, N>& b) {
  for (std::size_t i = 0; i < N; ++i) compare(d, p + "[" + std::to_string(i) + "]", a[i], b[i]);
}

/// Every field of every row (used or not) that differs, as "path: a vs b".
inline std::vector<std::string> config_differences(const MachineConfig& a, const MachineConfig& b) {
  ConfigDiff d;
  const std::string p = "config";
  SPOOLSTEP_SAME(name);
  SPOOLSTEP_SAME(safety.scan_period_us); SPOOLSTEP_SAME(safety.watchdog_us); SPOOLSTEP_SAME(safety.max_digital_age_us);
  SPOOLSTEP_SAME(safety.input_fault_category); SPOOLSTEP_SAME(safety.supervision_category);
  compare_table(d, p + ".digital_inputs", a.digital_inputs, b.digital_inputs);
  SPOOLSTEP_SAME(digital_input_count);
  compare_table(d, p + ".analog_inputs", a.analog_inputs, b.analog_inputs);
  SPOOLSTEP_SAME(analog_input_count);
  compare_table(d, p + ".coils", a.coils, b.coils);
  SPOOLSTEP_SAME(coil_count);
  compare_table(d, p + ".prop_outputs", a.prop_outputs, b.prop_outputs);
  SPOOLSTEP_SAME(prop_output_count);
  compare_table(d, p + ".functions", a.functions, b.functions);
  SPOOLSTEP_SAME(function_count);
  SPOOLSTEP_SAME(power_unit.present); SPOOLSTEP_SAME(power_unit.motor_coil); SPOOLSTEP_SAME(power_unit.dump_coil);
  SPOOLSTEP_SAME(power_unit.unloaded_start_us); SPOOLSTEP_SAME(power_unit.pressure_ready);
  SPOOLSTEP_SAME(power_unit.pressure_ready_timeout_us); SPOOLSTEP_SAME(power_unit.start);
  SPOOLSTEP_SAME(power_unit.stop);
  SPOOLSTEP_SAME(operator_panel.estop_input); SPOOLSTEP_SAME(operator_panel.estop_category);
  SPOOLSTEP_SAME(operator_panel.reset); SPOOLSTEP_SAME(operator_panel.cycle_start);
  SPOOLSTEP_SAME(operator_panel.cycle_stop); SPOOLSTEP_SAME(operator_panel.auto_mode);
  SPOOLSTEP_SAME(operator_panel.stop);
  SPOOLSTEP_SAME(operator_panel.soft_commands);
  SPOOLSTEP_SAME(operator_panel.continuous);
  compare_table(d, p + ".two_hand", a.two_hand, b.two_hand);
  SPOOLSTEP_SAME(two_hand_count);
  compare_table(d, p + ".nodes", a.nodes, b.nodes);
  SPOOLSTEP_SAME(node_count);
  compare_table(d, p + ".child_slots", a.child_slots, b.child_slots);
  SPOOLSTEP_SAME(child_slot_count);
  compare_table(d, p + ".interlocks", a.interlocks, b.interlocks);
  SPOOLSTEP_SAME(interlock_count);
  compare_table(d, p + ".steps", a.steps, b.steps);
  SPOOLSTEP_SAME(step_count);
  compare_table(d, p + ".transitions", a.transitions, b.transitions);
  SPOOLSTEP_SAME(transition_count);
  return d.differences;
}

#undef SPOOLSTEP_SAME

}  // namespace spoolstep::firmware::testing
