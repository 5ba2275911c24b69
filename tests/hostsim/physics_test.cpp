// The plant against the outside world: speeds, forces, centre flow paths,
// hydraulic spring, natural frequency, relief, orifice, pump, oil balance.
// Each check names its source (shared check-values.md sections).
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <vector>

#include "rig.hpp"
#include "spoolstep/hostsim/network.hpp"

namespace spoolstep::hostsim::test {
namespace {

using core::ValveCentre;
using core::ValveKind;

// Viscous friction damps the start-up ringing (and the cavitation it causes
// without any damping); it does not change the steady speed, which
// continuity alone sets.
Rig damped(ValveCentre centre) {
  Rig rig = single_cylinder(ValveKind::kSolenoid43SpringCentred, centre);
  rig.plant["cylinders"][0]["viscous_n_s_m"] = 20000;
  return rig;
}

TEST(PlantSpeeds, ExtensionSpeedIsPumpFlowOverPistonArea) {
  auto p = build(damped(ValveCentre::kClosed));
  ASSERT_TRUE(p);
  ASSERT_TRUE(p->set_spool_target("f", 1.0));
  run(*p, 0.3);
  const double x1 = p->cylinder_position("cyl");
  run(*p, 1.0);
  // Mean speed (the undamped mass rings about it): v = Q/A_A = 0.16040 m/s
  // (check-values 5.2 [DERIVED] from 4.11/continuity).
  EXPECT_NEAR(p->cylinder_position("cyl") - x1, 0.16040, 0.16040 * 2e-3);
}

TEST(PlantSpeeds, RetractionSpeedIsPumpFlowOverAnnulusArea) {
  Rig rig = damped(ValveCentre::kClosed);
  rig.plant["cylinders"][0]["initial_position_mm"] = 450;
  auto p = build(rig);
  ASSERT_TRUE(p);
  ASSERT_TRUE(p->set_spool_target("f", -1.0));
  run(*p, 0.3);
  const double x1 = p->cylinder_position("cyl");
  run(*p, 1.0);
  // Mean speed: v = Q/A_B = 0.23817 m/s (check-values 5.2 [DERIVED]).
  EXPECT_NEAR(x1 - p->cylinder_position("cyl"), 0.23817, 0.23817 * 2e-3);
}

TEST(PlantSpeeds, RegenerativeCentreExtendsAtFlowOverRodArea) {
  Rig rig = damped(ValveCentre::kRegenerative);
  rig.plant["cylinders"][0]["initial_position_mm"] = 0;
  auto p = build(rig);
  ASSERT_TRUE(p);
  run(*p, 0.2);  // spool stays centred: P, A and B joined
  const double x1 = p->cylinder_position("cyl");
  run(*p, 0.5);
  // Mean speed v = Q/A_rod = 0.49122 m/s (check-values 5.2 / 4.11 [SRC] learnchannel-tv regenerative circuit).
  EXPECT_NEAR((p->cylinder_position("cyl") - x1) / 0.5, 0.49122, 0.49122 * 2e-3);
}

// Stall against a stiff workpiece with the relief at 157 bar + 0.1 bar per
// L/min: at 30 L/min the system pressure is 160 bar (check-values 5.2 uses
// p = 160 bar).
Rig stall_rig(ValveCentre centre) {
  Rig rig = damped(centre);
  rig.plant["relief"] = {{"cracking_bar", 157}, {"override_bar_per_l_min", 0.1}};
  rig.plant["cylinders"][0]["load"] = {{"contact", {{"at_mm", 120}, {"stiffness_n_mm", 100000}, {"damping_ratio", 1.0}}}};
  return rig;
}

double contact_force(const Plant& p) {
  return 100000e3 * (p.cylinder_position("cyl") - 0.120);
}

TEST(PlantForces, ExtensionStallForceIsPressureTimesPistonArea) {
  auto p = build(stall_rig(ValveCentre::kClosed));
  ASSERT_TRUE(p);
  ASSERT_TRUE(p->set_spool_target("f", 1.0));
  run(*p, 1.0);
  EXPECT_NEAR(p->node_pressure("cyl.A"), 160e5, 160e5 * 1e-3);
  // F = p A_A = 49 876 N at 160 bar (check-values 5.2 [DERIVED]).
  EXPECT_NEAR(contact_force(*p), 49876.0, 49876.0 * 3e-3);
}

TEST(PlantForces, RegenerativeStallForceIsPressureTimesRodArea) {
  auto p = build(stall_rig(ValveCentre::kRegenerative));
  ASSERT_TRUE(p);
  run(*p, 1.0);
  // F = p A_rod = 16 286 N at 160 bar (check-values 5.2 / 4.11 [SRC] learnchannel-tv).
  EXPECT_NEAR(contact_force(*p), 16286.0, 16286.0 * 3e-3);
}

TEST(PlantForces, RetractionForceAgainstEndStopIsPressureTimesAnnulusArea) {
  Rig rig = stall_rig(ValveCentre::kClosed);
  rig.plant["cylinders"][0]["initial_position_mm"] = 10;
  auto p = build(rig);
  ASSERT_TRUE(p);
  ASSERT_TRUE(p->set_spool_target("f", -1.0));
  run(*p, 1.0);
  // End stop stiffness 1e9 N/m (default): force = k * penetration.
  const double f = -1e9 * p->cylinder_position("cyl");
  // F = p A_B = 33 590 N at 160 bar (check-values 5.2 [DERIVED]).
  EXPECT_NEAR(f, 33590.0, 33590.0 * 3e-3);
}

TEST(PlantCentres, TandemCentrePumpPressureIsOnlyTheValveDrop) {
  auto p = build(single_cylinder(ValveKind::kSolenoid43SpringCentred, ValveCentre::kTandem));
  ASSERT_TRUE(p);
  run(*p, 0.5);
  // Centre passage = one full metering edge, rated 60 L/min at 5 bar per edge;
  // orifice equation (check-values 4.1, 4.2b [SRC]): 30 L/min -> 5 * (30/60)^2 = 1.25 bar.
  EXPECT_NEAR(p->node_pressure("pump"), 1.25e5, 1.25e5 * 1e-2);
  EXPECT_NEAR(p->cylinder_velocity("cyl"), 0.0, 1e-9);
}

Rig hanging_load(ValveCentre centre) {
  Rig rig = single_cylinder(ValveKind::kSolenoid43SpringCentred, centre);
  rig.plant["cylinders"][0]["initial_position_mm"] = 250;
  rig.plant["cylinders"][0]["load"] = {{"gravity", "extend"}};  // 500 kg hanging on the rod
  rig.plant["cylinders"][0]["viscous_n_s_m"] = 20000;           // so that the motion rings out
  if (centre == ValveCentre::kBleed) rig.plant["valves"][0]["bleed_orifice_mm2"] = 1.0;
  return rig;
}

TEST(PlantCentres, FloatCentreLetsTheLoadDriftUnderExternalForce) {
  auto p = build(hanging_load(ValveCentre::kFloat));
  ASSERT_TRUE(p);
  p->set_pump(false, false);
  run(*p, 0.2);
  // A and B open to T (check-values 4.19 [SRC]): nothing holds the weight.
  EXPECT_GT(p->cylinder_position("cyl") - 0.250, 0.01);
  EXPECT_GT(p->cylinder_velocity("cyl"), 0.05);
}

TEST(PlantCentres, ClosedCentreHoldsTheLoadWithoutLeakage) {
  auto p = build(hanging_load(ValveCentre::kClosed));
  ASSERT_TRUE(p);
  p->set_pump(false, false);
  run(*p, 0.3);  // the trapped oil compresses and the motion rings out
  const double x1 = p->cylinder_position("cyl");
  run(*p, 2.0);
  EXPECT_NEAR(p->cylinder_position("cyl"), x1, 1e-5);  // holds: under 0.01 mm in 2 s
  EXPECT_LT(x1 - 0.250, 1e-3);                         // settles by compression only
}

TEST(PlantCentres, ClosedCentreDriftsThroughSpoolLeakage) {
  Rig rig = hanging_load(ValveCentre::kClosed);
  rig.plant["valves"][0]["leak_mm2"] = 0.01;
  auto p = build(rig);
  ASSERT_TRUE(p);
  p->set_pump(false, false);
  run(*p, 0.3);
  const double x1 = p->cylinder_position("cyl");
  run(*p, 2.0);
  // Spool valves are not leak-tight (check-values 3.3 [SRC] sebhydro data sheet).
  EXPECT_GT(p->cylinder_position("cyl") - x1, 1e-4);
}

TEST(PlantCentres, OpenCentreUnloadsThePumpAndLetsTheLoadFloat) {
  auto p = build(hanging_load(ValveCentre::kOpen));
  ASSERT_TRUE(p);
  run(*p, 0.5);
  EXPECT_LT(p->node_pressure("pump"), 20e5);
  EXPECT_GT(p->cylinder_velocity("cyl"), 0.02);
}

// A mass moving out at v0 = 0.16040 m/s is stopped at mid-stroke by a
// centred closed-centre spool (check-values 5.10: friction, leakage and
// load zero; the A side cavitates).
double stop_peak_bar(ValveCentre centre) {
  Rig rig = single_cylinder(ValveKind::kSolenoid43SpringCentred, centre);
  rig.plant["cylinders"][0]["initial_position_mm"] = 250;
  if (centre == ValveCentre::kBleed) rig.plant["valves"][0]["bleed_orifice_mm2"] = 1.0;
  auto p = build(rig);
  if (!p) return 0.0;
  p->set_pump(false, false);
  EXPECT_TRUE(p->set_cylinder_state("cyl", 0.250, 0.16040));
  double peak = 0.0;
  for (int i = 0; i < 100; ++i) {
    for (int k = 0; k < 10; ++k) {
      EXPECT_TRUE(p->advance(1e-4));  // sampled every 0.1 ms to catch the peak
      peak = std::max(peak, p->node_pressure("cyl.B"));
    }
  }
  return peak / 1e5;
}

TEST(PlantDynamics, ClosedCentreStopPeakMatchesHydraulicSpring) {
  // dp = v0 sqrt(beta m / V_B) = 58.58 bar, V_B = 5.2484e-4 m^3
  // (check-values 4.9, 5.10 [DERIVED]); our V_B has 0.1 cm^3 dead volume more.
  const double peak = stop_peak_bar(ValveCentre::kClosed);
  std::printf("[ figure   ] closed-centre stop peak %.2f bar (hydraulic spring 58.58 bar)\n", peak);
  EXPECT_NEAR(peak, 58.58, 58.58 * 0.05);
}

TEST(PlantDynamics, BleedCentreStopPeakIsLowerThanClosedCentre) {
  const double closed = stop_peak_bar(ValveCentre::kClosed);
  const double bleed = stop_peak_bar(ValveCentre::kBleed);
  std::printf("[ figure   ] stop peak: closed centre %.2f bar, bleed centre (1 mm^2) %.2f bar\n", closed, bleed);
  EXPECT_LT(bleed, 0.9 * closed);
  EXPECT_GT(bleed, 1.0);
}

TEST(PlantDynamics, OscillationAfterLoadStepIsAtHydraulicNaturalFrequency) {
  // Mid-stroke, no dead volume (0.1 cm^3 here), m = 500 kg, beta = 1.4e9:
  // f_h = 38.470 Hz (check-values 4.8 [SRC] Stringer; 5.8 [DERIVED]).
  auto p = build(single_cylinder(ValveKind::kSolenoid43SpringCentred, ValveCentre::kClosed));
  ASSERT_TRUE(p);
  p->set_pump(false, false);
  ASSERT_TRUE(p->set_cylinder_state("cyl", 0.250, 0.0));
  // Preload both chambers in force balance so neither side cavitates.
  ASSERT_TRUE(p->set_node_pressure("cyl.B", 100e5));
  ASSERT_TRUE(p->set_node_pressure("cyl.A", 100e5 * kAreaB / kAreaA));
  ASSERT_TRUE(p->inject({FaultKind::kLoadChange, "cyl", 2000.0}));
  std::vector<double> t, x;
  for (int i = 0; i < 4000; ++i) {
    ASSERT_TRUE(p->advance(1e-4));
    t.push_back(p->time_s());
    x.push_back(p->cylinder_position("cyl"));
  }
  // Undamped: oscillation about the midpoint of its range.
  const double mid = 0.5 * (*std::max_element(x.begin(), x.end()) + *std::min_element(x.begin(), x.end()));
  std::vector<double> up;  // upward zero crossings, linearly interpolated
  for (std::size_t i = 1; i < x.size(); ++i) {
    if (x[i - 1] < mid && x[i] >= mid) {
      up.push_back(t[i - 1] + (mid - x[i - 1]) / (x[i] - x[i - 1]) * (t[i] - t[i - 1]));
    }
  }
  ASSERT_GE(up.size(), 10u);
  const double f = static_cast<double>(up.size() - 1) / (up.back() - up.front());
  std::printf("[ figure   ] oscillation %.3f Hz (hydraulic natural frequency 38.470 Hz)\n", f);
  EXPECT_NEAR(f, 38.470, 38.470 * 0.05);
  EXPECT_NEAR(f, 38.470, 38.470 * 0.01) << "looser than expected, though within the 5 % limit";
}

TEST(PlantRelief, DeadHeadedPumpPressureIsCrackingPlusOverride) {
  Rig rig = single_cylinder(ValveKind::kSolenoid43SpringCentred, ValveCentre::kClosed);
  rig.plant["relief"] = {{"cracking_bar", 180}, {"override_bar_per_l_min", 0.5}};
  auto p = build(rig);
  ASSERT_TRUE(p);
  run(*p, 0.5);
  // Cracking pressure plus override gradient times flow: 180 + 0.5 * 30 = 195 bar.
  EXPECT_NEAR(p->node_pressure("pump"), 195e5, 195e5 * 1e-3);
  EXPECT_NEAR(p->snapshot().get("relief.q_l_min"), 30.0, 0.05);
}

TEST(PlantOrifice, FlowFollowsTheOrificeEquation) {
  const double area = 7.0686e-6;  // 3 mm round
  const double l_min = 60000.0;
  // 12.404 / 27.737 / 39.226 L/min at 10 / 50 / 100 bar, Cd 0.61
  // (check-values 5.3 [DERIVED] from 4.1 [SRC] Rabie eq. 2.36).
  EXPECT_NEAR(orifice_flow(0.61, area, 10e5, 870, 1e4) * l_min, 12.404, 12.404 * 1e-4);
  EXPECT_NEAR(orifice_flow(0.61, area, 50e5, 870, 1e4) * l_min, 27.737, 27.737 * 1e-4);
  EXPECT_NEAR(orifice_flow(0.61, area, 100e5, 870, 1e4) * l_min, 39.226, 39.226 * 1e-4);
  EXPECT_NEAR(orifice_flow(0.61, area, -10e5, 870, 1e4) * l_min, -12.404, 12.404 * 1e-4);
}

TEST(PlantOrifice, LaminarBlendIsContinuousWithFiniteSlopeAtZero) {
  const double a = 1e-6, pt = 1e4;
  const double inside = orifice_flow(0.61, a, pt * (1 - 1e-9), 870, pt);
  const double outside = orifice_flow(0.61, a, pt * (1 + 1e-9), 870, pt);
  EXPECT_NEAR(inside, outside, std::fabs(outside) * 1e-6);
  const double h = 1.0;
  const double slope0 = (orifice_flow(0.61, a, h, 870, pt) - orifice_flow(0.61, a, -h, 870, pt)) / (2 * h);
  EXPECT_TRUE(std::isfinite(slope0));
  EXPECT_GT(slope0, 0.0);
  // Slope just inside and outside the transition agree (C1).
  const double d = 1e-3 * pt;
  const double s_in = (orifice_flow(0.61, a, pt, 870, pt) - orifice_flow(0.61, a, pt - d, 870, pt)) / d;
  const double s_out = (orifice_flow(0.61, a, pt + d, 870, pt) - orifice_flow(0.61, a, pt, 870, pt)) / d;
  EXPECT_NEAR(s_in, s_out, std::fabs(s_out) * 2e-3);
}

TEST(PlantOrifice, FixedOrificeInTheNetworkSettlesAtTheOrificePressure) {
  MachineBuilder m("orifice_rig");
  Rig rig;
  rig.machine = m.config();
  // Pump 12.404 cm^3 x 1000 rpm = 12.404 L/min through a 3 mm orifice, Cd 0.61:
  // 10 bar (check-values 5.3 [DERIVED]).
  rig.plant = nlohmann::json::parse(R"({
    "pump": {"displacement_cm3": 12.404, "speed_rpm": 1000, "volumetric_efficiency": 1.0, "line_volume_cm3": 100},
    "relief": {"cracking_bar": 100},
    "orifices": [{"name": "jet", "from": "pump", "to": "tank", "diameter_mm": 3.0, "discharge_coefficient": 0.61}]
  })");
  auto p = build(rig);
  ASSERT_TRUE(p);
  run(*p, 0.3);
  EXPECT_NEAR(p->node_pressure("pump"), 10e5, 10e5 * 2e-3);
}

TEST(PlantPump, FlowIsDisplacementTimesSpeedTimesEfficiency) {
  const Rig rig{demo_machine(), demo_plant_json()};
  auto p = build(rig);
  ASSERT_TRUE(p);
  p->set_pump(true, false);
  // 20 cm^3 x 1450 rpm x 0.95 = 27.55 L/min (check-values 5.11 / 4.12 [SRC] machinecalc).
  EXPECT_NEAR(p->snapshot().get("pump.q_l_min"), 27.55, 1e-9);
}

TEST(PlantPump, PressureCompensatedPumpHoldsItsSetting) {
  Rig rig = single_cylinder(ValveKind::kSolenoid43SpringCentred, ValveCentre::kClosed);
  rig.plant["pump"]["compensator"] = {{"setting_bar", 150}, {"band_bar", 5}};
  auto p = build(rig);
  ASSERT_TRUE(p);
  run(*p, 0.5);
  // Dead-headed: the compensator, not the relief (250 bar), sets the pressure.
  EXPECT_GT(p->node_pressure("pump"), 145e5);
  EXPECT_LT(p->node_pressure("pump"), 150e5);
  EXPECT_LT(p->snapshot().get("relief.q_l_min"), 1e-3);
}

TEST(PlantBalance, OilMassBalanceHoldsOverThePressCycle) {
  const Rig rig{demo_machine(), demo_plant_json()};
  auto p = build(rig);
  ASSERT_TRUE(p);
  Trace trace;
  ASSERT_TRUE(run_open_loop(*p, demo_press_cycle(), 1e-3, trace));
  const OilBalance b = p->oil_balance();
  EXPECT_GT(b.pumped_m3, 1e-3);
  // pumped = returned + displaced + compressed, to 1e-6 relative.
  std::printf("[ figure   ] oil balance relative residual %.1e\n", b.relative_residual());
  EXPECT_LT(std::fabs(b.relative_residual()), 1e-6);
}

TEST(PlantEndStops, FullSpeedIntoTheEndStopStaysBounded) {
  Rig rig = single_cylinder(ValveKind::kSolenoid43SpringCentred, ValveCentre::kClosed);
  rig.plant["cylinders"][0]["initial_position_mm"] = 450;
  auto p = build(rig);
  ASSERT_TRUE(p);
  ASSERT_TRUE(p->set_spool_target("f", 1.0));
  run(*p, 1.0);
  EXPECT_GT(p->cylinder_position("cyl"), 0.4999);
  EXPECT_LT(p->cylinder_position("cyl"), 0.5001);
  EXPECT_NEAR(p->cylinder_velocity("cyl"), 0.0, 1e-4);
  EXPECT_NEAR(p->node_pressure("cyl.A"), 250e5 + 0.1 * 30 * 1e5, 1e5);
}

}  // namespace
}  // namespace spoolstep::hostsim::test

namespace spoolstep::hostsim::test {
namespace {

// The purpose-written ROS2 (default) and Boost.Odeint's rosenbrock4 agree on
// the demo press cycle: two independent integrators of the same equations.
TEST(PlantSolvers, Ros2AgreesWithOdeintRosenbrock4OnThePressCycle) {
  Trace traces[2];
  const char* methods[2] = {"ros2", "rosenbrock4"};
  for (int m = 0; m < 2; ++m) {
    nlohmann::json plant = demo_plant_json();
    plant["solver"] = {{"method", methods[m]}};
    auto p = build(Rig{demo_machine(), plant});
    ASSERT_TRUE(p);
    ASSERT_TRUE(run_open_loop(*p, demo_press_cycle(), 1e-3, traces[m]));
  }
  ASSERT_EQ(traces[0].rows.size(), traces[1].rows.size());
  double worst_x = 0.0, worst_p = 0.0;
  for (const char* col : {"press_cyl.x_mm", "clamp_cyl.x_mm"}) {
    const auto a = traces[0].series(col), b = traces[1].series(col);
    for (std::size_t i = 0; i < a.size(); ++i) worst_x = std::max(worst_x, std::fabs(a[i] - b[i]));
  }
  for (const char* col : {"pump.p_bar", "press_cyl.A.p_bar", "clamp_cyl.A.p_bar"}) {
    const auto a = traces[0].series(col), b = traces[1].series(col);
    double sq = 0.0;
    for (std::size_t i = 0; i < a.size(); ++i) sq += (a[i] - b[i]) * (a[i] - b[i]);
    worst_p = std::max(worst_p, std::sqrt(sq / static_cast<double>(a.size())));
  }
  std::printf("[ figure   ] ros2 vs rosenbrock4: max position difference %.4f mm, worst pressure RMS %.3f bar\n",
              worst_x, worst_p);
  EXPECT_LT(worst_x, 0.5);
  EXPECT_LT(worst_p, 1.8);  // 1 % of the 180 bar relief setting
}

// Same inputs, same outputs, bit for bit: the integrator's reuse of
// Jacobians and factors depends only on the run's own history.
TEST(PlantSolvers, Ros2IsDeterministic) {
  Trace traces[2];
  for (Trace& trace : traces) {
    auto p = build(Rig{demo_machine(), demo_plant_json()});
    ASSERT_TRUE(p);
    ASSERT_TRUE(run_open_loop(*p, demo_press_cycle(), 1e-3, trace));
  }
  ASSERT_EQ(traces[0].rows.size(), traces[1].rows.size());
  for (std::size_t i = 0; i < traces[0].rows.size(); ++i) {
    ASSERT_EQ(traces[0].rows[i], traces[1].rows[i]) << "row " << i;
  }
}

}  // namespace
}  // namespace spoolstep::hostsim::test

namespace spoolstep::hostsim::test {
namespace {

// A harsh start: the spool opens in 5 ms on a 500 kg mass with almost no
// dead volume, the rod overshoots, the A side cavitates and the cavity
// closes with a pressure spike, several times. A reused Jacobian that
// still sees liquid while the node cavitates once made the cavity close
// early at the default tolerance; the Jacobian check catches that.
TEST(PlantSolvers, DefaultToleranceFollowsCavitationOnStartUp) {
  double x[2] = {0.0, 0.0};
  for (int m = 0; m < 2; ++m) {
    Rig rig = single_cylinder(ValveKind::kSolenoid43SpringCentred, ValveCentre::kClosed);
    rig.plant["cylinders"][0]["viscous_n_s_m"] = 20000;
    if (m == 1) rig.plant["solver"] = {{"method", "rosenbrock4"}, {"rtol", 1e-7}, {"atol", 1e-7}};
    auto p = build(rig);
    ASSERT_TRUE(p);
    ASSERT_TRUE(p->set_spool_target("f", 1.0));
    run(*p, 0.3);
    x[m] = p->cylinder_position("cyl");
  }
  EXPECT_NEAR(x[0], x[1], 0.05e-3);
}

}  // namespace
}  // namespace spoolstep::hostsim::test

namespace spoolstep::hostsim::test {
namespace {

TEST(PlantOil, EffectiveBulkModulusWithFreeAir) {
  OilModel oil;
  oil.bulk_modulus_pa = 1.4e9;
  oil.atmospheric_pa = 1e5;
  // 1 % free air by volume at the pressure itself, isothermal (beta_air = p):
  // beta_e = 5.833e8 Pa at 100 bar abs, 9.333e7 Pa at 10 bar abs
  // (check-values 5.5 [DERIVED] from 4.3a [SRC]). Our air fraction is given
  // at atmospheric pressure, so 1 % at p_abs is 0.01 * p_abs / p_atm.
  oil.air_fraction = 0.01 * 100e5 / 1e5;
  EXPECT_NEAR(effective_bulk_modulus(oil, 100e5 - 1e5), 5.833e8, 5.833e8 * 1e-3);
  oil.air_fraction = 0.01 * 10e5 / 1e5;
  EXPECT_NEAR(effective_bulk_modulus(oil, 10e5 - 1e5), 9.333e7, 9.333e7 * 1e-3);
}

TEST(PlantOil, DeadHeadedLitrePressurisesAtBetaQOverV) {
  // V = 1 L, Q = 30 L/min, beta = 1.4e9: 7000 bar/s, 160 bar after 22.86 ms
  // (check-values 5.5 [DERIVED] from 4.13).
  Rig rig = single_cylinder(ValveKind::kSolenoid43SpringCentred, ValveCentre::kClosed);
  rig.plant["pump"]["line_volume_cm3"] = 1000;
  auto p = build(rig);
  ASSERT_TRUE(p);
  double t_160 = 0.0;
  for (int i = 0; i < 400 && t_160 == 0.0; ++i) {
    const double p0 = p->node_pressure("pump");
    ASSERT_TRUE(p->advance(1e-4));
    const double p1 = p->node_pressure("pump");
    if (p1 >= 160e5) t_160 = p->time_s() - 1e-4 + 1e-4 * (160e5 - p0) / (p1 - p0);
  }
  EXPECT_NEAR(t_160, 22.86e-3, 22.86e-3 * 5e-3);
}

}  // namespace
}  // namespace spoolstep::hostsim::test
