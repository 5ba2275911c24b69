#include <cstdio>
#include <cstdlib>
#include <chrono>
#include <gtest/gtest.h>
#include "spoolstep/hostsim/demo.hpp"
using namespace spoolstep::hostsim;
TEST(Scratch, DemoCycle) {
  auto pj = demo_plant_json();
  if (const char* m = std::getenv("METHOD")) pj["solver"] = {{"method", m}, {"rtol", std::atof(std::getenv("RTOL"))}, {"atol", std::atof(std::getenv("ATOL"))}};
  auto res = build_plant(pj, demo_machine(), "demo");
  if (auto* errs = std::get_if<std::vector<PlantError>>(&res)) {
    for (auto& e : *errs) std::printf("%s\n", e.message().c_str());
    FAIL();
  }
  auto& plant = *std::get<std::unique_ptr<Plant>>(res);
  Trace tr;
  auto t0 = std::chrono::steady_clock::now();
  ASSERT_TRUE(run_open_loop(plant, demo_press_cycle(), 1e-3, tr));
  double wall = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  std::printf("wall %.3f s, accepted %zu rejected %zu rhs %zu jac %zu lu %zu\n", wall, plant.solver_stats().accepted,
              plant.solver_stats().rejected, plant.solver_stats().rhs_calls, plant.solver_stats().jacobians, plant.solver_stats().factorisations);
  for (auto& n : tr.names) std::printf("%s ", n.c_str());
  std::printf("\n");
  for (std::size_t i = 0; i < tr.rows.size(); i += std::getenv("EVERY") ? std::atoi(std::getenv("EVERY")) : 100) {
    std::printf("%.2f", tr.time_s[i]);
    for (std::size_t c = 0; c < 16 && c < tr.rows[i].size(); ++c) std::printf(" %.2f", tr.rows[i][c]);
    std::printf("\n");
  }
  auto b = plant.oil_balance();
  std::printf("balance pumped %g returned %g displaced %g compressed %g resid %g\n", b.pumped_m3, b.returned_m3, b.displaced_m3, b.compressed_m3, b.relative_residual());
}
TEST(Scratch, StepsPerWindow) {
  auto pj = demo_plant_json();
  if (const char* m = std::getenv("METHOD")) pj["solver"] = {{"method", m}, {"rtol", std::atof(std::getenv("RTOL"))}, {"atol", std::atof(std::getenv("ATOL"))}};
  auto res = build_plant(pj, demo_machine(), "demo");
  auto& plant = *std::get<std::unique_ptr<Plant>>(res);
  Timeline tl = demo_press_cycle();
  std::size_t last = 0, lastrej = 0, lastjac = 0;
  Timeline part = tl;
  for (int w = 1; w <= 45; ++w) {
    part.end_s = w * 0.1;
    Trace tr;
    Timeline sub;
    for (auto& e : tl.events) if (e.time_s >= (w - 1) * 0.1 - 1e-9 && e.time_s < w * 0.1 - 1e-9) sub.events.push_back(e);
    sub.end_s = w * 0.1;
    run_open_loop(plant, sub, 1e-3, tr);
    auto& s = plant.solver_stats();
    std::printf("%.1f acc %zu rej %zu jac %zu\n", w * 0.1, s.accepted - last, s.rejected - lastrej, s.jacobians - lastjac);
    last = s.accepted; lastrej = s.rejected; lastjac = s.jacobians;
  }
}
#include "rig.hpp"
TEST(Scratch, Ext) {
  using namespace spoolstep;
  auto rig = hostsim::test::single_cylinder(core::ValveKind::kSolenoid43SpringCentred, core::ValveCentre::kClosed);
  if (const char* m = std::getenv("METHOD")) rig.plant["solver"] = {{"method", m}, {"rtol", std::atof(std::getenv("RTOL"))}, {"atol", std::atof(std::getenv("ATOL"))}};
  auto p = hostsim::test::build(rig);
  ASSERT_TRUE(p->set_spool_target("f", 1.0));
  for (int i = 0; i < 600; ++i) {
    p->advance(1e-3);
    if (i % 20 == 0) std::printf("sA %.4f t %.3f x %.5f v %.4f pA %.2f pB %.2f pump %.2f spool %.3f acc %zu rej %zu\n", p->state()[static_cast<std::size_t>(p->layout().node_state[2])], p->time_s(), p->cylinder_position("cyl"), p->cylinder_velocity("cyl"), p->node_pressure("cyl.A")/1e5, p->node_pressure("cyl.B")/1e5, p->node_pressure("pump")/1e5, p->spool_position("f"), p->solver_stats().accepted, p->solver_stats().rejected);
  }
}
