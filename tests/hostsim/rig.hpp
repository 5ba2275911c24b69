#pragma once
// Test rigs: a single cylinder on one valve, built from JSON like a machine
// file's plant section. Invented test data unless a comment names a source.
#include <gtest/gtest.h>

#include <cmath>
#include <memory>

#include "spoolstep/hostsim/demo.hpp"
#include "spoolstep/hostsim/plant.hpp"

namespace spoolstep::hostsim::test {

// Check-values section 5 common inputs: bore 63, rod 36, stroke 500 mm,
// mass 500 kg, Q = 30 L/min, rho 870, beta 1.4e9 Pa, Cd 0.61.
inline constexpr double kAreaA = 3.117245e-3;    // m^2, check-values 5.1 [DERIVED]
inline constexpr double kAreaB = 2.099369e-3;    // m^2, check-values 5.1 [DERIVED]
inline constexpr double kAreaRod = 1.017876e-3;  // m^2, check-values 5.1 [DERIVED]
inline constexpr double kPumpFlow = 5.0e-4;      // m^3/s = 30 L/min

struct Rig {
  core::MachineConfig machine;
  nlohmann::json plant;
};

/// One function "f" with the given valve on cylinder "cyl" (63/36/500,
/// 500 kg, no friction, no leakage, 0.1 cm^3 dead volume each side, no
/// lines), a 30 L/min pump that runs from the start, relief at 250 bar.
inline Rig single_cylinder(core::ValveKind kind, core::ValveCentre centre) {
  MachineBuilder m("rig");
  m.function("f", kind, centre);
  m.analog("p_a", "bar", true, 0.0f, 250.0f);
  m.analog("x", "mm", true, 0.0f, 500.0f);
  m.analog("p_eng", "bar", false, 0.0f, 250.0f);
  m.digital("at_end");
  m.digital("pressed");
  Rig r;
  r.machine = m.config();
  r.plant = nlohmann::json::parse(R"({
    "oil": {"density_kg_m3": 870, "bulk_modulus_bar": 14000, "entrained_air_percent": 0},
    "pump": {"displacement_cm3": 20, "speed_rpm": 1500, "volumetric_efficiency": 1.0, "line_volume_cm3": 200},
    "relief": {"cracking_bar": 250, "override_bar_per_l_min": 0.1},
    "valves": [{"function": "f", "rated_flow_l_min": 60, "rated_dp_bar": 10}],
    "cylinders": [{"name": "cyl", "function": "f", "bore_mm": 63, "rod_mm": 36, "stroke_mm": 500,
                   "dead_volume_a_cm3": 0.1, "dead_volume_b_cm3": 0.1, "line_volume_a_cm3": 0,
                   "line_volume_b_cm3": 0, "mass_kg": 500, "initial_position_mm": 100}]
  })");
  if (core::is_proportional(kind)) {
    r.plant["valves"][0]["response"] = {{"order", 1}, {"time_constant_ms", 5}};
  } else {
    r.plant["valves"][0]["switch_time_ms"] = 5;
  }
  return r;
}

inline std::unique_ptr<Plant> build(const Rig& rig) {
  auto res = build_plant(rig.plant, rig.machine, "rig.json");
  if (auto* errors = std::get_if<std::vector<PlantError>>(&res)) {
    for (const auto& e : *errors) ADD_FAILURE() << e.to_string();
    return nullptr;
  }
  return std::move(std::get<std::unique_ptr<Plant>>(res));
}

/// Advances in 1 ms periods for `seconds`.
inline void run(Plant& p, double seconds) {
  const long n = std::lround(seconds / 1e-3);
  for (long i = 0; i < n; ++i) ASSERT_TRUE(p.advance(1e-3)) << "integrator failed at t = " << p.time_s();
}

}  // namespace spoolstep::hostsim::test
