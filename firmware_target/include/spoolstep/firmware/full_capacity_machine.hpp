#pragma once
/// An invented machine that fills every table of the core to its compile-time
/// capacity (capacity.hpp): 64 digital and 16 analog inputs, 32 coils, 8
/// proportional channels, 8 functions with 4 ramps each, 192 condition nodes
/// using 256 child slots, 32 interlocks, 2 two-hand devices, 32 steps with 4
/// actions each and 48 transitions. It exists to measure the worst-case cost
/// of one scan; it models no real machine. With the inputs from
/// `full_capacity_inputs` its chain cycles continuously through all steps.
/// No heap: it fills a caller-provided configuration (in .bss on the target).
#include <cstdint>

#include "spoolstep/core/config.hpp"
#include "spoolstep/core/io_image.hpp"

namespace spoolstep::firmware {

namespace full_capacity_detail {

inline core::Name numbered(char a, char b, std::uint32_t n) {
  core::Name name;
  name.text[0] = a;
  name.text[1] = b;
  name.text[2] = static_cast<char>('0' + (n / 100) % 10);
  name.text[3] = static_cast<char>('0' + (n / 10) % 10);
  name.text[4] = static_cast<char>('0' + n % 10);
  return name;
}

}  // namespace full_capacity_detail

// Digital inputs with a fixed role; all others are spare.
inline constexpr std::uint8_t kFullEstopOk = 0;
inline constexpr std::uint8_t kFullReset = 1;
inline constexpr std::uint8_t kFullAuto = 2;
inline constexpr std::uint8_t kFullStart = 3;
inline constexpr std::uint8_t kFullPumpStart = 4;

/// Fills `c` (which should be value-initialised) with the full-capacity machine.
inline void build_full_capacity_machine(core::MachineConfig& c) {
  using namespace core;
  using full_capacity_detail::numbered;
  c = MachineConfig{};
  c.name = numbered('f', 'c', 0);
  c.safety.scan_period_us = 1000;
  c.safety.watchdog_us = 20000;
  c.safety.max_digital_age_us = 50000;
  c.safety.input_fault_category = StopCategory::kCat0;
  c.safety.supervision_category = StopCategory::kCat1;

  for (std::uint32_t i = 0; i < kMaxDigitalInputs; ++i) c.digital_inputs[i] = numbered('d', 'i', i);
  c.digital_input_count = static_cast<std::uint8_t>(kMaxDigitalInputs);
  for (std::uint32_t i = 0; i < kMaxAnalogInputs; ++i) {
    AnalogInputConfig& a = c.analog_inputs[i];
    a.name = numbered('a', 'i', i);
    a.unit = numbered('u', 'n', i);
    a.signal = AnalogSignal::kCurrent4To20;
    a.range_min = 0.0f;
    a.range_max = 500.0f;
    a.max_age_us = 50000;
  }
  c.analog_input_count = static_cast<std::uint8_t>(kMaxAnalogInputs);
  for (std::uint32_t i = 0; i < kMaxCoils; ++i) c.coils[i] = numbered('c', 'o', i);
  c.coil_count = static_cast<std::uint8_t>(kMaxCoils);
  for (std::uint32_t i = 0; i < kMaxPropOutputs; ++i) {
    c.prop_outputs[i] = PropOutputConfig{numbered('p', 'o', i), PropUnit::kMilliamp};
  }
  c.prop_output_count = static_cast<std::uint8_t>(kMaxPropOutputs);

  // Condition nodes: one per digital input, one per analog input, then
  // composite nodes of every kind, then all/any nodes using every child slot.
  std::uint16_t n = 0;
  auto node = [&](ConditionOp op, std::uint16_t a, std::uint16_t b) {
    ConditionNode& x = c.nodes[n];
    x.op = op;
    x.a = a;
    x.b = b;
    x.label = numbered('n', 'd', n);
    return n++;
  };
  for (std::uint16_t i = 0; i < kMaxDigitalInputs; ++i) node(ConditionOp::kDigitalInput, i, 0);  // 0..63
  for (std::uint16_t i = 0; i < kMaxAnalogInputs; ++i) {                                           // 64..79
    const std::uint16_t k = node(i % 2 == 0 ? ConditionOp::kAnalogAbove : ConditionOp::kAnalogBelow, i, 0);
    c.nodes[k].threshold = 200.0f;
    c.nodes[k].hysteresis = 5.0f;
  }
  const std::uint16_t always = node(ConditionOp::kTrue, 0, 0);
  node(ConditionOp::kFalse, 0, 0);
  const std::uint16_t auto_mode = node(ConditionOp::kModeIs, 0, 1);
  const std::uint16_t pump_ready = node(ConditionOp::kPowerUnitReady, 0, 0);
  for (std::uint16_t f = 0; f < kMaxFunctions; ++f) node(ConditionOp::kFunctionState, f, f % 5);
  for (std::uint16_t t = 0; t < kMaxTwoHandDevices; ++t) node(ConditionOp::kTwoHandHeld, t, 0);
  // Timers and negations over the spare digital inputs (false in the run).
  std::uint16_t timed = 0;
  for (std::uint16_t i = 0; i < 8; ++i) {
    const std::uint16_t k = node(static_cast<ConditionOp>(static_cast<std::uint8_t>(ConditionOp::kOnDelay) + i % 3),
                                 static_cast<std::uint16_t>(16 + i), 0);
    c.nodes[k].time_us = 50000;
    timed = k;
  }
  const std::uint16_t no_spare_fault = node(ConditionOp::kNot, timed, 0);
  // Step-active nodes fill up to the all/any block.
  constexpr std::uint16_t kGroups = 32;
  constexpr std::uint16_t kChildrenPerGroup = kMaxConditionChildren / kGroups;  // 8
  std::uint16_t step_node[kMaxSteps] = {};
  for (std::uint16_t s = 0; s < kMaxSteps && n < kMaxConditionNodes - kGroups - 1; ++s) {
    step_node[s] = node(ConditionOp::kStepActive, s, 0);
  }
  while (n < kMaxConditionNodes - kGroups - 1) node(ConditionOp::kNodeRef, always, 0);
  // 32 all/any groups of 8 children each: every child slot used.
  std::uint16_t slot = 0;
  std::uint16_t healthy_group = kNoCondition;
  for (std::uint16_t g = 0; g < kGroups; ++g) {
    const bool any = g % 2 == 1;
    const std::uint16_t first = slot;
    for (std::uint16_t k = 0; k < kChildrenPerGroup; ++k) {
      // all-groups read nodes that are true in the run; any-groups mix.
      c.child_slots[slot++] = any ? static_cast<std::uint16_t>((g * 7u + k * 13u) % (n - 1)) : always;
    }
    const std::uint16_t k = node(any ? ConditionOp::kAny : ConditionOp::kAll, first, kChildrenPerGroup);
    if (!any) healthy_group = k;
  }
  c.child_slot_count = slot;
  const std::uint16_t healthy = node(ConditionOp::kAll, 0, 0);  // empty all: true
  (void)healthy;
  c.node_count = n;

  // Functions 0..3: two-solenoid proportional on channels 2f, 2f+1 with
  // enables on coils 8..11; functions 4..7: 4/3 solenoid on coils 0..7.
  for (std::uint8_t f = 0; f < kMaxFunctions; ++f) {
    FunctionConfig& fn = c.functions[f];
    fn.name = numbered('f', 'n', f);
    fn.reversal_dwell_us = 20000;
    fn.jog_extend = static_cast<std::uint16_t>(32 + f);
    fn.jog_retract = static_cast<std::uint16_t>(40 + f);
    fn.extended_end_input = static_cast<std::uint8_t>(48 + f);
    fn.retracted_end_input = static_cast<std::uint8_t>(56 + f);
    fn.jog_speed_percent = 20.0f;
    if (f < 4) {
      fn.valve = ValveKind::kProportional43TwoSolenoid;
      fn.centre = ValveCentre::kClosed;
      fn.prop_extend = static_cast<std::uint8_t>(2 * f);
      fn.prop_retract = static_cast<std::uint8_t>(2 * f + 1);
      fn.enable_coil = static_cast<std::uint8_t>(8 + f);
      fn.current_extend = SolenoidCurrent{300.0f, 800.0f};
      fn.current_retract = SolenoidCurrent{300.0f, 800.0f};
      fn.dither_amplitude_ma = 40.0f;
      fn.dither_frequency_hz = 120.0f;
      fn.position_input = f;
      fn.extend_limit = 480.0f;
      fn.retract_limit = 2.0f;
      fn.quick_stop_us = 80000;
      for (std::uint8_t r = 0; r < kMaxRampsPerFunction; ++r) {
        RampConfig& ramp = fn.ramps[r];
        ramp.name = numbered('r', 'p', r);
        ramp.profile = r % 2 == 0 ? RampProfile::kLinear : RampProfile::kSCurve;
        ramp.extend_accel_us = 100000u + 50000u * r;
        ramp.extend_decel_us = 80000u + 40000u * r;
        ramp.retract_accel_us = 120000u + 50000u * r;
        ramp.retract_decel_us = 90000u + 40000u * r;
        ramp.jerk_us = 30000;
      }
      fn.ramp_count = static_cast<std::uint8_t>(kMaxRampsPerFunction);
    } else {
      fn.valve = ValveKind::kSolenoid43SpringCentred;
      fn.centre = ValveCentre::kTandem;
      fn.coil_extend = static_cast<std::uint8_t>(2 * (f - 4));
      fn.coil_retract = static_cast<std::uint8_t>(2 * (f - 4) + 1);
    }
  }
  c.function_count = static_cast<std::uint8_t>(kMaxFunctions);

  c.power_unit.present = true;
  c.power_unit.motor_coil = 12;
  c.power_unit.dump_coil = 13;
  c.power_unit.unloaded_start_us = 100000;
  c.power_unit.pressure_ready = always;
  c.power_unit.pressure_ready_timeout_us = 2000000;
  c.power_unit.start = kFullPumpStart;  // node index = digital input index for 0..63
  c.power_unit.stop = static_cast<std::uint16_t>(5);

  c.operator_panel.estop_input = kFullEstopOk;
  c.operator_panel.estop_category = StopCategory::kCat0;
  c.operator_panel.reset = kFullReset;
  c.operator_panel.auto_mode = kFullAuto;
  c.operator_panel.cycle_start = kFullStart;
  c.operator_panel.cycle_stop = 6;
  c.operator_panel.continuous = always;

  for (std::uint8_t t = 0; t < kMaxTwoHandDevices; ++t) {
    c.two_hand[t] = TwoHandConfig{numbered('t', 'h', t), static_cast<std::uint8_t>(60 + 2 * t),
                                  static_cast<std::uint8_t>(61 + 2 * t), 500000};
  }
  c.two_hand_count = static_cast<std::uint8_t>(kMaxTwoHandDevices);

  const std::uint32_t all_motions = (std::uint32_t{1} << (kMaxFunctions * 2)) - 1u;
  for (std::uint8_t i = 0; i < kMaxInterlocks; ++i) {
    InterlockConfig& il = c.interlocks[i];
    il.name = numbered('i', 'l', i);
    il.kind = i % 4 == 3 ? InterlockKind::kTrip : InterlockKind::kPermissive;
    il.stop_category = i % 2 == 0 ? StopCategory::kCat1 : StopCategory::kCat0;
    il.condition = i % 3 == 0 ? healthy_group : (i % 3 == 1 ? no_spare_fault : pump_ready);
    if (il.kind == InterlockKind::kTrip) il.condition = always;
    il.guards = i == 0 ? (all_motions | kPowerUnitGuardBit) : ((0x3u << (2 * (i % kMaxFunctions))) & all_motions);
  }
  c.interlock_count = static_cast<std::uint8_t>(kMaxInterlocks);

  // 32 steps, each driving 4 functions; every step alternates direction so
  // ramps reverse through centre and the reversal dwell runs.
  for (std::uint8_t s = 0; s < kMaxSteps; ++s) {
    StepConfig& st = c.steps[s];
    st.name = numbered('s', 't', s);
    st.min_time_us = s == 0 ? 0u : 40000u;
    st.supervision_us = 10000000u;
    for (std::uint8_t k = 0; k < kMaxActionsPerStep; ++k) {
      StepAction& a = st.actions[k];
      a.function = static_cast<std::uint8_t>((s + 2u * k) % kMaxFunctions);
      a.direction = (s + k) % 2 == 0 ? Direction::kExtend : Direction::kRetract;
      a.speed_percent = 50.0f + 10.0f * static_cast<float>(k);
      a.ramp = static_cast<std::uint8_t>((s + k) % kMaxRampsPerFunction);
    }
    st.action_count = static_cast<std::uint8_t>(kMaxActionsPerStep);
  }
  c.step_count = static_cast<std::uint8_t>(kMaxSteps);
  // Per step one transition that never fires (a spare input, checked first)
  // for the first 16 steps, then the one that advances.
  std::uint8_t t = 0;
  for (std::uint8_t s = 0; s < kMaxSteps; ++s) {
    if (s < kMaxTransitions - kMaxSteps) {
      c.transitions[t++] = TransitionConfig{s, static_cast<std::uint8_t>((s + 5) % kMaxSteps),
                                            static_cast<std::uint16_t>(16 + s % 16)};
    }
    const std::uint16_t condition = s == 0 ? always : (step_node[s] != 0 ? step_node[s] : always);
    c.transitions[t++] = TransitionConfig{s, static_cast<std::uint8_t>((s + 1) % kMaxSteps), condition};
  }
  c.transition_count = t;
  (void)auto_mode;
}

/// Inputs for scan number `scan` of the cost run: e-stop healthy, every
/// analog channel healthy at mid-range, and one after another a reset, the
/// automatic selector, a pump start and a cycle start.
inline void full_capacity_inputs(std::uint32_t scan, core::InputImage& in) {
  in = core::InputImage{};
  in.digital[kFullEstopOk] = true;
  in.digital[kFullReset] = scan >= 5 && scan < 10;
  in.digital[kFullAuto] = scan >= 20;
  in.digital[kFullPumpStart] = scan >= 30 && scan < 35;
  in.digital[kFullStart] = scan >= 200 && scan < 205;
  for (std::size_t i = 0; i < core::kMaxAnalogInputs; ++i) {
    in.analog[i].value = 12.0f;  // mid-range: 250 of 500
    in.analog[i].healthy = true;
  }
}

}  // namespace spoolstep::firmware
