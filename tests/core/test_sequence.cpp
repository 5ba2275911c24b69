// The step chain (IEC 61131-3 SFC sense: steps with actions, transitions with
// conditions) driven through a whole cycle, row by row.
#include <gtest/gtest.h>

#include <functional>

#include "test_rig.hpp"

namespace spoolstep::core {
namespace {

using namespace testing;

struct Row {
  const char* why;
  std::function<void(Rig&)> act;  // what the operator or the machine does
  std::uint32_t run_ms;           // then scan this long
  MachineState state;
  std::uint8_t step;
  bool clamp_extend;
  bool clamp_retract;
  int press;  // sign of the press command: +1 extend, -1 retract, 0 none
};

void set_di(Rig& rig, std::uint8_t di, bool value) { rig.in.digital[di] = value; }

void check(Rig& rig, const Row& row) {
  if (row.act) row.act(rig);
  rig.run_ms(row.run_ms);
  const Diagnostics& d = rig.diag();
  EXPECT_EQ(d.state, row.state) << row.why;
  EXPECT_EQ(d.active_step, row.step) << row.why;
  EXPECT_EQ(rig.out.coils[kClampY1], row.clamp_extend) << row.why;
  EXPECT_EQ(rig.out.coils[kClampY2], row.clamp_retract) << row.why;
  const int press = rig.out.prop[kPressYa].value > 0.0f ? 1 : (rig.out.prop[kPressYb].value > 0.0f ? -1 : 0);
  EXPECT_EQ(press, row.press) << row.why;
}

const float kMaAt120Bar = 4.0f + 16.0f * 120.0f / 250.0f;

TEST(Sequence, FullSingleCycleRowByRow) {
  Rig rig(make_test_machine());
  rig.arm(true);
  const Row rows[] = {
      {"automatic selected, idle at the initial step", nullptr, 10, MachineState::kAutoIdle, kWait, false, false, 0},
      {"cycle start: start conditions hold, clamp closes",
       [](Rig& r) { r.press(kStart); }, 5, MachineState::kAutoCycle, kClampStep, true, false, 0},
      {"clamp closed: press goes down, clamp held",
       [](Rig& r) { set_di(r, kClampClosed, true); }, 5, MachineState::kAutoCycle, kPressStep, true, false, 1},
      {"press leaves the top", [](Rig& r) { set_di(r, kPressUp, false); }, 100, MachineState::kAutoCycle, kPressStep, true, false, 1},
      {"bottom reached but pressure low: wait for force",
       [](Rig& r) { set_di(r, kPressDown, true); }, 5, MachineState::kAutoCycle, kPressStep, true, false, 0},
      {"pressure above 100 bar: dwell", [](Rig& r) { r.set_ma(kPressPressure, kMaAt120Bar); }, 5,
       MachineState::kAutoCycle, kDwell, true, false, 0},
      {"dwell shorter than its minimum time", nullptr, 400, MachineState::kAutoCycle, kDwell, true, false, 0},
      {"after 500 ms: retract", nullptr, 120, MachineState::kAutoCycle, kRetract, true, false, -1},
      {"leaving the bottom", [](Rig& r) { set_di(r, kPressDown, false); r.set_ma(kPressPressure, 4.0f); }, 50,
       MachineState::kAutoCycle, kRetract, true, false, -1},
      {"top reached: unclamp (after the 50 ms reversal dwell)", [](Rig& r) { set_di(r, kPressUp, true); }, 60,
       MachineState::kAutoCycle, kUnclamp, false, true, 0},
      {"clamp open: single cycle ends in idle", [](Rig& r) { set_di(r, kClampClosed, false); }, 5,
       MachineState::kAutoIdle, kWait, false, false, 0},
      {"no restart without a new start", nullptr, 500, MachineState::kAutoIdle, kWait, false, false, 0},
  };
  for (const Row& row : rows) check(rig, row);
  EXPECT_EQ(rig.diag().completed_cycles, 1u);
}

TEST(Sequence, CycleStartRefusedWhenStartConditionsDoNotHold) {
  Rig rig(make_test_machine());
  rig.arm(true);
  rig.in.digital[kPressUp] = false;  // press not at the top
  rig.press(kStart);
  rig.run_ms(100);
  EXPECT_EQ(rig.diag().active_step, kWait);
  EXPECT_FALSE(rig.out.coils[kClampY1]);
}

TEST(Sequence, SupervisionFaultNamesStepAndUnmetCondition) {
  Rig rig(make_test_machine());
  rig.arm(true);
  rig.start_cycle_to_press_step();
  ASSERT_EQ(rig.diag().active_step, kPressStep);
  rig.in.digital[kPressDown] = true;  // at the bottom, but the pressure never comes
  rig.run_ms(5100);                   // supervision 5 s
  const Diagnostics& d = rig.diag();
  ASSERT_TRUE(has_fault(d, FaultCode::kStepSupervision));
  const Fault* fault = nullptr;
  for (std::uint8_t i = 0; i < d.fault_count; ++i) {
    if (d.faults[i].code == FaultCode::kStepSupervision) fault = &d.faults[i];
  }
  ASSERT_NE(fault, nullptr);
  const MachineConfig c = make_test_machine();
  EXPECT_STREQ(c.steps[fault->subject].name.text.data(), "press_down");
  ASSERT_LT(fault->detail, c.node_count);
  EXPECT_STREQ(c.nodes[fault->detail].label.text.data(), "press_pressure > 100")
      << "the leaf that held the transition false, not the whole condition";
  EXPECT_EQ(fault->category, StopCategory::kCat1);
  rig.run_ms(100);
  EXPECT_EQ(d.state, MachineState::kFaulted);
  EXPECT_TRUE(all_outputs_off(rig.out));
}

TEST(Sequence, ResetAfterAFaultMidCycleDoesNotRestart) {
  Rig rig(make_test_machine());
  rig.arm(true);
  rig.press(kStart);
  rig.in.digital[kClampClosed] = true;
  rig.run_ms(50);
  ASSERT_EQ(rig.diag().active_step, kPressStep);
  rig.in.digital[kEstopOk] = false;
  rig.run_ms(5);
  rig.in.digital[kEstopOk] = true;
  rig.press(kReset);
  rig.run_ms(500);
  EXPECT_EQ(rig.diag().state, MachineState::kAutoIdle);
  EXPECT_EQ(rig.diag().active_step, kWait);
  EXPECT_FALSE(rig.out.coils[kClampY1]);
  EXPECT_EQ(rig.out.prop[kPressYa].value, 0.0f);
}

TEST(Sequence, CycleStopFinishesTheCycleThenIdles) {
  Rig rig(make_test_machine());
  rig.arm(true);
  rig.in.commands.continuous = true;
  rig.start_cycle_to_press_step();
  rig.in.commands.cycle_stop = true;
  rig.scan();
  rig.in.commands.cycle_stop = false;
  EXPECT_EQ(rig.diag().state, MachineState::kAutoEndCycle);
  EXPECT_EQ(rig.diag().active_step, kPressStep) << "the cycle goes on";
  rig.finish_cycle_from_press_step(100);
  EXPECT_EQ(rig.diag().state, MachineState::kAutoIdle);
  EXPECT_EQ(rig.diag().active_step, kWait);
}

TEST(Sequence, ContinuousModeStartsTheNextCycle) {
  Rig rig(make_test_machine());
  rig.arm(true);
  rig.in.commands.continuous = true;
  rig.press(kStart);
  rig.in.digital[kClampClosed] = true;
  rig.finish_cycle_from_press_step(10);
  EXPECT_EQ(rig.diag().completed_cycles, 1u);
  EXPECT_EQ(rig.diag().state, MachineState::kAutoCycle);
  EXPECT_EQ(rig.diag().active_step, kClampStep) << "next cycle started by itself";
}

TEST(Sequence, SelectorToManualLeavesTheCycle) {
  Rig rig(make_test_machine());
  rig.arm(true);
  rig.press(kStart);
  rig.in.digital[kClampClosed] = true;
  rig.run_ms(50);
  rig.in.digital[kAutoSel] = false;
  rig.scan();
  EXPECT_EQ(rig.diag().state, MachineState::kManual);
  rig.run_ms(200);
  EXPECT_EQ(rig.out.prop[kPressYa].value, 0.0f);
  EXPECT_FALSE(rig.out.coils[kClampY1]);
}

TEST(Sequence, GuardOpenedMidCycleHoldsAndClosingItDoesNotRestart) {
  Rig rig(make_test_machine());
  rig.arm(true);
  rig.press(kStart);
  rig.in.digital[kClampClosed] = true;
  rig.in.digital[kPressUp] = false;
  rig.run_ms(300);
  ASSERT_EQ(rig.diag().active_step, kPressStep);
  ASSERT_GT(rig.out.prop[kPressYa].value, 0.0f);
  rig.in.digital[kGuardClosed] = false;
  rig.scan();
  EXPECT_EQ(rig.diag().state, MachineState::kAutoHeld);
  rig.run_ms(100);
  EXPECT_TRUE(no_valve_driven(rig.out)) << "quick stop done, clamp released by the guard";
  rig.in.digital[kGuardClosed] = true;
  rig.run_ms(500);
  EXPECT_EQ(rig.diag().state, MachineState::kAutoHeld) << "closing the guard is not a start";
  EXPECT_TRUE(no_valve_driven(rig.out));
  EXPECT_EQ(rig.diag().active_step, kPressStep) << "the step is kept";
  rig.press(kStart);
  rig.run_ms(50);
  EXPECT_EQ(rig.diag().state, MachineState::kAutoCycle);
  EXPECT_EQ(rig.diag().active_step, kPressStep) << "resumes where it stopped";
  EXPECT_GT(rig.out.prop[kPressYa].value, 0.0f);
  EXPECT_TRUE(rig.out.coils[kClampY1]);
}

TEST(Sequence, EventLogRecordsStepChangesWithTimes) {
  Rig rig(make_test_machine());
  rig.arm(true);
  rig.start_cycle_to_press_step();
  const EventLog& log = rig.diag().events;
  bool saw_clamp = false, saw_press = false;
  std::uint32_t last_time = 0;
  for (std::uint32_t i = 0; i < log.size(); ++i) {
    const Event& e = log.at(i);
    EXPECT_GE(e.time_us, last_time) << "events in time order";
    last_time = e.time_us;
    if (e.code == EventCode::kStepChanged && e.subject == kClampStep) saw_clamp = true;
    if (e.code == EventCode::kStepChanged && e.subject == kPressStep) saw_press = true;
  }
  EXPECT_TRUE(saw_clamp);
  EXPECT_TRUE(saw_press);
}

}  // namespace
}  // namespace spoolstep::core

namespace spoolstep::core {
namespace {

using namespace testing;

// IEC 60204-1 9.2.5.3 (from memory): a stop function that overrides starts.
TEST(OperatorStop, HoldsTheCycleAndOnlyANewStartResumes) {
  Rig rig(make_test_machine());
  rig.arm(true);
  rig.start_cycle_to_press_step();
  rig.in.digital[kPressUp] = false;
  rig.run_ms(200);
  ASSERT_GT(rig.out.prop[kPressYa].value, 0.0f);
  rig.in.commands.stop = true;
  rig.scan();
  EXPECT_EQ(rig.diag().state, MachineState::kAutoHeld);
  rig.run_ms(100);
  EXPECT_TRUE(no_valve_driven(rig.out)) << "controlled stop completed";
  EXPECT_EQ(rig.diag().power_unit, PowerUnitState::kReady) << "category 2: power stays";
  rig.press(kStart);
  EXPECT_EQ(rig.diag().state, MachineState::kAutoHeld) << "no start while the stop is pressed";
  rig.in.commands.stop = false;
  rig.run_ms(100);
  EXPECT_EQ(rig.diag().state, MachineState::kAutoHeld) << "releasing the stop is not a start";
  rig.press(kStart);
  EXPECT_EQ(rig.diag().state, MachineState::kAutoCycle);
  EXPECT_EQ(rig.diag().active_step, kPressStep);
}

TEST(OperatorStop, StopsAJogThatThenNeedsAFreshPress) {
  Rig rig(make_test_machine());
  rig.arm(false);
  rig.in.digital[kJogClampExt] = true;
  rig.run_ms(5);
  ASSERT_TRUE(rig.out.coils[kClampY1]);
  rig.in.commands.stop = true;
  rig.scan();
  EXPECT_FALSE(rig.out.coils[kClampY1]);
  rig.in.commands.stop = false;
  rig.run_ms(20);
  EXPECT_FALSE(rig.out.coils[kClampY1]) << "the jog still held does not restart";
  rig.in.digital[kJogClampExt] = false;
  rig.scan();
  rig.in.digital[kJogClampExt] = true;
  rig.scan();
  EXPECT_TRUE(rig.out.coils[kClampY1]);
}

// The test machine with its cycle started by the two-hand device instead of
// the start button; `release_holds` as the machine file would set it.
MachineConfig two_hand_start_machine(std::uint32_t release_holds = kAllMotionBits) {
  ConfigBuilder b;
  b.c = make_test_machine();
  const auto both_hands = b.op(ConditionOp::kTwoHandHeld, 0, 0, "two_hand main");
  b.c.operator_panel.cycle_start = both_hands;
  b.c.two_hand[0].release_holds = release_holds;
  return b.c;
}

void press_both_hands(Rig& rig, bool held) {
  rig.in.digital[kThLeft] = held;
  rig.in.digital[kThRight] = held;
}

// ISO 13851 type III (from memory, clause not confirmed): continuous
// actuation for the hazardous phase. A two-hand start holds the motion it
// started when either hand comes off; the old core let the cycle run on.
TEST(Sequence, ReleasingOneHandOfATwoHandStartHoldsTheCycle) {
  Rig rig(two_hand_start_machine());
  rig.arm(true);
  press_both_hands(rig, true);
  rig.scan();
  ASSERT_EQ(rig.diag().state, MachineState::kAutoCycle);
  rig.in.digital[kClampClosed] = true;
  rig.in.digital[kPressUp] = false;
  rig.run_ms(100);
  ASSERT_EQ(rig.diag().active_step, kPressStep);
  ASSERT_GT(rig.out.prop[kPressYa].value, 0.0f);
  rig.in.digital[kThRight] = false;  // one hand comes off
  rig.scan();
  EXPECT_EQ(rig.diag().state, MachineState::kAutoHeld) << "the ram goes on without the hands";
  rig.run_ms(100);  // the quick stop of the press valve is 50 ms
  EXPECT_TRUE(no_valve_driven(rig.out));
  EXPECT_EQ(rig.diag().active_step, kPressStep) << "the held cycle keeps its step";
  rig.in.digital[kThRight] = true;  // the hand comes back alone: not a new actuation
  rig.run_ms(10);
  EXPECT_EQ(rig.diag().state, MachineState::kAutoHeld) << "re-grasping one hand resumed the cycle";
  press_both_hands(rig, false);
  rig.scan();
  press_both_hands(rig, true);  // a new two-hand actuation resumes
  rig.run_ms(10);
  EXPECT_EQ(rig.diag().state, MachineState::kAutoCycle);
  EXPECT_GT(rig.out.prop[kPressYa].value, 0.0f);
  bool saw_release = false;
  for (std::uint32_t i = 0; i < rig.diag().events.size(); ++i) {
    saw_release = saw_release || rig.diag().events.at(i).code == EventCode::kTwoHandReleased;
  }
  EXPECT_TRUE(saw_release) << "the release is not in the event log";
}

// A cycle whose return stroke is not hazardous names the hazardous motion
// only (release_holds); the other motions go on without the hands.
TEST(Sequence, TwoHandReleaseHoldsOnlyTheMotionsTheFileNames) {
  Rig rig(two_hand_start_machine(motion_bit(kPress, Direction::kExtend)));
  rig.arm(true);
  press_both_hands(rig, true);
  rig.scan();
  rig.in.digital[kClampClosed] = true;
  rig.in.digital[kPressUp] = false;
  rig.run_ms(100);
  rig.in.digital[kPressDown] = true;
  rig.set_ma(kPressPressure, kMaAt120Bar);
  rig.run_ms(600);
  ASSERT_EQ(rig.diag().active_step, kRetract);
  press_both_hands(rig, false);  // hands off during the return stroke
  rig.run_ms(100);
  EXPECT_EQ(rig.diag().state, MachineState::kAutoCycle) << "the return stroke was held";
  EXPECT_GT(rig.out.prop[kPressYb].value, 0.0f) << "the ram stopped on its way up";
}

// A two-hand device that is not part of the cycle start holds nothing.
TEST(Sequence, TwoHandDeviceThatDidNotStartTheCycleHoldsNothing) {
  Rig rig(make_test_machine());  // cycle start is the start button
  rig.arm(true);
  press_both_hands(rig, true);
  rig.scan();
  rig.start_cycle_to_press_step();
  press_both_hands(rig, false);
  rig.in.digital[kPressUp] = false;
  rig.run_ms(50);
  EXPECT_EQ(rig.diag().state, MachineState::kAutoCycle);
}

}  // namespace
}  // namespace spoolstep::core
