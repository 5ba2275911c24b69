// The counterbalance valve at the port an overrunning load pressurises:
// holds the load in a float centre, lowers it at the pump's pace under
// pilot pressure, lets oil in freely to lift it. Invented rig data; the
// valve laws are common practice (no source), the speeds and forces are
// the handbook's (check-values 5.2).
#include <gtest/gtest.h>

#include <cstdio>
#include <memory>

#include "rig.hpp"

namespace spoolstep::hostsim::test {
namespace {

using core::ValveCentre;
using core::ValveKind;

// 500 kg hanging on the rod of the 63/36 mm cylinder (gravity extends it):
// the rod side carries m g / A_B = 4903.3 N / 2.0994e-3 m^2 = 23.36 bar.
constexpr double kLoadPressurePa = 500.0 * 9.80665 / kAreaB;
// Set about 1.3 times the load pressure (common practice, from memory).
constexpr double kSettingBar = 30.0;
constexpr double kPilotRatio = 3.0;

Rig hanging_on_counterbalance(bool with_valve) {
  Rig rig = single_cylinder(ValveKind::kSolenoid43SpringCentred, ValveCentre::kFloat);
  auto& cyl = rig.plant["cylinders"][0];
  cyl["initial_position_mm"] = 100;
  cyl["load"] = {{"gravity", "extend"}};
  // Well damped: a lightly damped mass on a counterbalance valve hunts
  // (see LightlyDampedLoadHunts); the holding and lowering figures are
  // those of a load that settles.
  cyl["viscous_n_s_m"] = 20000;
  cyl["line_volume_a_cm3"] = 50;
  cyl["line_volume_b_cm3"] = 50;
  if (with_valve) {
    cyl["counterbalance"] = {{"side", "B"}, {"setting_bar", kSettingBar}, {"pilot_ratio", kPilotRatio},
                             {"full_open_bar", 20}, {"rated_flow_l_min", 60}, {"rated_dp_bar", 5}};
  }
  return rig;
}

// Builds the rig, lets the load settle 0.3 s, commands the spool to
// `target` and runs 0.3 s more, so that the motion is steady.
std::unique_ptr<Plant> moving(const Rig& rig, double target) {
  auto p = build(rig);
  if (!p) return p;
  run(*p, 0.3);
  EXPECT_TRUE(p->set_spool_target("f", target));
  run(*p, 0.3);
  return p;
}

TEST(PlantCounterbalance, FloatCentreHoldsTheHangingLoad) {
  auto p = build(hanging_on_counterbalance(true));
  ASSERT_TRUE(p);
  run(*p, 1.0);  // the rod side takes up the weight
  const double x1 = p->cylinder_position("cyl");
  run(*p, 2.0);
  // Closed below its setting: the load pressure alone (23.4 bar) cannot open it.
  EXPECT_NEAR(p->cylinder_position("cyl"), x1, 1e-5);
  EXPECT_NEAR(p->node_pressure("cyl.B"), kLoadPressurePa, 0.02 * kLoadPressurePa);
  // Without the valve the same float centre lets the load fall.
  auto q = build(hanging_on_counterbalance(false));
  ASSERT_TRUE(q);
  run(*q, 0.5);
  EXPECT_GT(q->cylinder_position("cyl") - 0.100, 0.05);
}

// Lowering: P to A, B to T. The pump drives the load down at Q/A_A
// (0.16040 m/s, check-values 5.2) instead of the load running ahead of
// it, and the cap side stays pressurised: the valve meters where
// p_B - p_line + ratio p_A = setting + the part of its band it is open.
TEST(PlantCounterbalance, LowersAtThePumpsPaceUnderPilotPressure) {
  auto p = moving(hanging_on_counterbalance(true), 1.0);
  ASSERT_TRUE(p);
  const double x1 = p->cylinder_position("cyl");
  double min_pa = 1e9;
  for (int i = 0; i < 1000; ++i) {
    run(*p, 1e-3);
    min_pa = std::min(min_pa, p->node_pressure("cyl.A"));
  }
  EXPECT_NEAR(p->cylinder_position("cyl") - x1, 0.16040, 0.16040 * 1e-2);
  EXPECT_GT(min_pa, 0.5e5);  // the cap side stays pressurised: no cavitation
  // The pilot pressure it needs: (setting - load pressure) / ratio without
  // the cap side's own force on the rod side; with it, p_B = (p_A A_A + m g) / A_B,
  // so p_A (A_A/A_B + ratio) = setting + open band - p_line - m g / A_B.
  const double p_a = p->node_pressure("cyl.A");
  const double p_b = p->node_pressure("cyl.B");
  const double p_line = p->node_pressure("cyl.B_line");
  const double opening_pa = p_b - p_line + kPilotRatio * p_a - kSettingBar * 1e5;  // into the 20 bar band
  std::printf("[ figure   ] lowering: p_A %.2f bar, p_B %.2f bar, valve %.1f bar into its band\n", p_a / 1e5,
              p_b / 1e5, opening_pa / 1e5);
  EXPECT_GT(opening_pa, 0.0);
  EXPECT_LT(opening_pa, 20e5);
  // Without the valve the load runs ahead of the pump and the cap side cavitates.
  auto q = build(hanging_on_counterbalance(false));
  ASSERT_TRUE(q);
  ASSERT_TRUE(q->set_spool_target("f", 1.0));
  run(*q, 0.3);
  EXPECT_LT(q->node_pressure("cyl.A"), 0.0);
}

// Lifting: P to B through the valve's free-flow check at Q/A_B
// (0.23817 m/s, check-values 5.2); the rod side carries the load plus the
// check and line drops.
TEST(PlantCounterbalance, LiftsThroughItsFreeFlowCheck) {
  Rig rig = hanging_on_counterbalance(true);
  rig.plant["cylinders"][0]["initial_position_mm"] = 450;
  auto p = moving(rig, -1.0);
  ASSERT_TRUE(p);
  const double x1 = p->cylinder_position("cyl");
  run(*p, 1.0);
  EXPECT_NEAR(x1 - p->cylinder_position("cyl"), 0.23817, 0.23817 * 1e-2);
  EXPECT_GT(p->node_pressure("cyl.B"), kLoadPressurePa);
}

// The known weakness of the valve (common practice, no source): with
// little damping the load lowers in surges, the valve closing as the cap
// pressure falls and opening again as it rises. The mean speed is still
// the pump's, but the cap side touches vapour between surges.
TEST(PlantCounterbalance, LightlyDampedLoadHunts) {
  Rig rig = hanging_on_counterbalance(true);
  rig.plant["cylinders"][0]["viscous_n_s_m"] = 2000;
  auto p = moving(rig, 1.0);
  ASSERT_TRUE(p);
  const double x1 = p->cylinder_position("cyl");
  double v_min = 1e9, v_max = -1e9, p_min = 1e9;
  for (int i = 0; i < 1000; ++i) {
    run(*p, 1e-3);
    v_min = std::min(v_min, p->cylinder_velocity("cyl"));
    v_max = std::max(v_max, p->cylinder_velocity("cyl"));
    p_min = std::min(p_min, p->node_pressure("cyl.A"));
  }
  std::printf("[ figure   ] lightly damped: speed %.3f .. %.3f m/s, cap side down to %.2f bar\n", v_min, v_max,
              p_min / 1e5);
  EXPECT_NEAR(p->cylinder_position("cyl") - x1, 0.16040, 0.16040 * 1e-2);
  EXPECT_GT(v_max - v_min, 0.1);  // surges
  EXPECT_LT(p_min, 0.0);
}

TEST(PlantCounterbalance, ConfigurationErrorsNameTheirPath) {
  Rig rig = hanging_on_counterbalance(true);
  rig.plant["cylinders"][0]["counterbalance"].erase("setting_bar");
  rig.plant["cylinders"][0]["load_holding"] = {{"side", "B"}, {"rated_flow_l_min", 60}};
  rig.plant["cylinders"][0]["line_volume_b_cm3"] = 0;
  auto res = build_plant(rig.plant, rig.machine, "rig.json");
  auto* errors = std::get_if<std::vector<PlantError>>(&res);
  ASSERT_NE(errors, nullptr);
  std::string all;
  for (const PlantError& e : *errors) all += e.to_string() + "\n";
  EXPECT_NE(all.find("/plant/cylinders/0/counterbalance/setting_bar: missing required field"), std::string::npos) << all;
  EXPECT_NE(all.find("/plant/cylinders/0/counterbalance/side: port B already carries a load-holding check"),
            std::string::npos) << all;
  EXPECT_NE(all.find("/plant/cylinders/0/line_volume_b_cm3"), std::string::npos) << all;
}

}  // namespace
}  // namespace spoolstep::hostsim::test
