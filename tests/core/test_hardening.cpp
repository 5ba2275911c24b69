// Safety hardening: each test pins a behaviour a machine must show in a
// corner the first version of the core got wrong (a stored cycle start, a
// frozen clock, an S-curve carrying another ramp's rate, an off-delay at
// power-up, NaN from the I/O layer, a cut detent pulse, ...).
#include <gtest/gtest.h>
#include <cmath>
#include <limits>
#include "test_rig.hpp"
#include "spoolstep/core/ramp.hpp"

namespace spoolstep::core {
namespace {
using namespace testing;

const float kMaAt120Bar = 4.0f + 16.0f * 120.0f / 250.0f;

// a cycle start given while the start conditions do not hold is stored:
// the chain waits in kAutoCycle at step 0 and moves when they come true.
TEST(Hardening, RefusedCycleStartIsNotStored) {
  Rig rig(make_test_machine());
  rig.arm(true);
  rig.in.digital[kPressUp] = false;  // start conditions not met
  rig.press(kStart);
  rig.run_ms(10000);                 // operator walks away: nothing moved
  ASSERT_FALSE(rig.out.coils[kClampY1]);
  rig.in.digital[kPressUp] = true;   // someone touches / adjusts the top switch
  rig.run_ms(5);
  EXPECT_FALSE(rig.out.coils[kClampY1]) << "clamp closes 10 s after a start that did nothing";
  EXPECT_EQ(rig.diag().state, MachineState::kAutoIdle);
}

// an off-delay node is true at power-up although its input never was.
TEST(Hardening, OffDelayIsFalseAtPowerUp) {
  MachineConfig c = make_test_machine();
  ConfigBuilder b; b.c = c;
  const auto guard = b.input(kGuardClosed, "guard");
  ConditionNode n; n.op = ConditionOp::kOffDelay; n.a = guard; n.time_us = 500000;
  const auto tolerant = b.add(n, "guard off-delay 500 ms");
  b.c.interlocks[kGuardPermissive].condition = tolerant;  // guard bounce tolerated
  Rig rig(b.c);
  ASSERT_TRUE(rig.init_status_ok);
  rig.in.digital[kGuardClosed] = false;  // guard open from power-on
  rig.scan();
  rig.press(kReset);
  rig.in.digital[kJogClampExt] = true;
  rig.scan();
  EXPECT_FALSE(rig.out.coils[kClampY1]) << "guarded jog runs with the guard open since power-on";
}

// S-curve keeps a rate from another ramp (or the linear profile) and
// overshoots past full scale.
TEST(Hardening, RampNeverExceedsFullScaleWhenTheRampChanges) {
  RampConfig lin; lin.profile = RampProfile::kLinear;
  lin.extend_accel_us = lin.extend_decel_us = lin.retract_accel_us = lin.retract_decel_us = 200000;
  RampConfig soft = lin; soft.profile = RampProfile::kSCurve;
  soft.extend_accel_us = soft.extend_decel_us = 400000; soft.jerk_us = 100000;
  RampState s;
  for (int i = 0; i < 180; ++i)
    advance_ramp(s, 1.0f, ramp_limits(lin, Direction::kExtend), ramp_limits(lin, Direction::kRetract), 0.001f);
  float peak = s.value;
  for (int i = 0; i < 1000; ++i) {
    advance_ramp(s, 0.5f, ramp_limits(soft, Direction::kExtend), ramp_limits(soft, Direction::kRetract), 0.001f);
    peak = std::max(peak, s.value);
  }
  EXPECT_LE(peak, 1.0f) << "command above 100 %";
}

TEST(Hardening, SteppedChainRampChangeDrivesCurrentAboveMax) {
  MachineConfig c = make_test_machine();
  c.steps[kDwell].actions[1] = StepAction{kPress, Direction::kExtend, 40.0f, 1};  // dwell: slow, soft
  c.steps[kDwell].action_count = 2;
  c.steps[kDwell].min_time_us = 2000000;
  c.transitions[2].condition = c.operator_panel.reset;  // leave press_down on the reset button (test hook)
  Rig rig(c);
  ASSERT_TRUE(rig.init_status_ok);
  rig.arm(true);
  rig.press(kStart);
  rig.in.digital[kClampClosed] = true;
  rig.in.digital[kPressUp] = false;
  rig.run_ms(150);                       // linear ramp 0: 0 -> 0.8 over 160 ms
  rig.in.digital[kReset] = true;          // step to dwell (ramp 1, S-curve, 40 %)
  rig.in.digital[kPressDown] = false;
  float peak = 0.0f;
  rig.run_ms(400, [&] { peak = std::max(peak, rig.out.prop[kPressYa].value); });
  EXPECT_LE(peak, 800.0f) << "current above max_ma (step " << int{rig.diag().active_step} << ", command "
                           << rig.diag().functions[kPress].command << ")";
}

// a frozen time source: releasing a proportional jog no longer stops.
TEST(Hardening, FrozenClockDoesNotKeepAProportionalValveOpen) {
  Rig rig(make_test_machine());
  rig.arm(false);
  rig.in.digital[kPressUp] = false;
  rig.in.commands.jog[kPress] = Direction::kExtend;
  rig.run_ms(300);
  ASSERT_GT(rig.out.prop[kPressYa].value, 0.0f);
  rig.in.commands.jog[kPress] = Direction::kNone;
  for (int i = 0; i < 1000; ++i) rig.scan(0);  // clock stuck
  EXPECT_EQ(rig.out.prop[kPressYa].value, 0.0f) << "hold-to-run released, valve still metering";
}

// detented valve: the coil pulse into a direction that a permissive has
// just blocked is completed.
TEST(Hardening, DetentedPulseIsCutWhenItsMotionIsBlocked) {
  MachineConfig c = make_test_machine();
  c.functions[kClamp].valve = ValveKind::kSolenoid42Detented;
  c.functions[kClamp].detent_pulse_us = 100000;
  Rig rig(c);
  rig.arm(false);
  rig.in.digital[kJogClampExt] = true;
  rig.run_ms(10);
  rig.in.digital[kGuardClosed] = false;  // guard opens mid-pulse
  rig.scan();
  EXPECT_FALSE(rig.out.coils[kClampY1]);
  rig.run_ms(100);
  EXPECT_NE(rig.diag().functions[kClamp].detent_side, Direction::kExtend)
      << "spool shifted into the guarded direction after the guard opened";
}

// detented valve: an e-stop mid-pulse leaves detent_side stale, so the
// next command to the remembered side is not pulsed.
TEST(Hardening, DetentedSideUnknownAfterInterruptedPulse) {
  MachineConfig c = make_test_machine();
  c.functions[kClamp].valve = ValveKind::kSolenoid42Detented;
  c.functions[kClamp].detent_pulse_us = 100000;
  Rig rig(c);
  rig.arm(false);
  rig.in.digital[kJogClampRet] = true;
  rig.run_ms(150);  // retract pulse done: detent_side = retract
  rig.in.digital[kJogClampRet] = false;
  rig.in.digital[kJogClampExt] = true;
  rig.run_ms(60);  // extend pulse running
  ASSERT_TRUE(rig.out.coils[kClampY1]);
  rig.in.digital[kEstopOk] = false;  // e-stop mid-pulse: spool position unknown
  rig.scan();
  rig.in.digital[kJogClampExt] = false;
  rig.in.digital[kEstopOk] = true;
  rig.run_ms(5);
  rig.press(kReset);
  rig.in.digital[kJogClampRet] = true;  // operator asks for retract
  int pulse = 0;
  rig.run_ms(200, [&] { pulse += rig.out.coils[kClampY2] ? 1 : 0; });
  EXPECT_GT(pulse, 0) << "retract never pulsed: the core believes the spool is still at retract";
}

// NaN from the I/O layer passes the input check; the position window then never stops.
TEST(Hardening, NanAnalogIsAnInputFault) {
  MachineConfig c = make_test_machine();
  c.functions[kPress].position_input = kPressPosition;
  c.functions[kPress].extend_limit = 480.0f;
  c.functions[kPress].retract_limit = 5.0f;
  Rig rig(c);
  rig.arm(false);
  rig.in.digital[kPressUp] = false;
  rig.set_ma(kPressPosition, 12.0f);
  rig.in.commands.jog[kPress] = Direction::kExtend;
  rig.run_ms(100);
  rig.set_ma(kPressPosition, std::numeric_limits<float>::quiet_NaN());
  rig.scan();
  EXPECT_TRUE(has_fault(rig.diag(), FaultCode::kAnalogInputFault));
  EXPECT_EQ(rig.out.prop[kPressYa].value, 0.0f);
}

// an out-of-range stop category passes validate_config; an e-stop with it behaves as category 2.
TEST(Hardening, ValidateRejectsUnknownStopCategories) {
  MachineConfig c = make_test_machine(true);
  c.operator_panel.estop_category = static_cast<StopCategory>(3);
  EXPECT_FALSE(validate_config(c).is_ok());
  c = make_test_machine(true);
  c.interlocks[kOilTrip].stop_category = static_cast<StopCategory>(7);
  EXPECT_FALSE(validate_config(c).is_ok());
}

// a stop category corrupted in memory after validation (a bit flip) is read
// as category 0: the e-stop still removes the pump's power.
TEST(Hardening, EstopWithCorruptCategoryStillRemovesPower) {
  Rig rig(make_test_machine(true));
  ASSERT_TRUE(rig.init_status_ok);
  rig.arm(false);
  rig.start_pump();
  rig.run_ms(1100);
  ASSERT_TRUE(rig.out.coils[kPumpMotor]);
  rig.bound_config().operator_panel.estop_category = static_cast<StopCategory>(3);
  rig.in.digital[kEstopOk] = false;
  rig.scan();
  EXPECT_EQ(rig.diag().state, MachineState::kFaulted) << "a corrupt category is not a controlled stop";
  EXPECT_FALSE(rig.out.coils[kPumpMotor]) << "pump still running after the e-stop";
}

// after the fault table overflowed once, no reset can ever clear it.
TEST(Hardening, OverflowedFaultTableCanBeResetOnceCausesAreGone) {
  MachineConfig c = make_test_machine();
  // 16 analog inputs, all of which fail at once (e.g. card supply lost), + e-stop.
  for (std::uint8_t i = 2; i < kMaxAnalogInputs; ++i)
    c.analog_inputs[i] = AnalogInputConfig{name("ai"), name("bar"), AnalogSignal::kCurrent4To20, 0.0f, 1.0f, 0};
  c.analog_input_count = kMaxAnalogInputs;
  Rig rig(c);
  ASSERT_TRUE(rig.init_status_ok);
  for (std::uint8_t i = 0; i < kMaxAnalogInputs; ++i) rig.set_ma(i, 12.0f);
  rig.arm(false);
  for (std::uint8_t i = 0; i < kMaxAnalogInputs; ++i) rig.in.analog[i].healthy = false;
  rig.in.digital[kEstopOk] = false;
  rig.run_ms(5);
  ASSERT_TRUE(rig.diag().faults_overflowed);
  for (std::uint8_t i = 0; i < kMaxAnalogInputs; ++i) rig.set_ma(i, 12.0f);
  rig.in.digital[kEstopOk] = true;
  rig.run_ms(5);
  rig.press(kReset);
  EXPECT_EQ(rig.diag().state, MachineState::kManual) << "only a power cycle recovers";
}

// one long scan: the ramp jumps (the watchdog faults the scan, and the ramp
// integrates no more than the watchdog interval on the way to the stop).
TEST(Hardening, LongScanDoesNotSkipTheRamp) {
  MachineConfig c = make_test_machine();
  Rig rig(c);
  rig.arm(false);
  rig.in.digital[kPressUp] = false;
  rig.in.commands.jog[kPress] = Direction::kExtend;
  rig.scan(1000);
  const float first = rig.out.prop[kPressYa].value;
  rig.scan(500000);  // one late scan (flash write, debugger, ISR storm)
  EXPECT_LT(rig.out.prop[kPressYa].value - first, 0.2f * 500.0f * 0.05f + 1.0f)
      << "jumped to full jog current in one scan";
  c.safety.watchdog_us = 0;  // the SafetyConfig default
  EXPECT_FALSE(validate_config(c).is_ok()) << "a configuration without a scan watchdog";
}

// a category 0 step supervision fault leaves the outputs on for one more scan.
TEST(Hardening, Category0SupervisionCutsInTheSameScan) {
  MachineConfig c = make_test_machine();
  c.safety.supervision_category = StopCategory::kCat0;
  Rig rig(c);
  rig.arm(true);
  rig.press(kStart);
  rig.in.digital[kClampClosed] = true;
  rig.run_ms(5);
  rig.in.digital[kPressUp] = false;
  ASSERT_EQ(rig.diag().active_step, kPressStep);
  for (int i = 0; i < 6000; ++i) {
    rig.scan();
    if (has_fault(rig.diag(), FaultCode::kStepSupervision)) break;
  }
  ASSERT_TRUE(has_fault(rig.diag(), FaultCode::kStepSupervision));
  EXPECT_TRUE(all_outputs_off(rig.out)) << "state " << static_cast<int>(rig.diag().state);
}

// an invalid step action direction passes validate_config and leaves the machine in kStopping forever.
TEST(Hardening, ValidateRejectsUnknownDirection) {
  MachineConfig c = make_test_machine();
  c.steps[kClampStep].actions[0].direction = static_cast<Direction>(3);
  EXPECT_FALSE(validate_config(c).is_ok());
}

// a category 1 emergency stop while the chain drives both valves must end
// in kFaulted (power removed), never stay in kStopping.
TEST(Hardening, StoppingAlwaysCompletes) {
  MachineConfig c = make_test_machine();
  c.operator_panel.estop_category = StopCategory::kCat1;
  Rig rig(c);
  ASSERT_TRUE(rig.init_status_ok);
  rig.arm(true);
  rig.start_cycle_to_press_step();
  rig.in.digital[kPressUp] = false;
  rig.run_ms(100);
  ASSERT_EQ(rig.diag().active_step, kPressStep);
  ASSERT_GT(rig.out.prop[kPressYa].value, 0.0f) << "the ram must be moving when the e-stop comes";
  ASSERT_TRUE(rig.out.coils[kClampY1]);
  rig.in.digital[kEstopOk] = false;
  rig.scan();
  EXPECT_EQ(rig.diag().state, MachineState::kStopping) << "category 1 ramps down first";
  rig.run_ms(1000);
  EXPECT_EQ(rig.diag().state, MachineState::kFaulted) << "stuck in kStopping";
  EXPECT_TRUE(all_outputs_off(rig.out));
}

// end of travel is not watched while a function ramps down.
TEST(Hardening, EndOfTravelCutsADecelerationToo) {
  MachineConfig c = make_test_machine();
  c.functions[kPress].ramps[0].extend_decel_us = 1000000;  // gentle 1 s decel
  Rig rig(c);
  rig.arm(false);
  rig.in.digital[kPressUp] = false;
  rig.in.commands.jog[kPress] = Direction::kExtend;
  rig.run_ms(300);
  rig.in.commands.jog[kPress] = Direction::kNone;  // release near the bottom
  rig.scan();
  rig.in.digital[kPressDown] = true;                // end switch made while decelerating
  rig.scan();
  EXPECT_EQ(rig.out.prop[kPressYa].value, 0.0f) << "still driving into the end stop";
}

// cycle stop requested, guard opened, cycle start to resume: continuous cycling resumes.
TEST(Hardening, EndOfCycleRequestSurvivesAHold) {
  Rig rig(make_test_machine());
  rig.arm(true);
  rig.in.commands.continuous = true;
  rig.press(kStart);
  rig.in.digital[kClampClosed] = true;
  rig.in.digital[kPressUp] = false;
  rig.run_ms(50);
  rig.in.commands.cycle_stop = true; rig.scan(); rig.in.commands.cycle_stop = false;
  ASSERT_EQ(rig.diag().state, MachineState::kAutoEndCycle);
  rig.in.digital[kGuardClosed] = false; rig.scan();
  ASSERT_EQ(rig.diag().state, MachineState::kAutoHeld);
  rig.in.digital[kGuardClosed] = true; rig.scan();
  rig.press(kStart);  // resume the interrupted cycle
  rig.in.digital[kPressDown] = true;
  rig.set_ma(kPressPressure, kMaAt120Bar);
  rig.run_ms(600);
  rig.in.digital[kPressDown] = false; rig.in.digital[kPressUp] = true; rig.set_ma(kPressPressure, 4.0f);
  rig.run_ms(100);
  rig.in.digital[kClampClosed] = false;
  rig.run_ms(20);
  EXPECT_EQ(rig.diag().state, MachineState::kAutoIdle) << "a new cycle began although end of cycle was requested";
  EXPECT_FALSE(rig.out.coils[kClampY1]);
}

// permissive opened and closed while the chain demanded no guarded motion: no hold.
TEST(Hardening, GuardOpenedDuringTheCycleNeedsANewStart) {
  MachineConfig c = make_test_machine();
  c.steps[kDwell].action_count = 0;  // dwell step without clamp hold, e.g. a clamp with its own check valve
  Rig rig(c);
  rig.arm(true);
  rig.press(kStart);
  rig.in.digital[kClampClosed] = true;
  rig.in.digital[kPressUp] = false;
  rig.run_ms(100);
  rig.in.digital[kPressDown] = true;
  rig.set_ma(kPressPressure, kMaAt120Bar);
  rig.run_ms(5);
  ASSERT_EQ(rig.diag().active_step, kDwell);
  rig.in.digital[kGuardClosed] = false;  // operator reaches in during the dwell
  rig.run_ms(100);
  rig.in.digital[kGuardClosed] = true;
  rig.run_ms(500);
  EXPECT_NE(rig.diag().state, MachineState::kAutoCycle) << "opening the guard mid-cycle did not need a new start";
  EXPECT_EQ(rig.out.prop[kPressYb].value, 0.0f);
}

// a category 0 permissive leaves the valve amplifier enabled.
TEST(Hardening, Category0PermissiveDropsTheEnable) {
  MachineConfig c = make_test_machine();
  c.interlocks[kGuardPermissive].stop_category = StopCategory::kCat0;
  Rig rig(c);
  rig.arm(false);
  rig.in.digital[kPressUp] = false;
  rig.in.commands.jog[kPress] = Direction::kExtend;
  rig.run_ms(300);
  rig.in.digital[kGuardClosed] = false;
  rig.scan();
  EXPECT_FALSE(rig.out.coils[kPressEnable]);
}

// does the S-curve always reach its target?
TEST(Hardening, SCurveAlwaysSettles) {
  int bad = 0;
  for (std::uint32_t accel : {1000u, 20000u, 400000u, 5000000u}) {
    for (std::uint32_t jerk : {1u, 100u, 10000u, 400000u, 5000000u}) {
      for (float dt : {0.0001f, 0.001f, 0.01f, 0.1f}) {
        RampConfig r; r.profile = RampProfile::kSCurve;
        r.extend_accel_us = r.extend_decel_us = r.retract_accel_us = r.retract_decel_us = accel;
        r.jerk_us = jerk;
        const RampLimits l = ramp_limits(r, Direction::kExtend);
        for (float target : {1.0f, 0.3f, 0.0f, 0.77f, 0.01f}) {
          RampState s{0.5f, 0.0f};
          int n = 0;
          const int limit = static_cast<int>((accel + jerk) * 1e-6f / dt) * 4 + 100;
          while (s.value != target && n < limit) { advance_ramp(s, target, l, l, dt); ++n; }
          EXPECT_TRUE(std::isfinite(s.value)) << "accel " << accel << " jerk " << jerk << " dt " << dt;
          if (s.value != target) {
            ++bad;
            ADD_FAILURE() << "no settle: accel " << accel << " jerk " << jerk << " dt " << dt << " target "
                          << target << " value " << s.value << " rate " << s.rate;
          }
        }
      }
    }
  }
  EXPECT_EQ(bad, 0);
}

TEST(Hardening, Category1EstopCompletesEvenIfTheClockStops) {
  MachineConfig c = make_test_machine();
  c.operator_panel.estop_category = StopCategory::kCat1;
  Rig rig(c);
  rig.arm(false);
  rig.in.digital[kPressUp] = false;
  rig.in.commands.jog[kPress] = Direction::kExtend;
  rig.run_ms(300);
  rig.in.digital[kEstopOk] = false;
  for (int i = 0; i < 100000; ++i) rig.scan(0);  // time source stuck
  EXPECT_EQ(rig.diag().state, MachineState::kFaulted) << "still kStopping";
  EXPECT_EQ(rig.out.prop[kPressYa].value, 0.0f) << "valve still open after an e-stop";
}

TEST(Hardening, TwoHandHeldThroughPowerUpIsNotACommand) {
  // ISO 13851:2019 5.7: re-initiation only after both actuators are released.
  Rig rig(make_test_machine());
  rig.in.digital[kThLeft] = true;
  rig.in.digital[kThRight] = true;  // held, or tied down, from power-on
  rig.run_ms(50);
  EXPECT_FALSE(rig.diag().two_hand_held[0]);
  rig.in.digital[kThLeft] = false;
  rig.in.digital[kThRight] = false;
  rig.scan();
  rig.in.digital[kThLeft] = true;
  rig.in.digital[kThRight] = true;
  rig.scan();
  EXPECT_TRUE(rig.diag().two_hand_held[0]) << "a fresh actuation after both were released";
}

TEST(Hardening, ClockRunningBackwardsIsATimeSourceFault) {
  Rig rig(make_test_machine());
  rig.arm(false);
  rig.scan(0xFFFFFF00u);  // a step back of 256 us reads as an interval near 2^32
  EXPECT_TRUE(has_fault(rig.diag(), FaultCode::kTimeSource));
  EXPECT_EQ(rig.diag().state, MachineState::kFaulted);
}

TEST(Hardening, ValidationNeedsTheWatchdogAndTheInputAgeCheck) {
  MachineConfig c = make_test_machine();
  c.safety.watchdog_us = 0;
  EXPECT_FALSE(validate_config(c).is_ok());
  c = make_test_machine();
  c.safety.max_digital_age_us = 0;
  EXPECT_FALSE(validate_config(c).is_ok());
  c = make_test_machine();
  c.functions[kPress].quick_stop_us = 0;
  EXPECT_FALSE(validate_config(c).is_ok()) << "a proportional quick stop must be a ramp";
}
}  // namespace
}  // namespace spoolstep::core
