// Closed-loop bench runs of the demo machine (core + plant model), each
// changed in JSON for the behaviour it pins. Invented scenarios.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>

#include "bench_rig.hpp"

namespace spoolstep::benchrun::testing {
namespace {

using json = nlohmann::json;

json scenario(double duration_s, json timeline) {
  return json{{"format", "spoolstep-scenario/1"},
              {"description", "closed-loop test"},
              {"duration_s", duration_s},
              {"initial",
               {{"inputs",
                 {{"estop_ok", true}, {"guard_door_closed", true}, {"pump_stop_ok", true}, {"stop_ok", true},
                  {"oil_level_ok", true}}},
                {"analog", {{"oil_temperature", 40}}}}},
              {"timeline", std::move(timeline)},
              {"expect", json::array()}};
}

bool has_notice(const BenchRun& run, const std::string& fragment) {
  return std::any_of(run.notices.begin(), run.notices.end(),
                     [&](const NoticeEntry& n) { return n.text.find(fragment) != std::string::npos; });
}

std::string all_notices(const BenchRun& run) {
  std::string out;
  for (const auto& n : run.notices) out += n.text + "\n";
  return out;
}

// A two-hand start during the pump's unloaded start is refused by the core
// (not stored); the bench output used to drop it silently.
TEST(BenchOutput, StartRefusedDuringThePumpsUnloadedStartIsANotice) {
  const BenchRun run = run_bench(demo_machine(), scenario(2.0, json::array({
      json{{"at_s", 0.2}, {"pulse", "reset_pb"}},
      json{{"at_s", 0.5}, {"set", {{"auto_selected", true}}}},
      json{{"at_s", 0.6}, {"pulse", "pump_start_pb"}},
      json{{"at_s", 1.0}, {"pulse", json::array({"two_hand_left", "two_hand_right"})}, {"ms", 300}}})));
  ASSERT_TRUE(run.ok);
  EXPECT_TRUE(has_notice(run, "cycle start refused")) << all_notices(run);
  EXPECT_TRUE(has_notice(run, "power unit ready")) << "the notice names what did not hold: " << all_notices(run);
  ASSERT_FALSE(run.notices.empty());
  EXPECT_NEAR(run.notices.front().t_s, 1.0, 0.01);
}

// A soft command the machine file does not enable is refused and named.
TEST(BenchOutput, RefusedSoftCommandIsANotice) {
  const BenchRun run = run_bench(demo_machine(), scenario(1.0, json::array({
      json{{"at_s", 0.2}, {"pulse", "reset_pb"}},
      json{{"at_s", 0.5}, {"command", {{"pump_start", true}}}}})));
  ASSERT_TRUE(run.ok);
  EXPECT_TRUE(has_notice(run, "soft command 'pump_start' refused")) << all_notices(run);
}


// ---------------------------------------------------------------------------
// Position soft limits (issue 9 item 3).

// The demo press changed so a held jog can reach its extend limit (480 mm):
// no part under the ram, a closed centre that traps the oil on both sides
// (so the 500 kg ram rings on its oil springs when the valve cuts), a jog
// fast enough to ring, and the ram starting a little above the limit.
json press_against_its_limit() {
  json m = demo_machine();
  json& press = m["functions"][1];
  press["valve"]["centre"] = "closed";
  press["jog"]["speed_percent"] = 60;
  json& cyl = m["plant"]["cylinders"][1];
  cyl.erase("load");
  cyl["initial_position_mm"] = 400;
  m["plant"]["valves"][1].erase("bleed_orifice_mm2");
  return m;
}

json manual_jog_down(double from_s, double to_s, double duration_s) {
  return scenario(duration_s, json::array({
      json{{"at_s", 0.2}, {"pulse", "reset_pb"}},
      json{{"at_s", 0.4}, {"pulse", "pump_start_pb"}},
      json{{"at_s", from_s}, {"set", {{"jog_press_down_pb", true}}}},
      json{{"at_s", to_s}, {"set", {{"jog_press_down_pb", false}}}}}));
}

// Holding jog-extend against the position limit: the valve cuts once at the
// limit and stays shut while the jog is held, however the ram rings; the ram
// ends near the limit and the trapped rod side stays below the relief
// setting (ISO 4413: neither surge pressure nor loss of pressure shall cause
// a hazard; clause number from memory).
TEST(SoftLimit, HeldJogAgainstTheLimitCutsOnceAndDoesNotRatchet) {
  int reopenings = 0;
  bool cut = false;
  double max_x_mm = 0.0;
  double max_b_bar = 0.0;
  const BenchRun run = run_bench(press_against_its_limit(), manual_jog_down(3.0, 9.0, 9.5),
                                 [&](const hostsim::Plant& plant, const core::Diagnostics& d) {
    const float cmd = d.functions[1].command;
    if (cut && cmd > 0.0f && d.functions[1].target > 0.0f) ++reopenings;
    if (cmd == 0.0f && plant.time_s() > 3.1) cut = cut || plant.cylinder_position("press_cyl") > 0.47;
    max_x_mm = std::max(max_x_mm, plant.cylinder_position("press_cyl") * 1e3);
    max_b_bar = std::max(max_b_bar, plant.node_pressure("press_cyl.B") * 1e-5);
  });
  ASSERT_TRUE(run.ok);
  EXPECT_TRUE(cut) << "the jog never reached the limit";
  EXPECT_EQ(reopenings, 0) << "the valve re-opened towards the limit while the jog was held";
  EXPECT_LT(max_x_mm, 486.0) << "the ram crept past the 480 mm limit";
  // Relief cracking 200 bar in the demo's plant section.
  EXPECT_LT(max_b_bar, 200.0);
}

// Released, jogged back a little and pressed again, the jog may move towards
// the limit only once the ram is back outside the release band (20 mm here):
// inside it the limit still holds.
TEST(SoftLimit, ReleasedJogPressedAgainInsideTheReleaseBandStaysStopped) {
  json timeline = json::array({
      json{{"at_s", 0.2}, {"pulse", "reset_pb"}},
      json{{"at_s", 0.4}, {"pulse", "pump_start_pb"}},
      json{{"at_s", 3.0}, {"set", {{"jog_press_down_pb", true}}}},
      json{{"at_s", 5.8}, {"set", {{"jog_press_down_pb", false}}}},
      json{{"at_s", 6.0}, {"set", {{"jog_press_up_pb", true}}}},
      json{{"at_s", 6.04}, {"set", {{"jog_press_up_pb", false}}}},
      json{{"at_s", 6.5}, {"set", {{"jog_press_down_pb", true}}}},
      json{{"at_s", 8.0}, {"set", {{"jog_press_down_pb", false}}}}});
  double max_target_after_repress = 0.0;
  double x_at_repress_mm = 0.0;
  json machine = press_against_its_limit();
  machine["functions"][1]["position"]["release_band"] = 20;
  const BenchRun run = run_bench(machine, scenario(8.5, timeline),
                                 [&](const hostsim::Plant& plant, const core::Diagnostics& d) {
    if (plant.time_s() < 6.5) x_at_repress_mm = plant.cylinder_position("press_cyl") * 1e3;
    if (plant.time_s() > 6.5) max_target_after_repress = std::max(max_target_after_repress, double{d.functions[1].target});
  });
  ASSERT_TRUE(run.ok);
  ASSERT_GT(x_at_repress_mm, 461.0) << "the ram should rest inside the release band before the second press";
  ASSERT_LT(x_at_repress_mm, 479.0) << "the ram should rest inside the release band before the second press";
  EXPECT_EQ(max_target_after_repress, 0.0) << "a fresh press inside the release band moved towards the limit";
}

// ---------------------------------------------------------------------------
// Slow-down before an end of travel (issue 9 item 4).

json one_demo_cycle() {
  return scenario(11.5, json::array({
      json{{"at_s", 0.2}, {"pulse", "reset_pb"}},
      json{{"at_s", 0.5}, {"set", {{"auto_selected", true}}}},
      json{{"at_s", 0.6}, {"pulse", "pump_start_pb"}},
      json{{"at_s", 3.0}, {"pulse", json::array({"two_hand_left", "two_hand_right"})}, {"ms", 6000}}}));
}

struct EndSwitchArrival {
  double speed_mm_s = -1.0;  // ram speed when the top switch closed in the retract step
  double peak_bar = 0.0;     // highest cylinder pressure in the 300 ms after
  bool arrived = false;
};

EndSwitchArrival arrive_at_the_top(const json& machine) {
  EndSwitchArrival a;
  double arrived_at_s = -1.0;
  bool went_down = false;
  const BenchRun run = run_bench(machine, one_demo_cycle(), [&](const hostsim::Plant& plant, const core::Diagnostics&) {
    const double t = plant.time_s();
    went_down = went_down || plant.cylinder_position("press_cyl") > 0.1;
    if (!a.arrived && went_down && plant.cylinder_position("press_cyl") < 0.003) {
      a.arrived = true;
      arrived_at_s = t;
      a.speed_mm_s = std::fabs(plant.cylinder_velocity("press_cyl")) * 1e3;
    }
    if (a.arrived && t - arrived_at_s < 0.3) {
      a.peak_bar = std::max({a.peak_bar, plant.node_pressure("press_cyl.A") * 1e-5,
                             plant.node_pressure("press_cyl.B") * 1e-5});
    }
  });
  EXPECT_TRUE(run.ok);
  for (const auto& f : run.faults) ADD_FAILURE() << "unexpected fault: " << f.text;
  return a;
}

// The demo's retract step ends on the top end switch. With a 3 t ram (the
// case the issue reports) the press's retract slow-down zone brings the ram
// to its creep speed on the decel ramp before the switch, so the cut at the
// switch is made from creep speed. A stop from speed v on trapped oil peaks
// at v*sqrt(beta*m/V) above the line pressure (hydraulic spring,
// check-values.md 4.9, derived): from full speed the old core reached
// 212 mm/s at the switch and 316 bar, and the press_not_overloaded trip
// (230 bar) latched.
TEST(SlowDown, RetractEndingOnItsEndSwitchArrivesAtCreepSpeed) {
  json m = demo_machine();
  m["plant"]["cylinders"][1]["mass_kg"] = 3000;
  const EndSwitchArrival a = arrive_at_the_top(m);
  ASSERT_TRUE(a.arrived);
  EXPECT_LT(a.speed_mm_s, 50.0) << "the ram reached the end switch at speed";
  // Relief cracking 200 bar in the demo's plant section: the trapped side
  // stays below it (ISO 4413: surge pressure shall not cause a hazard, from memory).
  EXPECT_LT(a.peak_bar, 200.0);
}

// Without its slow-down zone the same ram arrives at full speed: the test
// above is pinned by the zone, not by the plant.
TEST(SlowDown, WithoutTheZoneTheRamArrivesAtFullSpeed) {
  json m = demo_machine();
  m["plant"]["cylinders"][1]["mass_kg"] = 3000;
  m["functions"][1].erase("slowdown");
  m["interlocks"].erase(6);  // press_not_overloaded: the spike would trip it, which is the point
  const EndSwitchArrival a = arrive_at_the_top(m);
  ASSERT_TRUE(a.arrived);
  EXPECT_GT(a.speed_mm_s, 150.0);
  EXPECT_GT(a.peak_bar, 200.0);
}

}  // namespace
}  // namespace spoolstep::benchrun::testing
