#include "plant_params.hpp"

#include <cstdio>
#include <string>

#include "spoolstep/hostsim/plant.hpp"

namespace spoolstep::hostsim {
namespace {

constexpr double kInf = 1e300;
using T = ParamType;

// Defaults are the safe or the common values. Sources: discharge coefficient
// 0.61 = pi/(pi+2) (check-values 4.1a, [SRC] Rabie eq. 2.39); density 870
// (4.4, [SRC]); bulk modulus 1.4 GPa, low end of the 1.4..1.8 GPa pure-oil
// range (4.3, from memory); rated valve flow at 10 bar total, 5 bar per
// edge (4.2, [SRC] Fluid Power Journal); volumetric efficiency 0.95 (4.12
// range 0.85..0.97, [SRC]). Everything else is common practice, no source.
const ParamSpec kParams[] = {
    {"", "oil", T::kObject, "", 0, 0, 0, false, nullptr, "oil properties"},
    {"", "pump", T::kObject, "", 0, 0, 0, true, nullptr, "the fixed-displacement pump (one per plant)"},
    {"", "relief", T::kObject, "", 0, 0, 0, true, nullptr, "the main pressure-relief valve"},
    {"", "valves", T::kArray, "", 0, 0, 0, false, nullptr, "one entry per function of the machine file: the directional valve's hydraulics"},
    {"", "cylinders", T::kArray, "", 0, 0, 0, false, nullptr, "one double-acting cylinder per function"},
    {"", "sensors", T::kArray, "", 0, 0, 0, false, nullptr, "transducers and switches wired to the machine file's inputs"},
    {"", "on_off_valves", T::kArray, "", 0, 0, 0, false, nullptr, "2/2 on/off valves between two nodes"},
    {"", "check_valves", T::kArray, "", 0, 0, 0, false, nullptr, "check valves between two nodes"},
    {"", "orifices", T::kArray, "", 0, 0, 0, false, nullptr, "fixed orifices between two nodes"},
    {"", "volumes", T::kArray, "", 0, 0, 0, false, nullptr, "extra named oil volumes (lines, blocks) to connect elements to"},
    {"", "solver", T::kObject, "", 0, 0, 0, false, nullptr, "integration method and tolerances"},

    {"oil", "density_kg_m3", T::kNumber, "kg/m^3", 870, 600, 1200, false, nullptr, "oil density"},
    {"oil", "bulk_modulus_bar", T::kNumber, "bar", 14000, 1000, 25000, false, nullptr, "bulk modulus of the oil without air (effective value if hoses soften it)"},
    {"oil", "entrained_air_percent", T::kNumber, "%", 0, 0, 10, false, nullptr, "free air by volume at atmospheric pressure; makes the bulk modulus pressure dependent"},
    {"oil", "tank_pressure_bar", T::kNumber, "bar", 0, 0, 20, false, nullptr, "tank (return) pressure, gauge"},
    {"oil", "laminar_transition_bar", T::kNumber, "bar", 0.1, 0.001, 10, false, nullptr, "below this pressure difference orifice flow blends to a laminar law"},
    {"oil", "discharge_coefficient", T::kNumber, "", 0.61, 0.3, 1.0, false, nullptr, "Cd of every metering edge and orifice unless given there"},

    {"pump", "displacement_cm3", T::kNumber, "cm^3/rev", 0, 0.1, 2000, true, nullptr, "geometric displacement Vg"},
    {"pump", "speed_rpm", T::kNumber, "rpm", 0, 1, 10000, true, nullptr, "drive speed n"},
    {"pump", "volumetric_efficiency", T::kNumber, "", 0.95, 0.5, 1.0, false, nullptr, "Q = Vg n eta_v"},
    {"pump", "line_volume_cm3", T::kNumber, "cm^3", 500, 1, 1e6, false, nullptr, "oil volume between pump and valves"},
    {"pump", "compensator", T::kObject, "", 0, 0, 0, false, nullptr, "makes it a pressure-compensated pump"},
    {"pump", "dump_valve", T::kObject, "", 0, 0, 0, false, nullptr, "sizing of the power unit's dump valve (its coil is the machine file's power_unit dump coil)"},
    {"pump.compensator", "setting_bar", T::kNumber, "bar", 0, 1, 700, true, nullptr, "pressure at which the flow reaches zero"},
    {"pump.compensator", "band_bar", T::kNumber, "bar", 5, 0.1, 100, false, nullptr, "the flow starts to fall this far below the setting"},
    {"pump.dump_valve", "normally_open", T::kBool, "", 1, 0, 0, false, nullptr, "true: de-energised dumps the pump to tank"},
    {"pump.dump_valve", "rated_flow_l_min", T::kNumber, "L/min", 100, 0.1, 2000, false, nullptr, "flow at rated_dp_bar when open"},
    {"pump.dump_valve", "rated_dp_bar", T::kNumber, "bar", 5, 0.1, 100, false, nullptr, "pressure drop at rated flow"},
    {"pump.dump_valve", "switch_time_ms", T::kNumber, "ms", 30, 1, 1000, false, nullptr, "time to open or close"},

    {"relief", "cracking_bar", T::kNumber, "bar", 0, 1, 700, true, nullptr, "pressure at which the relief valve starts to open"},
    {"relief", "override_bar_per_l_min", T::kNumber, "bar/(L/min)", 0.2, 0.001, 100, false, nullptr, "pressure rise per flow above cracking"},
    {"relief", "at", T::kString, "", 0, 0, 0, false, nullptr, "node it protects (default: pump)"},

    {"valves[]", "function", T::kString, "", 0, 0, 0, true, nullptr, "function name in the machine file; kind and centre are read from there"},
    {"valves[]", "rated_flow_l_min", T::kNumber, "L/min", 0, 0.1, 2000, true, nullptr, "flow through P->A and B->T together at rated_dp_bar, fully open"},
    {"valves[]", "rated_dp_bar", T::kNumber, "bar", 10, 1, 350, false, nullptr, "total pressure drop of the rating (both edges)"},
    {"valves[]", "overlap_percent", T::kNumber, "%", 0, 0, 45, false, nullptr, "spool travel before a metering edge opens (deadband)"},
    {"valves[]", "leak_mm2", T::kNumber, "mm^2", 0, 0, 10, false, nullptr, "clearance leak of every metering edge, as an always-open area"},
    {"valves[]", "switch_time_ms", T::kNumber, "ms", 30, 1, 1000, false, nullptr, "solenoid valves: time from centre to full stroke"},
    {"valves[]", "response", T::kObject, "", 0, 0, 0, false, nullptr, "proportional valves: spool response to the command"},
    {"valves[]", "centre_area_mm2", T::kNumber, "mm^2", 0, 0.01, 1e4, false, nullptr, "open area of each centre passage (default: a full metering edge)"},
    {"valves[]", "bleed_orifice_mm2", T::kNumber, "mm^2", 0, 0.001, 100, false, nullptr, "bleed centre: A->T and B->T orifice area (required there)"},
    {"valves[]", "supply", T::kStringOrObject, "", 0, 0, 0, false, nullptr, "\"pump\" or {\"through_of\": function}: fed by the upstream valve's through passage"},
    {"valves[]", "through_line_volume_cm3", T::kNumber, "cm^3", 50, 1, 1e5, false, nullptr, "volume of the through (carry-over) line when a downstream valve uses it"},
    {"valves[].response", "order", T::kNumber, "", 2, 1, 2, false, nullptr, "1: first-order lag, 2: second order"},
    {"valves[].response", "time_constant_ms", T::kNumber, "ms", 10, 0.1, 1000, false, nullptr, "order 1 time constant"},
    {"valves[].response", "natural_hz", T::kNumber, "Hz", 30, 1, 500, false, nullptr, "order 2 natural frequency"},
    {"valves[].response", "damping", T::kNumber, "", 0.7, 0.05, 5, false, nullptr, "order 2 damping ratio"},
    {"valves[].supply", "through_of", T::kString, "", 0, 0, 0, true, nullptr, "upstream function whose centre passes P on"},

    {"cylinders[]", "name", T::kString, "", 0, 0, 0, true, nullptr, "cylinder name (nodes are NAME.A, NAME.B)"},
    {"cylinders[]", "function", T::kString, "", 0, 0, 0, true, nullptr, "function whose valve drives it"},
    {"cylinders[]", "bore_mm", T::kNumber, "mm", 0, 5, 1000, true, nullptr, "piston diameter"},
    {"cylinders[]", "rod_mm", T::kNumber, "mm", 0, 0, 1000, true, nullptr, "rod diameter (less than bore)"},
    {"cylinders[]", "stroke_mm", T::kNumber, "mm", 0, 1, 10000, true, nullptr, "stroke"},
    {"cylinders[]", "dead_volume_a_cm3", T::kNumber, "cm^3", 20, 0.1, 1e5, false, nullptr, "A-side volume at x = 0 (ports, cushion)"},
    {"cylinders[]", "dead_volume_b_cm3", T::kNumber, "cm^3", 20, 0.1, 1e5, false, nullptr, "B-side volume at full stroke"},
    {"cylinders[]", "line_volume_a_cm3", T::kNumber, "cm^3", 20, 0, 1e5, false, nullptr, "hose between valve port A and the cylinder"},
    {"cylinders[]", "line_volume_b_cm3", T::kNumber, "cm^3", 20, 0, 1e5, false, nullptr, "hose between valve port B and the cylinder"},
    {"cylinders[]", "mass_kg", T::kNumber, "kg", 0, 0.1, 1e6, true, nullptr, "moving mass (piston, rod, tool, load)"},
    {"cylinders[]", "coulomb_n", T::kNumber, "N", 0, 0, 1e6, false, nullptr, "Coulomb friction"},
    {"cylinders[]", "viscous_n_s_m", T::kNumber, "N s/m", 0, 0, 1e8, false, nullptr, "viscous friction"},
    {"cylinders[]", "leak_mm3_s_bar", T::kNumber, "mm^3/s/bar", 0, 0, 1e7, false, nullptr, "piston leakage A <-> B"},
    {"cylinders[]", "initial_position_mm", T::kNumber, "mm", 0, 0, 10000, false, nullptr, "position at start (0 = retracted)"},
    {"cylinders[]", "end_stop_stiffness_n_mm", T::kNumber, "N/mm", 1e6, 1e3, 1e8, false, nullptr, "stiffness of the end stops"},
    {"cylinders[]", "end_stop_damping_ratio", T::kNumber, "", 1, 0, 10, false, nullptr, "damping of the end stops, fraction of critical"},
    {"cylinders[]", "load", T::kObject, "", 0, 0, 0, false, nullptr, "external forces"},
    {"cylinders[]", "load_holding", T::kObject, "", 0, 0, 0, false, nullptr, "pilot-operated check valve(s) at the cylinder ports"},
    {"cylinders[]", "counterbalance", T::kObject, "", 0, 0, 0, false, nullptr, "counterbalance valve at the port the load pressurises (an overrunning load)"},
    {"cylinders[].load", "resisting_force_n", T::kNumber, "N", 0, -1e8, 1e8, false, nullptr, "constant force against extension"},
    {"cylinders[].load", "gravity", T::kString, "", 0, 0, 0, false, "none|extend|retract", "direction in which the weight of the mass pulls"},
    {"cylinders[].load", "contact", T::kObject, "", 0, 0, 0, false, nullptr, "a workpiece met during extension"},
    {"cylinders[].load", "force_profile", T::kArray, "", 0, 0, 0, false, nullptr, "extra resisting force against time, [{\"time_s\", \"force_n\"}], linear between points"},
    {"cylinders[].load.contact", "at_mm", T::kNumber, "mm", 0, 0, 10000, true, nullptr, "position where the workpiece is met"},
    {"cylinders[].load.contact", "stiffness_n_mm", T::kNumber, "N/mm", 0, 1, 1e8, true, nullptr, "workpiece stiffness"},
    {"cylinders[].load.contact", "damping_ratio", T::kNumber, "", 0.5, 0, 10, false, nullptr, "workpiece damping, fraction of critical"},
    {"cylinders[].load.force_profile[]", "time_s", T::kNumber, "s", 0, 0, kInf, true, nullptr, "time (increasing)"},
    {"cylinders[].load.force_profile[]", "force_n", T::kNumber, "N", 0, -1e8, 1e8, true, nullptr, "resisting force"},
    {"cylinders[].load_holding", "side", T::kString, "", 0, 0, 0, false, "A|B|both", "which port(s) carry a pilot-operated check (piloted from the other port)"},
    {"cylinders[].load_holding", "pilot_ratio", T::kNumber, "", 4, 1, 50, false, nullptr, "pilot piston area / seat area"},
    {"cylinders[].load_holding", "cracking_bar", T::kNumber, "bar", 2, 0.1, 50, false, nullptr, "forward cracking pressure"},
    {"cylinders[].load_holding", "full_open_bar", T::kNumber, "bar", 3, 0.1, 100, false, nullptr, "pressure above cracking at which it is fully open"},
    {"cylinders[].load_holding", "rated_flow_l_min", T::kNumber, "L/min", 0, 0.1, 2000, true, nullptr, "flow at rated_dp_bar, fully open"},
    {"cylinders[].load_holding", "rated_dp_bar", T::kNumber, "bar", 5, 0.1, 100, false, nullptr, "pressure drop at rated flow"},
    // Counterbalance valve: a relief in the line of the loaded chamber, set
    // above the load pressure (commonly about 1.3 times it), opened by the
    // load pressure plus pilot ratio times the pressure of the other line;
    // a free-flow check lets oil in (common practice, no source; the pilot
    // ratio range 3:1 to 8:1 and the setting rule are from memory).
    {"cylinders[].counterbalance", "side", T::kString, "", 0, 0, 0, true, "A|B", "the chamber the load pressurises; the valve sits in its line, piloted from the other line"},
    {"cylinders[].counterbalance", "setting_bar", T::kNumber, "bar", 0, 1, 700, true, nullptr, "load pressure at which it opens without pilot (commonly 1.3 x the load pressure)"},
    {"cylinders[].counterbalance", "pilot_ratio", T::kNumber, "", 3, 1, 20, false, nullptr, "pilot area / relief seat area"},
    {"cylinders[].counterbalance", "full_open_bar", T::kNumber, "bar", 20, 0.1, 200, false, nullptr, "pressure above the setting at which it is fully open (its metering band)"},
    {"cylinders[].counterbalance", "rated_flow_l_min", T::kNumber, "L/min", 0, 0.1, 2000, true, nullptr, "flow at rated_dp_bar, fully open (both directions)"},
    {"cylinders[].counterbalance", "rated_dp_bar", T::kNumber, "bar", 5, 0.1, 100, false, nullptr, "pressure drop at rated flow"},
    {"cylinders[].counterbalance", "check_cracking_bar", T::kNumber, "bar", 1, 0, 50, false, nullptr, "cracking pressure of the free-flow check (into the chamber)"},

    {"sensors[]", "kind", T::kString, "", 0, 0, 0, true, "pressure|position|limit_switch|pressure_switch", "what it measures"},
    {"sensors[]", "input", T::kString, "", 0, 0, 0, true, nullptr, "machine-file input it drives (analog for transducers, digital for switches)"},
    {"sensors[]", "at", T::kString, "", 0, 0, 0, false, nullptr, "pressure, pressure_switch: node name (pump, tank, CYL.A, CYL.B, FUNCTION.through, a volume)"},
    {"sensors[]", "cylinder", T::kString, "", 0, 0, 0, false, nullptr, "position, limit_switch: cylinder name"},
    {"sensors[]", "at_mm", T::kNumber, "mm", 0, 0, 10000, false, nullptr, "limit_switch: switching point"},
    {"sensors[]", "active", T::kString, "", 0, 0, 0, false, "above|below", "limit_switch: on above or below the switching point"},
    {"sensors[]", "hysteresis_mm", T::kNumber, "mm", 0.5, 0, 100, false, nullptr, "limit_switch: travel back before it releases"},
    {"sensors[]", "above_bar", T::kNumber, "bar", 0, -1, 1000, false, nullptr, "pressure_switch: on at or above this pressure"},
    {"sensors[]", "below_bar", T::kNumber, "bar", 0, -1, 1000, false, nullptr, "pressure_switch: on at or below this pressure"},
    {"sensors[]", "hysteresis_bar", T::kNumber, "bar", 2, 0, 100, false, nullptr, "pressure_switch: pressure change back before it releases"},

    {"on_off_valves[]", "name", T::kString, "", 0, 0, 0, true, nullptr, "valve name"},
    {"on_off_valves[]", "coil", T::kString, "", 0, 0, 0, true, nullptr, "machine-file coil that switches it"},
    {"on_off_valves[]", "from", T::kString, "", 0, 0, 0, true, nullptr, "node"},
    {"on_off_valves[]", "to", T::kString, "", 0, 0, 0, true, nullptr, "node"},
    {"on_off_valves[]", "normally_open", T::kBool, "", 0, 0, 0, false, nullptr, "true: open when de-energised"},
    {"on_off_valves[]", "rated_flow_l_min", T::kNumber, "L/min", 0, 0.1, 2000, true, nullptr, "flow at rated_dp_bar, open"},
    {"on_off_valves[]", "rated_dp_bar", T::kNumber, "bar", 5, 0.1, 350, false, nullptr, "pressure drop at rated flow"},
    {"on_off_valves[]", "switch_time_ms", T::kNumber, "ms", 30, 1, 1000, false, nullptr, "time to open or close"},

    {"check_valves[]", "name", T::kString, "", 0, 0, 0, true, nullptr, "valve name"},
    {"check_valves[]", "from", T::kString, "", 0, 0, 0, true, nullptr, "node (free flow from here)"},
    {"check_valves[]", "to", T::kString, "", 0, 0, 0, true, nullptr, "node"},
    {"check_valves[]", "cracking_bar", T::kNumber, "bar", 0.5, 0, 50, false, nullptr, "cracking pressure"},
    {"check_valves[]", "full_open_bar", T::kNumber, "bar", 2, 0.1, 100, false, nullptr, "pressure above cracking at which it is fully open"},
    {"check_valves[]", "rated_flow_l_min", T::kNumber, "L/min", 0, 0.1, 2000, true, nullptr, "flow at rated_dp_bar, fully open"},
    {"check_valves[]", "rated_dp_bar", T::kNumber, "bar", 5, 0.1, 100, false, nullptr, "pressure drop at rated flow"},

    {"orifices[]", "name", T::kString, "", 0, 0, 0, true, nullptr, "orifice name"},
    {"orifices[]", "from", T::kString, "", 0, 0, 0, true, nullptr, "node"},
    {"orifices[]", "to", T::kString, "", 0, 0, 0, true, nullptr, "node"},
    {"orifices[]", "diameter_mm", T::kNumber, "mm", 0, 0.01, 500, false, nullptr, "round orifice diameter (or area_mm2)"},
    {"orifices[]", "area_mm2", T::kNumber, "mm^2", 0, 1e-4, 1e5, false, nullptr, "orifice area (or diameter_mm)"},
    {"orifices[]", "discharge_coefficient", T::kNumber, "", 0.61, 0.3, 1.0, false, nullptr, "Cd (default: the oil's)"},

    {"volumes[]", "name", T::kString, "", 0, 0, 0, true, nullptr, "node name"},
    {"volumes[]", "volume_cm3", T::kNumber, "cm^3", 0, 0.1, 1e6, true, nullptr, "oil volume"},

    {"solver", "method", T::kString, "", 0, 0, 0, false, "ros2|rosenbrock4", "ros2: purpose-written Rosenbrock-W; rosenbrock4: Boost.Odeint"},
    {"solver", "rtol", T::kNumber, "", 1e-3, 1e-10, 1e-2, false, nullptr, "relative tolerance of the local error"},
    {"solver", "atol", T::kNumber, "bar, mm", 1e-2, 1e-10, 1, false, nullptr, "absolute tolerance of pressures (bar), positions (mm) and spools (stroke fraction)"},
    {"solver", "max_window_periods", T::kNumber, "", 16, 1, 1000, false, nullptr, "most scan periods integrated ahead at once while the commands stay the same (1: period by period; ros2 only)"},
    {"solver", "velocity_atol_mm_s", T::kNumber, "mm/s", 0.1, 1e-10, 100, false, nullptr, "absolute tolerance of cylinder velocities (ros2)"},
};

}  // namespace

const ParamSpec* plant_params(std::size_t& count) {
  count = sizeof(kParams) / sizeof(kParams[0]);
  return kParams;
}

std::string plant_parameter_table_markdown() {
  std::size_t n = 0;
  const ParamSpec* p = plant_params(n);
  std::string out = "| section | field | type | unit | default | range | description |\n";
  out += "| --- | --- | --- | --- | --- | --- | --- |\n";
  auto num = [](double v) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%g", v);
    return std::string(buf);
  };
  for (std::size_t i = 0; i < n; ++i) {
    const ParamSpec& s = p[i];
    const char* type = "number";
    switch (s.type) {
      case T::kNumber: type = "number"; break;
      case T::kBool: type = "bool"; break;
      case T::kString: type = s.choices ? "choice" : "string"; break;
      case T::kObject: type = "object"; break;
      case T::kArray: type = "array"; break;
      case T::kStringOrObject: type = "string or object"; break;
    }
    std::string def = "-";
    std::string range = "-";
    if (s.required) {
      def = "required";
    } else if (s.type == T::kNumber) {
      def = num(s.default_value);
    } else if (s.type == T::kBool) {
      def = s.default_value != 0.0 ? "true" : "false";
    } else if (s.choices != nullptr) {
      std::string c = s.choices;
      def = c.substr(0, c.find('|'));
    }
    if (s.type == T::kNumber) range = num(s.min) + " .. " + (s.max >= kInf ? std::string("inf") : num(s.max));
    if (s.choices != nullptr) {
      range = s.choices;
      for (char& c : range) if (c == '|') c = ',';
      range.insert(0, "one of ");
    }
    out += std::string("| ") + (s.section[0] ? s.section : "plant") + " | " + s.key + " | " + type + " | " +
           s.unit + " | " + def + " | " + range + " | " + s.description + " |\n";
  }
  return out;
}

}  // namespace spoolstep::hostsim
