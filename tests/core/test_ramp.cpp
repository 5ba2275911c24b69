// Ramps: timing, smooth re-targeting, S-curve jerk limit, zero crossing.
#include <gtest/gtest.h>

#include <cmath>

#include "spoolstep/core/ramp.hpp"

namespace spoolstep::core {
namespace {

RampConfig linear(std::uint32_t accel_us, std::uint32_t decel_us) {
  RampConfig r;
  r.profile = RampProfile::kLinear;
  r.extend_accel_us = r.retract_accel_us = accel_us;
  r.extend_decel_us = r.retract_decel_us = decel_us;
  return r;
}

RampConfig s_curve(std::uint32_t accel_us, std::uint32_t jerk_us) {
  RampConfig r = linear(accel_us, accel_us);
  r.profile = RampProfile::kSCurve;
  r.jerk_us = jerk_us;
  return r;
}

// Steps until the ramp reaches `target`; returns the number of steps.
int steps_to(RampState& state, float target, const RampConfig& ramp, float dt_s, int limit = 100000) {
  const RampLimits ext = ramp_limits(ramp, Direction::kExtend);
  const RampLimits ret = ramp_limits(ramp, Direction::kRetract);
  for (int i = 1; i <= limit; ++i) {
    advance_ramp(state, target, ext, ret, dt_s);
    if (state.value == target) return i;
  }
  return -1;
}

TEST(Ramp, LinearReachesFullScaleInAccelTimeWithinOneScan) {
  struct Case { std::uint32_t accel_us; float dt_s; };
  for (const Case c : {Case{200000, 0.001f}, Case{1000000, 0.001f}, Case{150000, 0.002f}, Case{50000, 0.0005f}}) {
    RampState s;
    const int steps = steps_to(s, 1.0f, linear(c.accel_us, c.accel_us), c.dt_s);
    const double expected = static_cast<double>(c.accel_us) * 1e-6 / static_cast<double>(c.dt_s);
    EXPECT_NEAR(static_cast<double>(steps), expected, 1.0 + 1e-3) << "accel " << c.accel_us << " dt " << c.dt_s << " steps " << steps;
  }
}

TEST(Ramp, LinearDecelUsesDecelTime) {
  RampState s{1.0f, 0.0f};
  const int steps = steps_to(s, 0.0f, linear(200000, 80000), 0.001f);
  EXPECT_NEAR(steps, 80, 1);
}

TEST(Ramp, PartialChangeTakesProportionalTime) {
  RampState s{0.2f, 0.0f};
  const int steps = steps_to(s, 0.7f, linear(200000, 100000), 0.001f);
  EXPECT_NEAR(steps, 100, 1);  // half of full scale at 200 ms per full scale
}

TEST(Ramp, RetargetMidRampContinuesFromCurrentValueWithoutStep) {
  const RampConfig r = linear(200000, 100000);
  const RampLimits ext = ramp_limits(r, Direction::kExtend);
  RampState s;
  for (int i = 0; i < 100; ++i) advance_ramp(s, 1.0f, ext, ext, 0.001f);
  const float before = s.value;
  advance_ramp(s, 0.2f, ext, ext, 0.001f);  // new, lower target mid-ramp
  EXPECT_LE(std::fabs(s.value - before), 0.01f + 1e-6f) << "at most one decel step";
  EXPECT_LT(s.value, before);
}

TEST(Ramp, ReversalStopsAtCentreFirst) {
  const RampConfig r = linear(100000, 100000);
  const RampLimits lim = ramp_limits(r, Direction::kExtend);
  RampState s{0.5f, 0.0f};
  int first_zero = -1;
  for (int i = 0; i < 200; ++i) {
    const float before = s.value;
    advance_ramp(s, -1.0f, lim, lim, 0.001f);
    ASSERT_FALSE(before > 0.0f && s.value < 0.0f) << "crossed centre within one call at step " << i;
    if (s.value == 0.0f && first_zero < 0) first_zero = i;
  }
  EXPECT_NEAR(first_zero, 49, 1) << "decelerates to centre first (0.5 at 100 ms per full scale)";
  EXPECT_LT(s.value, 0.0f) << "then continues on the other side";
}

TEST(Ramp, DirectionSpecificTimes) {
  RampConfig r = linear(100000, 100000);
  r.retract_accel_us = 400000;
  RampState s;
  EXPECT_NEAR(steps_to(s, -1.0f, r, 0.001f), 400, 1);
}

TEST(Ramp, SCurveReachesTargetInAccelPlusJerkTimeWithinOneScan) {
  // Trapezoidal acceleration: full scale takes accel + jerk time.
  for (std::uint32_t jerk_us : {50000u, 100000u, 200000u}) {
    RampState s;
    const int steps = steps_to(s, 1.0f, s_curve(400000, jerk_us), 0.001f);
    EXPECT_NEAR(steps, static_cast<int>((400000 + jerk_us) / 1000), 1) << "jerk " << jerk_us;
  }
}

TEST(Ramp, SCurveRespectsJerkAndAccelerationLimits) {
  const RampConfig r = s_curve(400000, 100000);
  const RampLimits lim = ramp_limits(r, Direction::kExtend);
  const float dt = 0.001f;
  const float a_max = 1.0f / 0.4f;
  const float j_max = a_max / 0.1f;
  RampState s;
  float v_prev = 0.0f, a_prev = 0.0f;
  float targets[] = {1.0f, 0.3f, 0.8f, 0.0f};
  int step = 0;
  for (float target : targets) {
    for (int i = 0; i < 700; ++i, ++step) {
      advance_ramp(s, target, lim, lim, dt);
      const float a = (s.value - v_prev) / dt;
      const float jerk = (a - a_prev) / dt;
      ASSERT_LE(std::fabs(a), a_max * 1.001f) << "step " << step;
      ASSERT_LE(std::fabs(jerk), j_max * 1.01f) << "step " << step << " target " << target;
      v_prev = s.value;
      a_prev = a;
    }
    EXPECT_FLOAT_EQ(s.value, target);
  }
}

TEST(Ramp, QuickStopIsLinearOverQuickStopTime) {
  RampState s{1.0f, 0.0f};
  const RampLimits q = quick_stop_limits(50000);
  int steps = 0;
  while (s.value > 0.0f && steps < 1000) {
    advance_ramp(s, 0.0f, q, q, 0.001f);
    ++steps;
  }
  EXPECT_NEAR(steps, 50, 1);
}

TEST(Ramp, ZeroTimeJumps) {
  RampState s;
  advance_ramp(s, 0.6f, RampLimits{}, RampLimits{}, 0.001f);
  EXPECT_EQ(s.value, 0.6f);
}

}  // namespace
}  // namespace spoolstep::core
