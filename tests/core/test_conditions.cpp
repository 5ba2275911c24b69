// Condition nodes: timers, hysteresis, combinations, references. Each node
// under test is watched through a permissive with no guards (its bit in
// Diagnostics::interlock_ok is the node's value).
#include <gtest/gtest.h>

#include "test_rig.hpp"

namespace spoolstep::core {
namespace {

using namespace testing;

// Adds `node` as a guard-less permissive; returns its interlock bit.
std::uint32_t watch(MachineConfig& c, std::uint16_t node) {
  const std::uint8_t i = c.interlock_count++;
  c.interlocks[i] = InterlockConfig{name("watch"), InterlockKind::kPermissive, StopCategory::kCat1, node, 0};
  return 1u << i;
}

struct Watched {
  MachineConfig config;
  std::uint32_t bit = 0;
};

Watched timer_on_jog(ConditionOp op, std::uint32_t time_us) {
  MachineConfig c = make_test_machine();
  ConfigBuilder b;
  b.c = c;
  const auto in = b.input(kJogClampExt, "jog_clamp_ext");
  ConditionNode n;
  n.op = op;
  n.a = in;
  n.time_us = time_us;
  const auto timed = b.add(n, "timed");
  Watched w{b.c, 0};
  w.bit = watch(w.config, timed);
  return w;
}

bool value(const Rig& rig, std::uint32_t bit) { return (rig.diag().interlock_ok & bit) != 0; }

TEST(Conditions, OnDelayNeedsTheInputTrueForTheWholeTime) {
  Watched w = timer_on_jog(ConditionOp::kOnDelay, 100000);
  Rig rig(w.config);
  rig.scan();
  rig.in.digital[kJogClampExt] = true;
  rig.run_ms(99);
  EXPECT_FALSE(value(rig, w.bit)) << "99 ms of 100";
  rig.run_ms(1);
  EXPECT_TRUE(value(rig, w.bit)) << "100 ms";
  rig.in.digital[kJogClampExt] = false;
  rig.scan();
  EXPECT_FALSE(value(rig, w.bit)) << "drops at once";
  rig.in.digital[kJogClampExt] = true;
  rig.run_ms(50);
  rig.in.digital[kJogClampExt] = false;
  rig.scan();
  rig.in.digital[kJogClampExt] = true;
  rig.run_ms(60);
  EXPECT_FALSE(value(rig, w.bit)) << "an interruption restarts the delay";
}

TEST(Conditions, OffDelayHoldsTrueForTheTimeAfterTheInputDrops) {
  Watched w = timer_on_jog(ConditionOp::kOffDelay, 200000);
  Rig rig(w.config);
  rig.in.digital[kJogClampExt] = true;
  rig.scan();
  EXPECT_TRUE(value(rig, w.bit));
  rig.in.digital[kJogClampExt] = false;
  rig.run_ms(199);
  EXPECT_TRUE(value(rig, w.bit));
  rig.run_ms(1);
  EXPECT_FALSE(value(rig, w.bit));
}

TEST(Conditions, DebounceIgnoresChatterShorterThanItsTime) {
  Watched w = timer_on_jog(ConditionOp::kDebounce, 20000);
  Rig rig(w.config);
  rig.scan();
  for (int i = 0; i < 50; ++i) {  // chatter every 5 ms
    rig.in.digital[kJogClampExt] = !rig.in.digital[kJogClampExt];
    rig.run_ms(5);
    ASSERT_FALSE(value(rig, w.bit)) << "chatter at " << i;
  }
  rig.in.digital[kJogClampExt] = true;
  rig.run_ms(20);
  EXPECT_TRUE(value(rig, w.bit)) << "stable for 20 ms";
  rig.in.digital[kJogClampExt] = false;
  rig.run_ms(19);
  EXPECT_TRUE(value(rig, w.bit)) << "both edges are debounced";
  rig.run_ms(1);
  EXPECT_FALSE(value(rig, w.bit));
}

TEST(Conditions, TimersUseTheMeasuredIntervalNotTheScanCount) {
  // Jittery scans: 0.5 ms and 1.5 ms alternating; 100 ms of real time.
  Watched w = timer_on_jog(ConditionOp::kOnDelay, 100000);
  Rig rig(w.config);
  rig.scan();
  rig.in.digital[kJogClampExt] = true;
  std::uint32_t elapsed = 0;
  rig.scan();  // the scan that sees the input first starts the timer at 0 + its interval
  elapsed += 1000;
  while (elapsed < 99000) {
    const std::uint32_t step = (elapsed / 1000) % 2 == 0 ? 500 : 1500;
    rig.scan(step);
    elapsed += step;
  }
  EXPECT_FALSE(value(rig, w.bit));
  rig.scan(1000);
  EXPECT_TRUE(value(rig, w.bit));
}

TEST(Conditions, AnalogAboveHasHysteresis) {
  MachineConfig c = make_test_machine();
  ConfigBuilder b;
  b.c = c;
  const auto above = b.analog_above(kPressPressure, 100.0f, 10.0f, "p > 100");
  Watched w{b.c, 0};
  w.bit = watch(w.config, above);
  Rig rig(w.config);
  auto bar = [&](float p) { rig.set_ma(kPressPressure, 4.0f + 16.0f * p / 250.0f); rig.scan(); return value(rig, w.bit); };
  EXPECT_FALSE(bar(99.0f));
  EXPECT_FALSE(bar(100.0f)) << "strictly above";
  EXPECT_TRUE(bar(101.0f));
  EXPECT_TRUE(bar(91.0f)) << "stays true down to threshold - hysteresis";
  EXPECT_FALSE(bar(89.0f));
  EXPECT_FALSE(bar(99.0f)) << "needs the threshold again";
}

TEST(Conditions, AnalogBelowHasHysteresis) {
  MachineConfig c = make_test_machine();
  ConfigBuilder b;
  b.c = c;
  ConditionNode n;
  n.op = ConditionOp::kAnalogBelow;
  n.a = kPressPressure;
  n.threshold = 20.0f;
  n.hysteresis = 5.0f;
  const auto below = b.add(n, "p < 20");
  Watched w{b.c, 0};
  w.bit = watch(w.config, below);
  Rig rig(w.config);
  auto bar = [&](float p) { rig.set_ma(kPressPressure, 4.0f + 16.0f * p / 250.0f); rig.scan(); return value(rig, w.bit); };
  EXPECT_FALSE(bar(30.0f));
  EXPECT_TRUE(bar(19.0f));
  EXPECT_TRUE(bar(24.0f));
  EXPECT_FALSE(bar(26.0f));
}

TEST(Conditions, AllAnyNotAndReferences) {
  MachineConfig c = make_test_machine();
  ConfigBuilder b;
  b.c = c;
  const auto x = b.input(kJogClampExt, "x");
  const auto y = b.input(kJogClampRet, "y");
  const auto both = b.all({x, y}, "x and y");
  ConditionNode any;
  any.op = ConditionOp::kAny;
  any.a = b.c.child_slot_count;
  any.b = 2;
  b.c.child_slots[b.c.child_slot_count++] = x;
  b.c.child_slots[b.c.child_slot_count++] = y;
  const auto either = b.add(any, "x or y");
  const auto neither = b.op(ConditionOp::kNot, either, 0, "not (x or y)");
  const auto ref = b.op(ConditionOp::kNodeRef, both, 0, "ref");
  Watched w{b.c, 0};
  const std::uint32_t b_both = watch(w.config, both);
  const std::uint32_t b_either = watch(w.config, either);
  const std::uint32_t b_neither = watch(w.config, neither);
  const std::uint32_t b_ref = watch(w.config, ref);
  Rig rig(w.config);
  struct Row { bool x, y, all, any, none; };
  for (const Row r : {Row{false, false, false, false, true}, Row{true, false, false, true, false},
                      Row{false, true, false, true, false}, Row{true, true, true, true, false}}) {
    rig.in.digital[kJogClampExt] = r.x;
    rig.in.digital[kJogClampRet] = r.y;
    rig.scan();
    EXPECT_EQ(value(rig, b_both), r.all) << r.x << r.y;
    EXPECT_EQ(value(rig, b_either), r.any) << r.x << r.y;
    EXPECT_EQ(value(rig, b_neither), r.none) << r.x << r.y;
    EXPECT_EQ(value(rig, b_ref), r.all) << "a reference copies its node";
  }
}

TEST(Conditions, ModeStepAndFunctionState) {
  MachineConfig c = make_test_machine();
  ConfigBuilder b;
  b.c = c;
  const auto manual = b.op(ConditionOp::kModeIs, 0, 0, "manual");
  const auto automatic = b.op(ConditionOp::kModeIs, 0, 1, "automatic");
  const auto in_clamp_step = b.op(ConditionOp::kStepActive, kClampStep, 0, "step clamp");
  const auto clamp_extending = b.op(ConditionOp::kFunctionState, kClamp,
                                    static_cast<std::uint16_t>(FunctionCondition::kExtending), "clamp extending");
  const auto press_top = b.op(ConditionOp::kFunctionState, kPress,
                              static_cast<std::uint16_t>(FunctionCondition::kAtRetractedEnd), "press at top");
  Watched w{b.c, 0};
  const auto bm = watch(w.config, manual), ba = watch(w.config, automatic), bs = watch(w.config, in_clamp_step),
             be = watch(w.config, clamp_extending), bt = watch(w.config, press_top);
  Rig rig(w.config);
  rig.arm(false);
  rig.scan();
  EXPECT_TRUE(value(rig, bm));
  EXPECT_FALSE(value(rig, ba));
  EXPECT_TRUE(value(rig, bt)) << "press_up input is set by the rig";
  rig.in.digital[kAutoSel] = true;
  rig.run_ms(2);
  EXPECT_TRUE(value(rig, ba));
  rig.press(kStart);
  rig.run_ms(2);
  EXPECT_TRUE(value(rig, bs));
  EXPECT_TRUE(value(rig, be)) << "reads the previous scan's motion";
}

TEST(Conditions, TwoHandNodeFollowsTheDevice) {
  MachineConfig c = make_test_machine();
  ConfigBuilder b;
  b.c = c;
  const auto th = b.op(ConditionOp::kTwoHandHeld, 0, 0, "two_hand");
  Watched w{b.c, 0};
  w.bit = watch(w.config, th);
  Rig rig(w.config);
  rig.scan();
  rig.in.digital[kThLeft] = true;
  rig.run_ms(300);
  EXPECT_FALSE(value(rig, w.bit));
  rig.in.digital[kThRight] = true;
  rig.scan();
  EXPECT_TRUE(value(rig, w.bit));
}

}  // namespace
}  // namespace spoolstep::core
