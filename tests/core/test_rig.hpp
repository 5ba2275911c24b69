#pragma once
// A small machine built in C++ (no loader), and a rig that scans it at a
// fixed period. Invented for the tests: a clamp on a 4/3 solenoid valve, a
// press on a two-solenoid proportional valve, a guard, an e-stop, two-hand.
#include <cstring>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "spoolstep/core/controller.hpp"
#include "spoolstep/core/soft_command.hpp"

namespace spoolstep::core::testing {

inline Name name(const char* text) {
  Name n;
  std::strncpy(n.text.data(), text, kMaxNameLength);
  return n;
}

// Digital inputs of the test machine.
enum Di : std::uint8_t {
  kEstopOk = 0, kReset, kAutoSel, kStart, kGuardClosed, kPressUp, kPressDown, kThLeft, kThRight,
  kClampClosed, kJogClampExt, kJogClampRet, kOilLevelOk, kDiCount
};
enum Ai : std::uint8_t { kPressPressure = 0, kPressPosition, kAiCount };
enum Coil : std::uint8_t { kClampY1 = 0, kClampY2, kPumpMotor, kDump, kPressEnable, kCoilCount };
enum Prop : std::uint8_t { kPressYa = 0, kPressYb, kPropCount };
enum Fn : std::uint8_t { kClamp = 0, kPress = 1 };
enum Il : std::uint8_t { kGuardPermissive = 0, kOilTrip = 1 };
enum Step : std::uint8_t { kWait = 0, kClampStep, kPressStep, kDwell, kRetract, kUnclamp };

class ConfigBuilder {
 public:
  MachineConfig c{};

  std::uint16_t add(ConditionNode n, const char* label) {
    n.label = name(label);
    c.nodes[c.node_count] = n;
    return c.node_count++;
  }
  std::uint16_t input(std::uint8_t di, const char* label) {
    ConditionNode n;
    n.op = ConditionOp::kDigitalInput;
    n.a = di;
    return add(n, label);
  }
  std::uint16_t op(ConditionOp o, std::uint16_t a, std::uint16_t b, const char* label) {
    ConditionNode n;
    n.op = o;
    n.a = a;
    n.b = b;
    return add(n, label);
  }
  std::uint16_t all(std::vector<std::uint16_t> children, const char* label) {
    ConditionNode n;
    n.op = ConditionOp::kAll;
    n.a = c.child_slot_count;
    n.b = static_cast<std::uint16_t>(children.size());
    for (auto child : children) c.child_slots[c.child_slot_count++] = child;
    return add(n, label);
  }
  std::uint16_t analog_above(std::uint8_t ai, float threshold, float hysteresis, const char* label) {
    ConditionNode n;
    n.op = ConditionOp::kAnalogAbove;
    n.a = ai;
    n.threshold = threshold;
    n.hysteresis = hysteresis;
    return add(n, label);
  }
};

// The test machine. `with_power_unit` adds a pump with an unloaded start.
inline MachineConfig make_test_machine(bool with_power_unit = false) {
  ConfigBuilder b;
  MachineConfig& c = b.c;
  c.name = name("test_rig");
  c.safety.scan_period_us = 1000;
  c.safety.watchdog_us = 20000;
  c.safety.max_digital_age_us = 50000;
  c.safety.input_fault_category = StopCategory::kCat0;
  c.safety.supervision_category = StopCategory::kCat1;
  const char* di_names[] = {"estop_ok", "reset_pb", "auto_sel", "start_pb", "guard_closed",
                            "press_up", "press_down", "th_left", "th_right", "clamp_closed",
                            "jog_clamp_ext", "jog_clamp_ret", "oil_level_ok"};
  for (const char* n : di_names) c.digital_inputs[c.digital_input_count++] = name(n);
  c.analog_inputs[0] = AnalogInputConfig{name("press_pressure"), name("bar"),
                                         AnalogSignal::kCurrent4To20, 0.0f, 250.0f, 50000};
  c.analog_inputs[1] = AnalogInputConfig{name("press_position"), name("mm"),
                                         AnalogSignal::kCurrent4To20, 0.0f, 500.0f, 50000};
  c.analog_input_count = 2;
  const char* coil_names[] = {"clamp_y1", "clamp_y2", "pump_motor", "dump_valve", "press_enable"};
  for (const char* n : coil_names) c.coils[c.coil_count++] = name(n);
  c.prop_outputs[0] = PropOutputConfig{name("press_ya"), PropUnit::kMilliamp};
  c.prop_outputs[1] = PropOutputConfig{name("press_yb"), PropUnit::kMilliamp};
  c.prop_output_count = 2;

  // Conditions (children before parents).
  const auto reset = b.input(kReset, "reset_pb");
  const auto auto_sel = b.input(kAutoSel, "auto_sel");
  const auto start = b.input(kStart, "start_pb");
  const auto guard = b.input(kGuardClosed, "guard_closed");
  const auto press_up = b.input(kPressUp, "press_up");
  const auto press_down = b.input(kPressDown, "press_down");
  const auto clamp_closed = b.input(kClampClosed, "clamp_closed");
  const auto clamp_open = b.op(ConditionOp::kNot, clamp_closed, 0, "not clamp_closed");
  const auto jog_ext = b.input(kJogClampExt, "jog_clamp_ext");
  const auto jog_ret = b.input(kJogClampRet, "jog_clamp_ret");
  const auto oil_ok = b.input(kOilLevelOk, "oil_level_ok");
  const auto always = b.op(ConditionOp::kTrue, 0, 0, "true");
  const auto pressure_ok = b.analog_above(kPressPressure, 100.0f, 5.0f, "press_pressure > 100");
  const auto two_hand = b.op(ConditionOp::kTwoHandHeld, 0, 0, "two_hand");
  const auto start_ok = b.all({press_up, clamp_open}, "start conditions");
  const auto press_at_force = b.all({press_down, pressure_ok}, "press at force");

  c.operator_panel.estop_input = kEstopOk;
  c.operator_panel.estop_category = StopCategory::kCat0;
  c.operator_panel.reset = reset;
  c.operator_panel.auto_mode = auto_sel;
  c.operator_panel.cycle_start = start;
  // The soft commands the tests give; reset, cycle start and select_auto
  // come from the panel's inputs.
  for (SoftCommand command : {SoftCommand::kCycleStop, SoftCommand::kContinuous, SoftCommand::kPumpStart,
                              SoftCommand::kPumpStop, SoftCommand::kStop, SoftCommand::kJog}) {
    c.operator_panel.soft_commands = static_cast<std::uint16_t>(c.operator_panel.soft_commands | soft_command_bit(command));
  }

  c.two_hand[0] = TwoHandConfig{name("main"), kThLeft, kThRight, 500000};
  c.two_hand_count = 1;
  (void)two_hand;

  FunctionConfig& clamp = c.functions[kClamp];
  clamp.name = name("clamp");
  clamp.valve = ValveKind::kSolenoid43SpringCentred;
  clamp.centre = ValveCentre::kTandem;
  clamp.coil_extend = kClampY1;
  clamp.coil_retract = kClampY2;
  clamp.reversal_dwell_us = 50000;
  clamp.jog_extend = jog_ext;
  clamp.jog_retract = jog_ret;

  FunctionConfig& press = c.functions[kPress];
  press.name = name("press");
  press.valve = ValveKind::kProportional43TwoSolenoid;
  press.centre = ValveCentre::kClosed;
  press.prop_extend = kPressYa;
  press.prop_retract = kPressYb;
  press.enable_coil = kPressEnable;
  press.current_extend = SolenoidCurrent{300.0f, 800.0f};
  press.current_retract = SolenoidCurrent{320.0f, 820.0f};
  press.dither_amplitude_ma = 40.0f;
  press.dither_frequency_hz = 120.0f;
  press.extended_end_input = kPressDown;
  press.retracted_end_input = kPressUp;
  press.reversal_dwell_us = 20000;
  press.quick_stop_us = 50000;
  press.jog_speed_percent = 20.0f;
  press.ramps[0] = RampConfig{name("normal"), RampProfile::kLinear, 200000, 100000, 300000, 150000, 0};
  press.ramps[1] = RampConfig{name("soft"), RampProfile::kSCurve, 400000, 400000, 400000, 400000, 100000};
  press.ramp_count = 2;
  c.function_count = 2;

  c.interlocks[kGuardPermissive] = InterlockConfig{name("guard_closed"), InterlockKind::kPermissive,
                                                   StopCategory::kCat1, guard,
                                                   motion_bit(kPress, Direction::kExtend) |
                                                       motion_bit(kPress, Direction::kRetract) |
                                                       motion_bit(kClamp, Direction::kExtend)};
  c.interlocks[kOilTrip] = InterlockConfig{name("oil_level"), InterlockKind::kTrip,
                                           StopCategory::kCat0, oil_ok, kPowerUnitGuardBit};
  c.interlock_count = 2;

  auto step = [&](const char* n, std::vector<StepAction> actions, std::uint32_t min_us,
                  std::uint32_t supervision_us) {
    StepConfig& s = c.steps[c.step_count++];
    s.name = name(n);
    for (const auto& a : actions) s.actions[s.action_count++] = a;
    s.min_time_us = min_us;
    s.supervision_us = supervision_us;
  };
  const StepAction clamp_hold{kClamp, Direction::kExtend, 100.0f, 0};
  step("wait_start", {}, 0, 0);
  step("clamp", {clamp_hold}, 0, 2000000);
  step("press_down", {clamp_hold, StepAction{kPress, Direction::kExtend, 80.0f, 0}}, 0, 5000000);
  step("dwell", {clamp_hold}, 500000, 0);
  step("retract", {clamp_hold, StepAction{kPress, Direction::kRetract, 100.0f, 0}}, 0, 5000000);
  step("unclamp", {StepAction{kClamp, Direction::kRetract, 100.0f, 0}}, 0, 2000000);
  auto transition = [&](std::uint8_t from, std::uint8_t to, std::uint16_t cond) {
    c.transitions[c.transition_count++] = TransitionConfig{from, to, cond};
  };
  transition(kWait, kClampStep, start_ok);
  transition(kClampStep, kPressStep, clamp_closed);
  transition(kPressStep, kDwell, press_at_force);
  transition(kDwell, kRetract, always);
  transition(kRetract, kUnclamp, press_up);
  transition(kUnclamp, kWait, clamp_open);

  if (with_power_unit) {
    const auto ready = b.analog_above(kPressPressure, 20.0f, 2.0f, "pump pressure > 20");
    c.power_unit.present = true;
    c.power_unit.motor_coil = kPumpMotor;
    c.power_unit.dump_coil = kDump;
    c.power_unit.unloaded_start_us = 1000000;
    c.power_unit.pressure_ready = ready;
    c.power_unit.pressure_ready_timeout_us = 3000000;
  }
  return c;
}

// Scans a controller at a fixed period and keeps the inputs between calls.
// A configuration the core rejects fails the test here: a controller that
// sits in kConfigInvalid from its first scan asserts nothing of what a test
// names (two hardening tests once passed that way).
class Rig {
 public:
  enum class Expect { kValid, kInvalid };  // kInvalid: a test of the rejected-configuration path
  explicit Rig(const MachineConfig& config, std::uint32_t start_us = 0, Expect expect = Expect::kValid)
      : config_(config), now_(start_us) {
    const Status status = controller.init(config_);
    init_status_ok = status.is_ok();
    if (expect == Expect::kValid) {
      EXPECT_TRUE(init_status_ok) << "the test's configuration fails validate_config: "
                                  << to_string(status.code()) << " in " << status.where() << " row "
                                  << status.index();
    } else {
      EXPECT_FALSE(init_status_ok) << "the test's configuration was meant to be rejected";
    }
    in.digital[kEstopOk] = true;
    in.digital[kGuardClosed] = true;
    in.digital[kPressUp] = true;
    in.digital[kOilLevelOk] = true;
    set_ma(kPressPressure, 4.0f);
    set_ma(kPressPosition, 4.0f);
  }
  void set_ma(std::uint8_t ai, float ma) {
    in.analog[ai].value = ma;
    in.analog[ai].healthy = true;
    in.analog[ai].age_us = 0;
  }
  // One scan after `period_us`.
  const OutputImage& scan(std::uint32_t period_us = 1000) {
    now_ += period_us;
    controller.scan(in, now_, out);
    return out;
  }
  // Scans for `ms` milliseconds; calls `each` after every scan if given.
  template <typename F>
  void run_ms(std::uint32_t ms, F each) {
    for (std::uint32_t i = 0; i < ms; ++i) {
      scan();
      each();
    }
  }
  void run_ms(std::uint32_t ms) { run_ms(ms, [] {}); }
  // Presses a button for one scan and releases it on the next.
  void press(std::uint8_t di) {
    in.digital[di] = true;
    scan();
    in.digital[di] = false;
    scan();
  }
  // Power-up, reset, optionally select automatic.
  void arm(bool automatic) {
    scan();
    press(kReset);
    if (automatic) in.digital[kAutoSel] = true;
    scan();
  }
  // Presses the soft pump start for one scan (the pump then runs unloaded).
  void start_pump() {
    in.commands.pump_start = true;
    scan();
    in.commands.pump_start = false;
  }
  // Cycle start in automatic, then the clamp closes: the chain is in the
  // press_down step after this.
  void start_cycle_to_press_step() {
    press(kStart);
    in.digital[kClampClosed] = true;
    run_ms(5);
  }
  // From the press_down step: the ram reaches the bottom with 120 bar, dwells,
  // returns to the top and the clamp opens; then `final_ms` more scans.
  void finish_cycle_from_press_step(std::uint32_t final_ms) {
    in.digital[kPressUp] = false;
    in.digital[kPressDown] = true;
    set_ma(kPressPressure, 4.0f + 16.0f * 120.0f / 250.0f);
    run_ms(600);
    in.digital[kPressDown] = false;
    in.digital[kPressUp] = true;
    run_ms(100);
    in.digital[kClampClosed] = false;
    run_ms(final_ms);
  }
  const Diagnostics& diag() const { return controller.diagnostics(); }
  std::uint32_t now() const { return now_; }
  // The configuration the controller is bound to, for tests that corrupt a
  // validated configuration in memory (a bit flip after init).
  MachineConfig& bound_config() { return config_; }

  Controller controller;
  InputImage in{};
  OutputImage out{};
  bool init_status_ok = false;

 private:
  MachineConfig config_;
  std::uint32_t now_;
};

inline bool has_fault(const Diagnostics& d, FaultCode code) {
  for (std::uint8_t i = 0; i < d.fault_count; ++i) {
    if (d.faults[i].code == code) return true;
  }
  return false;
}

inline bool all_outputs_off(const OutputImage& out) {
  for (bool coil : out.coils) {
    if (coil) return false;
  }
  for (const auto& p : out.prop) {
    if (p.value != 0.0f) return false;
  }
  return true;
}

// No valve of the test machine is driven (enables and the pump may be on).
inline bool no_valve_driven(const OutputImage& out) {
  return !out.coils[kClampY1] && !out.coils[kClampY2] && out.prop[kPressYa].value == 0.0f &&
         out.prop[kPressYb].value == 0.0f;
}

}  // namespace spoolstep::core::testing
