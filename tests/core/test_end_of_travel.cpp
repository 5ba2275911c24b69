// End of travel: position limits with a release band, and a motion cut at
// its end that stays cut until its demand is released.
#include <gtest/gtest.h>

#include "test_rig.hpp"

namespace spoolstep::core::testing {
namespace {

// The test press with its position transmitter (0..500 mm on 4-20 mA) and a
// window of 10..400 mm with a 5 mm release band.
MachineConfig press_with_position() {
  MachineConfig c = make_test_machine();
  FunctionConfig& press = c.functions[kPress];
  press.position_input = kPressPosition;
  press.extend_limit = 400.0f;
  press.retract_limit = 10.0f;
  press.limit_release_band = 5.0f;
  return c;
}

float ma_at(float mm) { return 4.0f + 16.0f * mm / 500.0f; }

TEST(EndOfTravel, MotionCutAtItsLimitDoesNotReopenWhileTheJogIsHeld) {
  Rig rig(press_with_position());
  rig.arm(false);
  rig.in.digital[kPressUp] = false;
  rig.set_ma(kPressPosition, ma_at(390.0f));
  rig.in.commands.jog[kPress] = Direction::kExtend;
  rig.run_ms(100);
  ASSERT_GT(rig.out.prop[kPressYa].value, 0.0f);
  rig.set_ma(kPressPosition, ma_at(400.5f));
  rig.scan();
  EXPECT_EQ(rig.out.prop[kPressYa].value, 0.0f) << "cut at the limit in the same scan";
  // The load rings back out of the limit, past the release band.
  rig.set_ma(kPressPosition, ma_at(380.0f));
  rig.run_ms(100);
  EXPECT_EQ(rig.out.prop[kPressYa].value, 0.0f) << "held jog re-opened towards the limit";
  rig.in.commands.jog[kPress] = Direction::kNone;
  rig.scan();
  rig.in.commands.jog[kPress] = Direction::kExtend;
  rig.run_ms(50);
  EXPECT_GT(rig.out.prop[kPressYa].value, 0.0f) << "released and pressed again outside the band, it moves";
}

TEST(EndOfTravel, LimitHoldsInsideTheReleaseBandAfterAFreshPress) {
  Rig rig(press_with_position());
  rig.arm(false);
  rig.in.digital[kPressUp] = false;
  rig.set_ma(kPressPosition, ma_at(401.0f));
  rig.run_ms(5);
  rig.set_ma(kPressPosition, ma_at(397.0f));  // back inside, by less than the 5 mm band
  rig.in.commands.jog[kPress] = Direction::kExtend;
  rig.run_ms(50);
  EXPECT_EQ(rig.out.prop[kPressYa].value, 0.0f) << "inside the band the limit still counts as reached";
  rig.in.commands.jog[kPress] = Direction::kNone;
  rig.set_ma(kPressPosition, ma_at(394.0f));  // out of the band
  rig.scan();
  rig.in.commands.jog[kPress] = Direction::kExtend;
  rig.run_ms(50);
  EXPECT_GT(rig.out.prop[kPressYa].value, 0.0f);
}

TEST(EndOfTravel, MotionAwayFromTheLimitIsFree) {
  Rig rig(press_with_position());
  rig.arm(false);
  rig.in.digital[kPressUp] = false;
  rig.set_ma(kPressPosition, ma_at(401.0f));
  rig.in.commands.jog[kPress] = Direction::kRetract;
  rig.run_ms(50);
  EXPECT_GT(rig.out.prop[kPressYb].value, 0.0f) << "a limit stops only the motion towards it";
}

TEST(EndOfTravel, ValidateRejectsABandWiderThanTheWindow) {
  MachineConfig c = press_with_position();
  c.functions[kPress].limit_release_band = 390.0f;
  EXPECT_FALSE(validate_config(c).is_ok());
  c.functions[kPress].limit_release_band = -1.0f;
  EXPECT_FALSE(validate_config(c).is_ok());
}

// Slow-down: inside the zone the target drops to the creep speed and the
// command follows on the ramp's deceleration (no jump).
TEST(SlowDown, ZoneBeforeTheLimitLimitsTheSpeedOnTheDecelRamp) {
  MachineConfig c = press_with_position();
  c.functions[kPress].extend_slowdown = 30.0f;
  c.functions[kPress].slowdown_speed_percent = 5.0f;
  c.functions[kPress].jog_speed_percent = 80.0f;
  Rig rig(c);
  rig.arm(false);
  rig.in.digital[kPressUp] = false;
  rig.set_ma(kPressPosition, ma_at(300.0f));
  rig.in.commands.jog[kPress] = Direction::kExtend;
  rig.run_ms(300);
  ASSERT_FLOAT_EQ(rig.diag().functions[kPress].command, 0.8f);
  rig.set_ma(kPressPosition, ma_at(371.0f));  // inside the last 30 mm
  rig.scan();
  EXPECT_FLOAT_EQ(rig.diag().functions[kPress].target, 0.05f);
  EXPECT_GT(rig.diag().functions[kPress].command, 0.78f) << "decelerates on the ramp, not in one scan";
  rig.run_ms(100);  // normal ramp: 100 ms per full-scale decrease
  EXPECT_FLOAT_EQ(rig.diag().functions[kPress].command, 0.05f);
  EXPECT_GT(rig.out.prop[kPressYa].value, 0.0f) << "creeps on to the limit";
}

TEST(SlowDown, SwitchInputSlowsOnlyTheMotionTowardsItsEnd) {
  MachineConfig c = press_with_position();
  c.functions[kPress].retract_slowdown_input = kClampClosed;  // any spare input of the rig
  c.functions[kPress].slowdown_speed_percent = 5.0f;
  Rig rig(c);
  rig.arm(false);
  rig.in.digital[kPressUp] = false;
  rig.set_ma(kPressPosition, ma_at(200.0f));
  rig.in.digital[kClampClosed] = true;
  rig.in.commands.jog[kPress] = Direction::kRetract;
  rig.run_ms(300);
  EXPECT_FLOAT_EQ(rig.diag().functions[kPress].target, -0.05f);
  rig.in.commands.jog[kPress] = Direction::kNone;
  rig.run_ms(300);
  rig.in.commands.jog[kPress] = Direction::kExtend;
  rig.run_ms(300);
  EXPECT_FLOAT_EQ(rig.diag().functions[kPress].target, 0.2f) << "the extend motion is not slowed";
}

TEST(SlowDown, ValidateRejectsASlowDownWithoutCreepSpeedOrOnASolenoidValve) {
  MachineConfig c = press_with_position();
  c.functions[kPress].extend_slowdown = 30.0f;
  EXPECT_FALSE(validate_config(c).is_ok()) << "no creep speed";
  c.functions[kPress].slowdown_speed_percent = 5.0f;
  EXPECT_TRUE(validate_config(c).is_ok());
  c.functions[kClamp].retract_slowdown_input = kClampClosed;
  c.functions[kClamp].slowdown_speed_percent = 5.0f;
  EXPECT_FALSE(validate_config(c).is_ok()) << "a solenoid valve cannot creep";
}

}  // namespace
}  // namespace spoolstep::core::testing
