// Valve kinds other than the test machine's defaults, end of travel, the
// position window, stop category 2 and the event log.
#include <gtest/gtest.h>

#include "test_rig.hpp"

namespace spoolstep::core {
namespace {

using namespace testing;

TEST(SpringReturnValve, CoilOnExtendsOffIsTheSpringPosition) {
  MachineConfig c = make_test_machine();
  c.functions[kClamp].valve = ValveKind::kSolenoid42SpringReturn;
  c.functions[kClamp].centre = ValveCentre::kNotApplicable;
  c.functions[kClamp].coil_retract = kNoIndex8;
  Rig rig(c);
  ASSERT_TRUE(rig.init_status_ok);
  rig.arm(false);
  rig.in.digital[kJogClampExt] = true;
  rig.scan();
  EXPECT_TRUE(rig.out.coils[kClampY1]);
  rig.in.digital[kEstopOk] = false;
  rig.scan();
  EXPECT_FALSE(rig.out.coils[kClampY1]) << "any stop drops the coil: the spring returns the spool";
}

TEST(SignedCommandValve, DeadbandJumpAndSign) {
  MachineConfig c = make_test_machine();
  FunctionConfig& f = c.functions[kPress];
  f.valve = ValveKind::kProportional43SignedCommand;
  f.prop_retract = kNoIndex8;
  f.deadband_jump_percent = 12.0f;
  c.prop_outputs[kPressYa].unit = PropUnit::kPercent;
  Rig rig(c);
  ASSERT_TRUE(rig.init_status_ok);
  rig.arm(false);
  rig.in.digital[kPressUp] = false;  // mid-stroke: both directions free
  rig.in.commands.jog[kPress] = Direction::kExtend;
  rig.scan();
  EXPECT_GT(rig.out.prop[kPressYa].value, 12.0f);
  EXPECT_LT(rig.out.prop[kPressYa].value, 12.5f) << "just above zero jumps to the deadband edge";
  rig.run_ms(200);
  EXPECT_NEAR(rig.out.prop[kPressYa].value, 12.0f + 0.2f * 88.0f, 1e-3f) << "20 % jog";
  rig.in.commands.jog[kPress] = Direction::kNone;
  rig.run_ms(200);
  rig.in.commands.jog[kPress] = Direction::kRetract;
  rig.run_ms(400);
  EXPECT_NEAR(rig.out.prop[kPressYa].value, -(12.0f + 0.2f * 88.0f), 1e-3f) << "retract is negative";
}

TEST(EndOfTravel, StopsTheMotionAtOnce) {
  Rig rig(make_test_machine());
  rig.arm(false);
  rig.in.digital[kPressUp] = false;
  rig.in.commands.jog[kPress] = Direction::kExtend;
  rig.run_ms(200);
  ASSERT_GT(rig.out.prop[kPressYa].value, 0.0f);
  rig.in.digital[kPressDown] = true;
  rig.scan();
  EXPECT_EQ(rig.out.prop[kPressYa].value, 0.0f);
  rig.run_ms(50);
  EXPECT_EQ(rig.out.prop[kPressYa].value, 0.0f) << "stays stopped while the end switch is made";
  rig.in.commands.jog[kPress] = Direction::kRetract;
  rig.run_ms(100);
  EXPECT_GT(rig.out.prop[kPressYb].value, 0.0f) << "the other direction is free";
  bool logged = false;
  for (std::uint32_t i = 0; i < rig.diag().events.size(); ++i)
    logged = logged || rig.diag().events.at(i).code == EventCode::kEndOfTravel;
  EXPECT_TRUE(logged);
}

TEST(PositionWindow, LimitsStopTheMotion) {
  MachineConfig c = make_test_machine();
  c.functions[kPress].position_input = kPressPosition;
  c.functions[kPress].extend_limit = 480.0f;
  c.functions[kPress].retract_limit = 5.0f;
  Rig rig(c);
  rig.arm(false);
  rig.set_ma(kPressPosition, 4.0f + 16.0f * 300.0f / 500.0f);
  rig.in.commands.jog[kPress] = Direction::kExtend;
  rig.run_ms(100);
  EXPECT_GT(rig.out.prop[kPressYa].value, 0.0f);
  rig.set_ma(kPressPosition, 4.0f + 16.0f * 481.0f / 500.0f);
  rig.scan();
  EXPECT_EQ(rig.out.prop[kPressYa].value, 0.0f);
}

TEST(StopCategory2, ControlledStopKeepsPowerAvailable) {
  MachineConfig c = make_test_machine(true);
  c.interlocks[kOilTrip].stop_category = StopCategory::kCat2;
  Rig rig(c);
  rig.arm(false);
  rig.in.commands.pump_start = true;
  rig.scan();
  rig.in.commands.pump_start = false;
  rig.run_ms(1000);
  rig.set_ma(kPressPressure, 4.0f + 16.0f * 30.0f / 250.0f);
  rig.run_ms(5);
  rig.in.commands.jog[kPress] = Direction::kExtend;
  rig.run_ms(300);
  ASSERT_GT(rig.out.prop[kPressYa].value, 0.0f);
  rig.in.digital[kOilLevelOk] = false;
  rig.scan();
  EXPECT_EQ(rig.diag().state, MachineState::kStopping);
  EXPECT_GT(rig.out.prop[kPressYa].value, 0.0f) << "ramping down";
  rig.run_ms(100);
  EXPECT_EQ(rig.diag().state, MachineState::kFaulted);
  EXPECT_EQ(rig.out.prop[kPressYa].value, 0.0f);
  EXPECT_TRUE(rig.out.coils[kPressEnable]) << "category 2: the valve amplifier stays powered";
}

TEST(EventLog, RingKeepsTheNewestAndCountsAll) {
  EventLog log;
  for (std::uint32_t i = 0; i < kEventLogCapacity + 10; ++i) log.push(Event{i, EventCode::kStepChanged, 0, 0});
  EXPECT_EQ(log.size(), kEventLogCapacity);
  EXPECT_EQ(log.total, kEventLogCapacity + 10);
  EXPECT_EQ(log.at(0).time_us, 10u) << "oldest kept";
  EXPECT_EQ(log.at(log.size() - 1).time_us, kEventLogCapacity + 9) << "newest";
}

}  // namespace
}  // namespace spoolstep::core
