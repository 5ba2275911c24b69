// Integration windows: in a quiet stretch the plant integrates several scan
// periods at once and reads the scans in between off the step points
// (hostsim/src/step_window.hpp, Plant::advance). These tests pin that the
// windows change nothing a scan can see beyond the solver's tolerance, and
// that every change of command, fault or state drops a window at once.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <string>
#include <vector>

#include "rig.hpp"
#include "spoolstep/hostsim/open_loop.hpp"
#include "step_window.hpp"

namespace spoolstep::hostsim::test {
namespace {

using core::ValveCentre;
using core::ValveKind;

TEST(StepWindow, ReadsStepPointsExactlyAndStraightLinesBetween) {
  StepWindow w(2);
  const double ts[] = {0.0, 0.001, 0.003, 0.004};
  for (const double t : ts) {
    const double v[2] = {10.0 * t, -5.0 * t * t};
    if (t == 0.0) {
      w.start(t, v);
    } else {
      w.add(t, v);
    }
  }
  std::vector<double> visited;
  auto visit = [&visited](const double* y) { visited.push_back(y[0]); };
  double out[2] = {0.0, 0.0};
  w.read_up_to(0.0005, visit, out);
  EXPECT_TRUE(visited.empty());
  EXPECT_DOUBLE_EQ(out[0], 0.005);
  EXPECT_DOUBLE_EQ(out[1], -2.5e-6);  // half way between 0 and -5e-6
  w.read_up_to(0.003, visit, out);
  ASSERT_EQ(visited.size(), 2u);  // the points at 1 ms and 3 ms, each once
  EXPECT_EQ(visited[0], 0.01);
  EXPECT_EQ(visited[1], 0.03);
  EXPECT_EQ(out[0], 0.03);  // a step point itself, not a mix
  w.read_up_to(0.0035, visit, out);
  EXPECT_EQ(visited.size(), 2u);
  EXPECT_DOUBLE_EQ(out[0], 0.035);
  w.read_up_to(0.004, visit, out);
  EXPECT_EQ(visited.size(), 3u);
  EXPECT_EQ(out[0], 0.04);
}

struct Difference {
  double worst_x_mm = 0.0;      // largest position difference
  double worst_p_rms_bar = 0.0; // largest pressure RMS difference over the pressure columns
};

Difference compare(const Trace& a, const Trace& b) {
  Difference d;
  EXPECT_EQ(a.rows.size(), b.rows.size());
  for (const std::string& name : a.names) {
    const bool position = name.size() > 5 && name.compare(name.size() - 5, 5, ".x_mm") == 0;
    const bool pressure = name.size() > 6 && name.compare(name.size() - 6, 6, ".p_bar") == 0;
    if (!position && !pressure) continue;
    const auto sa = a.series(name), sb = b.series(name);
    double sq = 0.0;
    for (std::size_t i = 0; i < sa.size() && i < sb.size(); ++i) {
      const double e = sa[i] - sb[i];
      sq += e * e;
      if (position) d.worst_x_mm = std::max(d.worst_x_mm, std::fabs(e));
    }
    if (pressure) d.worst_p_rms_bar = std::max(d.worst_p_rms_bar, std::sqrt(sq / static_cast<double>(sa.size())));
  }
  return d;
}

Trace press_cycle(const nlohmann::json& solver, std::size_t* steps = nullptr) {
  nlohmann::json plant = demo_plant_json();
  if (!solver.is_null()) plant["solver"] = solver;
  auto p = build(Rig{demo_machine(), plant});
  Trace trace;
  if (!p) return trace;
  EXPECT_TRUE(run_open_loop(*p, demo_press_cycle(), 1e-3, trace));
  if (steps != nullptr) *steps = p->solver_stats().accepted;
  return trace;
}

// The demo press cycle (4.5 s) with windows, against the same cycle
// integrated period by period at the same tolerances and at 100x tighter
// ones. Against the tight run the windows must stay within the accuracy
// the reference check asks of the model (positions 0.5 mm, pressure RMS
// 1 % of the 180 bar relief); against the same tolerances period by
// period, within what the tolerance allows (measured: 0.004 mm, 0.02 bar).
TEST(PlantWindows, PressCycleWithWindowsStaysWithinTheTolerance) {
  std::size_t steps_windows = 0, steps_periods = 0;
  const Trace windows = press_cycle(nullptr, &steps_windows);
  const Trace periods = press_cycle({{"max_window_periods", 1}}, &steps_periods);
  const Trace tight = press_cycle({{"rtol", 1e-5}, {"atol", 1e-4}, {"velocity_atol_mm_s", 1e-3}, {"max_window_periods", 1}});
  const Difference to_periods = compare(windows, periods);
  const Difference to_tight = compare(windows, tight);
  const Difference periods_to_tight = compare(periods, tight);
  std::printf("[ figure   ] windows vs period by period: %.4f mm, %.3f bar RMS; vs tight: %.4f mm, %.3f bar RMS "
              "(period by period vs tight: %.4f mm, %.3f bar RMS); steps %zu with windows, %zu without\n",
              to_periods.worst_x_mm, to_periods.worst_p_rms_bar, to_tight.worst_x_mm, to_tight.worst_p_rms_bar,
              periods_to_tight.worst_x_mm, periods_to_tight.worst_p_rms_bar, steps_windows, steps_periods);
  EXPECT_LT(to_tight.worst_x_mm, 0.5);
  EXPECT_LT(to_tight.worst_p_rms_bar, 1.8);
  EXPECT_LT(to_periods.worst_x_mm, 0.05);
  EXPECT_LT(to_periods.worst_p_rms_bar, 0.2);
  EXPECT_LT(static_cast<double>(steps_windows), 0.8 * static_cast<double>(steps_periods))
      << "the windows saved few steps";
}

// Odeint's rosenbrock4 (order 4) takes steps too long to read between
// them by straight lines: it integrates period by period whatever the
// setting, so its runs are the same bit for bit.
TEST(PlantWindows, Rosenbrock4IntegratesPeriodByPeriod) {
  const Trace a = press_cycle({{"method", "rosenbrock4"}, {"max_window_periods", 16}});
  const Trace b = press_cycle({{"method", "rosenbrock4"}, {"max_window_periods", 1}});
  ASSERT_EQ(a.rows.size(), b.rows.size());
  for (std::size_t i = 0; i < a.rows.size(); ++i) ASSERT_EQ(a.rows[i], b.rows[i]) << "row " << i;
}

// Closed centre by default. (Closed in, with both chambers cavitated, the
// piston floats on vapour and its position is barely determined: runs at
// the default tolerance differ there by 0.2 mm whatever the windows do, so
// the tests that compare long coasting stretches use a float centre.)
Rig damped_rig(double viscous_n_s_m = 20000, ValveCentre centre = ValveCentre::kClosed) {
  Rig rig = single_cylinder(ValveKind::kSolenoid43SpringCentred, centre);
  rig.plant["cylinders"][0]["viscous_n_s_m"] = viscous_n_s_m;
  rig.plant["sensors"] = nlohmann::json::parse(
      R"([{"kind": "limit_switch", "cylinder": "cyl", "at_mm": 200, "active": "above", "hysteresis_mm": 5, "input": "at_end"}])");
  return rig;
}

// One run of the rig, period by period (windows 1) or with windows (16):
// `act(i, plant)` runs before period i; positions after every period.
template <class Act>
std::vector<double> rig_run(Rig rig, int window_periods, int periods, Act&& act, double dt = 1e-3) {
  rig.plant["solver"] = {{"max_window_periods", window_periods}};
  auto p = build(rig);
  std::vector<double> x;
  if (!p) return x;
  for (int i = 0; i < periods; ++i) {
    act(i, *p);
    EXPECT_TRUE(p->advance(dt)) << "period " << i;
    x.push_back(p->cylinder_position("cyl"));
  }
  return x;
}

// Runs the rig with windows and period by period, the same events in
// both, and fails where the positions differ by more than 0.05 mm. Returns
// the positions with windows.
template <class Act>
std::vector<double> expect_windows_change_nothing(const Rig& rig, int periods, Act&& act, double dt = 1e-3) {
  const auto with = rig_run(rig, 16, periods, act, dt);
  const auto without = rig_run(rig, 1, periods, act, dt);
  EXPECT_EQ(with.size(), static_cast<std::size_t>(periods));
  for (std::size_t i = 0; i < with.size() && i < without.size(); ++i) {
    EXPECT_NEAR(with[i], without[i], 0.05e-3) << "dt " << dt << ", period " << i;
  }
  return with;
}

// A command given after a long quiet stretch (the window then reaches many
// periods ahead) acts at the period it is given, as without windows.
TEST(PlantWindows, CommandInsideAWindowActsAtItsPeriod) {
  const auto x = expect_windows_change_nothing(damped_rig(), 400, [](int i, Plant& p) {
    switch (i) {
      case 123: EXPECT_TRUE(p.set_spool_target("f", 1.0)); break;
      case 301: EXPECT_TRUE(p.set_spool_target("f", 0.0)); break;
      default: break;
    }
  });
  ASSERT_EQ(x.size(), 400u);
  EXPECT_NEAR(x[122], x[0], 1e-6);     // still until the command
  EXPECT_GT(x[126], x[122] + 0.1e-3);  // moving from the next periods on
}

// A state set from outside inside a window (an initial condition for a
// test, say) is where the plant goes on from, not the window's old path.
TEST(PlantWindows, StateSetInsideAWindowIsKept) {
  const auto x = expect_windows_change_nothing(damped_rig(20000, ValveCentre::kFloat), 400, [](int i, Plant& p) {
    switch (i) {
      case 10: EXPECT_TRUE(p.set_spool_target("f", 1.0)); break;
      case 60: EXPECT_TRUE(p.set_spool_target("f", 0.0)); break;
      case 237: EXPECT_TRUE(p.set_cylinder_state("cyl", 0.3, 0.0)); break;
      case 301: EXPECT_TRUE(p.set_node_pressure("cyl.A", 50e5)); break;
      default: break;
    }
  });
  ASSERT_EQ(x.size(), 400u);
  EXPECT_NEAR(x[237], 0.3, 1e-3);
}

// Faults injected and cleared inside a window change the equations: the
// window is dropped and the fault acts at its period.
TEST(PlantWindows, FaultsInsideAWindowActAtTheirPeriod) {
  expect_windows_change_nothing(damped_rig(20000, ValveCentre::kFloat), 600, [](int i, Plant& p) {
    switch (i) {
      case 10: EXPECT_TRUE(p.set_spool_target("f", 1.0)); break;
      case 211: EXPECT_TRUE(p.inject({FaultKind::kLoadChange, "cyl", 20000.0})); break;
      case 333: EXPECT_TRUE(p.inject({FaultKind::kSealLeak, "cyl", 500.0})); break;
      case 457: p.clear_faults(); break;
      default: break;
    }
  });
}

// Periods of different lengths (a late scan, say) read the window where
// they end.
TEST(PlantWindows, UnevenPeriodsReadTheWindowWhereTheyEnd) {
  for (const double dt : {0.5e-3, 2e-3, 0.7e-3}) {
    expect_windows_change_nothing(
        damped_rig(), 300,
        [](int i, Plant& p) {
          if (i == 50) {
            EXPECT_TRUE(p.set_spool_target("f", 1.0));
          }
        },
        dt);
  }
}

TEST(PlantWindows, NoTimeDoesNothingAndNegativeTimeIsRefused) {
  auto p = build(damped_rig());
  ASSERT_TRUE(p);
  ASSERT_TRUE(p->set_spool_target("f", 1.0));
  for (int i = 0; i < 20; ++i) ASSERT_TRUE(p->advance(1e-3));
  const double t = p->time_s();
  const std::vector<double> y = p->state();
  EXPECT_TRUE(p->advance(0.0));
  EXPECT_FALSE(p->advance(-1e-3));
  EXPECT_FALSE(p->advance(std::nan("")));
  EXPECT_EQ(p->time_s(), t);
  EXPECT_EQ(p->state(), y);
}

// A limit switch passed at speed switches in the same period with and
// without windows: it is sampled at every scan, not only at step points.
// Also with no damping at all, where the rod runs into the end stop.
TEST(PlantWindows, LimitSwitchSwitchesInTheSamePeriodInsideAWindow) {
  for (const double viscous : {20000.0, 0.0}) {
    int switched_at[2] = {-1, -1};
    for (int m = 0; m < 2; ++m) {
      Rig rig = damped_rig(viscous);
      rig.plant["sensors"][0]["at_mm"] = viscous > 0.0 ? 200 : 495;
      rig.plant["solver"] = {{"max_window_periods", m == 0 ? 16 : 1}};
      auto p = build(rig);
      ASSERT_TRUE(p);
      ASSERT_TRUE(p->set_spool_target("f", 1.0));
      for (int i = 0; i < 4000 && switched_at[m] < 0; ++i) {
        ASSERT_TRUE(p->advance(1e-3));
        core::InputImage in{};
        p->read_inputs(in);
        if (in.digital[0]) switched_at[m] = i;
      }
    }
    ASSERT_GE(switched_at[1], 0) << "the rod never reached the switch (viscous " << viscous << ")";
    std::printf("[ figure   ] viscous %.0f N s/m: switch at period %d with windows, %d without\n", viscous,
                switched_at[0], switched_at[1]);
    EXPECT_NEAR(switched_at[0], switched_at[1], viscous > 0.0 ? 0 : 1) << "viscous " << viscous;
  }
}

TEST(PlantWindows, FractionalWindowLengthIsRejected) {
  Rig rig = damped_rig();
  rig.plant["solver"] = {{"max_window_periods", 2.5}};
  auto res = build_plant(rig.plant, rig.machine, "rig.json");
  auto* errors = std::get_if<std::vector<PlantError>>(&res);
  ASSERT_NE(errors, nullptr);
  EXPECT_EQ(errors->front().json_path, "/plant/solver/max_window_periods");
  EXPECT_NE(errors->front().reason.find("whole number"), std::string::npos);
}

}  // namespace
}  // namespace spoolstep::hostsim::test
