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

}  // namespace
}  // namespace spoolstep::benchrun::testing
