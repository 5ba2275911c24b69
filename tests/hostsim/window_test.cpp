// Integration windows: in a quiet stretch the plant integrates several scan
// periods at once and interpolates the state for the scans in between
// (hostsim/src/step_window.hpp, Plant::advance). These tests pin that the
// windows change nothing a scan can see beyond the solver's tolerance.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <string>

#include "rig.hpp"
#include "spoolstep/hostsim/open_loop.hpp"
#include "step_window.hpp"

namespace spoolstep::hostsim::test {
namespace {

using core::ValveCentre;
using core::ValveKind;

// Cubic Hermite interpolation reproduces any cubic exactly (its defining
// property; common practice, no source).
TEST(StepWindow, HermiteInterpolationIsExactForACubic) {
  auto y = [](double t) { return 1.0 + 2.0 * t + 0.3 * t * t - 0.2 * t * t * t; };
  auto dy = [](double t) { return 2.0 + 0.6 * t - 0.6 * t * t; };
  StepWindow w({1e-6}, 1e-6);
  const double t0 = 0.0, t1 = 0.5;
  double v = y(t0);
  w.start(t0, &v);
  v = y(t1);
  w.add(t1, &v);
  int slopes = 0;
  auto rhs = [&](double t, const double*, double* f) {
    ++slopes;
    f[0] = dy(t);
  };
  for (double t : {0.0, 0.05, 0.25, 0.37, 0.5}) {
    double out = 0.0;
    w.interpolate(t, rhs, &out);
    EXPECT_NEAR(out, y(t), 1e-12) << "t = " << t;
  }
  EXPECT_EQ(slopes, 2) << "each point's slope is evaluated once";
  EXPECT_FALSE(w.linear_between(0));
}

TEST(StepWindow, StepPointsAreReturnedExactlyAndVisitedOnce) {
  StepWindow w({1e-6}, 1e-6);
  const double ts[] = {0.0, 0.001, 0.003, 0.004};
  for (const double t : ts) {
    const double v = 10.0 * t;
    if (t == 0.0) {
      w.start(t, &v);
    } else {
      w.add(t, &v);
    }
  }
  auto no_rhs = [](double, const double*, double*) { ADD_FAILURE() << "a step point needs no slope"; };
  double out = -1.0;
  w.interpolate(0.003, no_rhs, &out);
  EXPECT_EQ(out, 0.03);
  int visits = 0;
  w.visit_points(0.001, 0.003, [&](const double* y) {
    ++visits;
    EXPECT_EQ(*y, 0.03);  // (0.001, 0.003]: only the point at 0.003
  });
  EXPECT_EQ(visits, 1);
}

// A step across a stiff transient (y relaxes from 1 to 0 with a time
// constant of a hundredth of the step): the slopes at the ends (-100 and 0
// per step length) do not fit the change (-1), and the cubic through them
// would dip to about -14 inside the step. The window falls back to the
// straight line, which stays between the ends.
TEST(StepWindow, StepAcrossAStiffTransientIsInterpolatedBetweenItsEnds) {
  StepWindow w({1e-6}, 1e-6);
  double v = 1.0;
  w.start(0.0, &v);
  v = 0.0;
  w.add(1.0, &v);
  auto rhs = [](double, const double* y, double* f) { f[0] = -100.0 * y[0]; };
  for (double t = 0.05; t < 1.0; t += 0.05) {
    double out = 0.0;
    w.interpolate(t, rhs, &out);
    EXPECT_GE(out, 0.0) << "t = " << t;
    EXPECT_LE(out, 1.0) << "t = " << t;
  }
  EXPECT_TRUE(w.linear_between(0));
}

struct RunFigures {
  double worst_x_mm = 0.0;
  double worst_p_rms_bar = 0.0;
};

RunFigures compare(const Trace& a, const Trace& b) {
  RunFigures r;
  EXPECT_EQ(a.rows.size(), b.rows.size());
  for (const char* col : {"press_cyl.x_mm", "clamp_cyl.x_mm"}) {
    const auto sa = a.series(col), sb = b.series(col);
    for (std::size_t i = 0; i < sa.size() && i < sb.size(); ++i) {
      r.worst_x_mm = std::max(r.worst_x_mm, std::fabs(sa[i] - sb[i]));
    }
  }
  for (const char* col : {"pump.p_bar", "press_cyl.A.p_bar", "press_cyl.B.p_bar", "clamp_cyl.A.p_bar"}) {
    const auto sa = a.series(col), sb = b.series(col);
    double sq = 0.0;
    for (std::size_t i = 0; i < sa.size() && i < sb.size(); ++i) sq += (sa[i] - sb[i]) * (sa[i] - sb[i]);
    r.worst_p_rms_bar = std::max(r.worst_p_rms_bar, std::sqrt(sq / static_cast<double>(sa.size())));
  }
  return r;
}

// The press cycle with windows against the same cycle integrated period by
// period at 100x tighter tolerances: the windows stay within the accuracy
// the reference check asks of the model (positions 0.5 mm, pressure RMS
// 1 % of the 180 bar relief), and they do save steps.
TEST(PlantWindows, PressCycleWithWindowsMatchesTightPeriodByPeriodRun) {
  Trace traces[3];
  std::size_t steps[3] = {0, 0, 0};
  for (int m = 0; m < 3; ++m) {
    nlohmann::json plant = demo_plant_json();
    if (m == 1) plant["solver"] = {{"rtol", 1e-5}, {"atol", 1e-4}, {"velocity_atol_mm_s", 1e-3}, {"max_window_periods", 1}};
    if (m == 2) plant["solver"] = {{"max_window_periods", 1}};
    auto p = build(Rig{demo_machine(), plant});
    ASSERT_TRUE(p);
    ASSERT_TRUE(run_open_loop(*p, demo_press_cycle(), 1e-3, traces[m]));
    steps[m] = p->solver_stats().accepted;
  }
  const RunFigures f = compare(traces[0], traces[1]);
  std::printf("[ figure   ] windows vs tight period by period: max position difference %.4f mm, "
              "worst pressure RMS %.3f bar; steps: %zu with windows, %zu period by period\n",
              f.worst_x_mm, f.worst_p_rms_bar, steps[0], steps[2]);
  EXPECT_LT(f.worst_x_mm, 0.5);
  EXPECT_LT(f.worst_p_rms_bar, 1.8);
  EXPECT_LT(static_cast<double>(steps[0]), 0.8 * static_cast<double>(steps[2])) << "the windows saved few steps";
}

// Odeint's rosenbrock4 (order 4) steps across the pressure collapse when
// the press lands (3.81 s in the demo cycle) in one long step; a cubic
// through its ends once showed a 201 bar peak in the clamp's through
// passage that neither the period-by-period run nor the scipy reference
// has (185.5 bar). Peaks with windows stay within 2 % of those without.
TEST(PlantWindows, LongStepAcrossATransientInventsNoPeak) {
  Trace traces[2];
  for (int m = 0; m < 2; ++m) {
    nlohmann::json plant = demo_plant_json();
    plant["solver"] = {{"method", "rosenbrock4"}, {"max_window_periods", m == 0 ? 16 : 1}};
    auto p = build(Rig{demo_machine(), plant});
    ASSERT_TRUE(p);
    ASSERT_TRUE(run_open_loop(*p, demo_press_cycle(), 1e-3, traces[m]));
  }
  for (std::size_t c = 0; c < traces[1].names.size(); ++c) {
    const std::string& name = traces[1].names[c];
    if (name.size() < 6 || name.compare(name.size() - 6, 6, ".p_bar") != 0) continue;
    const auto a = traces[0].series(name), b = traces[1].series(name);
    const double peak_windows = *std::max_element(a.begin(), a.end());
    const double peak_periods = *std::max_element(b.begin(), b.end());
    EXPECT_NEAR(peak_windows, peak_periods, 0.02 * peak_periods) << name;
  }
}

// A command given after a long quiet stretch (the window then reaches many
// periods ahead) acts at the period it is given, as without windows.
TEST(PlantWindows, CommandInsideAWindowActsAtItsPeriod) {
  double x[2][400];
  for (int m = 0; m < 2; ++m) {
    Rig rig = single_cylinder(ValveKind::kSolenoid43SpringCentred, ValveCentre::kClosed);
    rig.plant["cylinders"][0]["viscous_n_s_m"] = 20000;
    rig.plant["solver"] = {{"max_window_periods", m == 0 ? 16 : 1}};
    auto p = build(rig);
    ASSERT_TRUE(p);
    for (int i = 0; i < 400; ++i) {
      if (i == 123) {
        ASSERT_TRUE(p->set_spool_target("f", 1.0));
      }
      if (i == 301) {
        ASSERT_TRUE(p->set_spool_target("f", 0.0));
      }
      ASSERT_TRUE(p->advance(1e-3));
      x[m][i] = p->cylinder_position("cyl");
    }
  }
  // Still until the command, then moving from the next period on.
  EXPECT_NEAR(x[0][122], x[0][0], 1e-6);
  EXPECT_GT(x[0][126], x[0][122] + 0.1e-3);
  for (int i = 0; i < 400; ++i) EXPECT_NEAR(x[0][i], x[1][i], 0.05e-3) << "period " << i;
}

// A limit switch passed at speed switches in the same period with and
// without windows: it is sampled at every scan, not only at step points.
TEST(PlantWindows, LimitSwitchSwitchesInTheSamePeriodInsideAWindow) {
  int switched_at[2] = {-1, -1};
  for (int m = 0; m < 2; ++m) {
    Rig rig = single_cylinder(ValveKind::kSolenoid43SpringCentred, ValveCentre::kClosed);
    rig.plant["cylinders"][0]["viscous_n_s_m"] = 20000;
    rig.plant["sensors"] = nlohmann::json::parse(
        R"([{"kind": "limit_switch", "cylinder": "cyl", "at_mm": 200, "active": "above", "hysteresis_mm": 5, "input": "at_end"}])");
    rig.plant["solver"] = {{"max_window_periods", m == 0 ? 16 : 1}};
    auto p = build(rig);
    ASSERT_TRUE(p);
    ASSERT_TRUE(p->set_spool_target("f", 1.0));
    for (int i = 0; i < 1500 && switched_at[m] < 0; ++i) {
      ASSERT_TRUE(p->advance(1e-3));
      core::InputImage in{};
      p->read_inputs(in);
      if (in.digital[0]) switched_at[m] = i;
    }
  }
  ASSERT_GE(switched_at[1], 0) << "the rod never reached the switch";
  EXPECT_EQ(switched_at[0], switched_at[1]);
}

TEST(PlantWindows, FractionalWindowLengthIsRejected) {
  Rig rig = single_cylinder(ValveKind::kSolenoid43SpringCentred, ValveCentre::kClosed);
  rig.plant["solver"] = {{"max_window_periods", 2.5}};
  auto res = build_plant(rig.plant, rig.machine, "rig.json");
  auto* errors = std::get_if<std::vector<PlantError>>(&res);
  ASSERT_NE(errors, nullptr);
  EXPECT_EQ(errors->front().json_path, "/plant/solver/max_window_periods");
  EXPECT_NE(errors->front().reason.find("whole number"), std::string::npos);
}

}  // namespace
}  // namespace spoolstep::hostsim::test
