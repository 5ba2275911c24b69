// One builder per component kind of the plant section. Each reads its part
// of the JSON through the shared Reader (plant_builder.hpp) and adds its
// nodes, elements, spools and wiring to the shared Builder. build_components
// calls them in a fixed order: the order of the nodes and elements is the
// order of the state vector and of the trace columns, and the order of the
// reads is the order of the error messages, so a new component goes where
// the nodes it refers to already exist.
#include <algorithm>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <initializer_list>
#include <map>
#include <set>
#include <string>
#include <vector>

#include "plant_builder.hpp"

namespace spoolstep::hostsim::plant_build {
namespace {

constexpr double kMinCentreWidth = 0.05;  // centre passages close over at least 5 % of travel

std::string kind_name(core::ValveKind k) {
  const core::ValveKindRow* row = core::valve_kind_row(k);
  return row != nullptr ? row->text : "unknown";
}

std::string centre_name(core::ValveCentre c) {
  const core::CentreRow* row = core::centre_row(c);
  return row != nullptr ? row->key : "unknown";
}

// --- oil ---------------------------------------------------------------------

// The oil properties, the discharge coefficient and the tank node.
void build_oil(Builder& b) {
  Reader& r = b.r;
  const json& oil = b.section("oil");
  const std::string po = b.root + "/oil";
  if (r.object(oil, po, "oil")) {
    b.net.oil.density_kg_m3 = r.number(oil, po, "oil", "density_kg_m3");
    b.net.oil.bulk_modulus_pa = r.number(oil, po, "oil", "bulk_modulus_bar") * kBar;
    b.net.oil.air_fraction = r.number(oil, po, "oil", "entrained_air_percent") / 100.0;
    b.net.oil.laminar_transition_pa = r.number(oil, po, "oil", "laminar_transition_bar") * kBar;
    b.cd = r.number(oil, po, "oil", "discharge_coefficient");
  }
  b.tank = b.add_node("tank", 0.0, true, r.number(oil, po, "oil", "tank_pressure_bar") * kBar);
}

// --- pump --------------------------------------------------------------------

// The pump node and its delivery; the power unit's coils from the machine file.
void build_pump(Builder& b) {
  Reader& r = b.r;
  const std::string pp = b.root + "/pump";
  const json& pj = b.section("pump");
  double pump_q = 0.0;
  if (b.plant.contains("pump") && r.object(pj, pp, "pump")) {
    b.pump = b.add_node("pump", r.number(pj, pp, "pump", "line_volume_cm3") * 1e-6);
    // Q = Vg n eta_v (check-values 4.12, [SRC] machinecalc pump-flow page).
    pump_q = r.number(pj, pp, "pump", "displacement_cm3") * 1e-6 * r.number(pj, pp, "pump", "speed_rpm") / 60.0 *
             r.number(pj, pp, "pump", "volumetric_efficiency");
    b.net.pump.node = b.pump;
    b.net.pump.nominal_m3_s = pump_q;
    if (pj.contains("compensator")) {
      const json& c = pj.at("compensator");
      const std::string pc = pp + "/compensator";
      if (r.object(c, pc, "pump.compensator")) {
        b.net.pump.compensated = true;
        b.net.pump.compensator_pa = r.number(c, pc, "pump.compensator", "setting_bar") * kBar;
        b.net.pump.compensator_band_pa = r.number(c, pc, "pump.compensator", "band_bar") * kBar;
      }
    }
  } else {
    b.pump = b.add_node("pump", 500e-6);  // keeps later references valid while reporting
  }
  b.w->has_power_unit = b.machine.power_unit.present;
  b.w->motor_coil = b.machine.power_unit.motor_coil;
  b.w->dump_coil = b.machine.power_unit.dump_coil;
}

// The dump valve pump -> tank, switched by the power unit's dump coil.
void build_dump_valve(Builder& b) {
  Reader& r = b.r;
  const core::MachineConfig& machine = b.machine;
  const double rho = b.net.oil.density_kg_m3;
  const std::string pp = b.root + "/pump";
  const json& pj = b.section("pump");
  const bool machine_has_dump = machine.power_unit.present && machine.power_unit.dump_coil != core::kNoIndex8;
  if (pj.is_object() && pj.contains("dump_valve") && !machine_has_dump) {
    r.error(pp + "/dump_valve", "the machine file's power unit has no dump coil, so this valve could never switch",
            "add the dump coil to the power unit in the machine file, or remove plant.pump.dump_valve");
  }
  if (machine_has_dump) {
    const json& d = pj.is_object() && pj.contains("dump_valve") ? pj.at("dump_valve") : b.empty;
    const std::string pd = pp + "/dump_valve";
    if (r.object(d, pd, "pump.dump_valve")) {
      const bool no = r.boolean(d, pd, "pump.dump_valve", "normally_open");
      const double q = r.number(d, pd, "pump.dump_valve", "rated_flow_l_min") * kLitrePerMin;
      const double dp = r.number(d, pd, "pump.dump_valve", "rated_dp_bar") * kBar;
      const double ts = r.number(d, pd, "pump.dump_valve", "switch_time_ms") * 1e-3;
      // Spool state 1 = open (dumping); de-energised at start.
      b.w->dump_spool = b.add_spool("dump", SpoolDynamics::kRateLimited, 1.0 / ts, 0, 0, 0, no ? 1.0 : 0.0);
      b.w->dump_normally_open = no;
      b.add_element(b.edge("dump", b.pump, b.tank, b.w->dump_spool, EdgeOpening::kPositive,
                           area_for(q, dp, b.cd, rho), 0.0, 0.0),
                    pd);
    }
  }
}

// --- extra volumes -----------------------------------------------------------

// Named oil volumes that later elements connect to.
void build_volumes(Builder& b) {
  Reader& r = b.r;
  if (!b.plant.contains("volumes")) return;
  const json& vs = b.plant.at("volumes");
  if (!vs.is_array()) {
    r.error(b.root + "/volumes", "expected an array", "write [ {\"name\": ..., \"volume_cm3\": ...} ]");
    return;
  }
  for (std::size_t i = 0; i < vs.size(); ++i) {
    const std::string p = b.root + "/volumes/" + std::to_string(i);
    if (!r.object(vs[i], p, "volumes[]")) continue;
    const std::string name = r.string(vs[i], p, "volumes[]", "name");
    if (b.nodes.count(name) != 0 || name.find('.') != std::string::npos || name.empty()) {
      r.error(p + "/name", "\"" + name + "\" is empty, contains a dot or is already a node name",
              "choose another name (dots are kept for CYLINDER.A style names)");
      continue;
    }
    b.add_node(name, r.number(vs[i], p, "volumes[]", "volume_cm3") * 1e-6);
  }
}

// --- functions: which entries belong to which function -----------------------

// The machine file's functions with their entries in plant.valves and
// plant.cylinders (index into the array, -1 for none).
struct Functions {
  std::vector<std::string> names;
  std::string list;  // "a, b, c" for the fixes
  const json* valves = nullptr;
  const json* cylinders = nullptr;
  std::vector<int> valve_of, cylinder_of;

  std::size_t count() const { return names.size(); }
  int index(const std::string& name) const {
    for (std::size_t f = 0; f < names.size(); ++f) {
      if (names[f] == name) return static_cast<int>(f);
    }
    return -1;
  }
};

// Matches the valves[] and cylinders[] entries to the machine file's
// functions: every function needs one of each.
Functions match_functions(Builder& b) {
  Reader& r = b.r;
  const core::MachineConfig& machine = b.machine;
  Functions fx;
  const std::size_t nf = machine.function_count;
  fx.names.resize(nf);
  for (std::size_t f = 0; f < nf; ++f) fx.names[f] = core_name(machine.functions[f].name);
  for (const auto& n : fx.names) fx.list += (fx.list.empty() ? "" : ", ") + n;
  fx.valves = &b.array_of("valves");
  fx.cylinders = &b.array_of("cylinders");
  const json& valves = *fx.valves;
  const json& cylinders = *fx.cylinders;

  fx.valve_of.assign(nf, -1);
  fx.cylinder_of.assign(nf, -1);
  for (std::size_t i = 0; i < valves.size(); ++i) {
    const std::string p = b.root + "/valves/" + std::to_string(i);
    if (!r.object(valves[i], p, "valves[]")) continue;
    const std::string fn = r.string(valves[i], p, "valves[]", "function");
    const int f = fx.index(fn);
    if (f < 0) {
      r.error(p + "/function", "no function named \"" + fn + "\" in the machine file", "use one of: " + fx.list);
    } else if (fx.valve_of[static_cast<std::size_t>(f)] >= 0) {
      r.error(p + "/function", "function \"" + fn + "\" already has a valve entry", "keep one entry per function");
    } else {
      fx.valve_of[static_cast<std::size_t>(f)] = static_cast<int>(i);
    }
  }
  for (std::size_t i = 0; i < cylinders.size(); ++i) {
    const std::string p = b.root + "/cylinders/" + std::to_string(i);
    if (!r.object(cylinders[i], p, "cylinders[]")) continue;
    const std::string fn = r.string(cylinders[i], p, "cylinders[]", "function");
    const int f = fx.index(fn);
    if (f < 0) {
      r.error(p + "/function", "no function named \"" + fn + "\" in the machine file", "use one of: " + fx.list);
    } else if (fx.cylinder_of[static_cast<std::size_t>(f)] >= 0) {
      r.error(p + "/function", "function \"" + fn + "\" already drives a cylinder",
              "one cylinder per function in this model version");
    } else {
      fx.cylinder_of[static_cast<std::size_t>(f)] = static_cast<int>(i);
    }
  }
  for (std::size_t f = 0; f < nf; ++f) {
    if (fx.valve_of[f] < 0) {
      r.error(b.root + "/valves", "function \"" + fx.names[f] + "\" has no valve entry",
              "add {\"function\": \"" + fx.names[f] + "\", \"rated_flow_l_min\": ...} to plant.valves");
    }
    if (fx.cylinder_of[f] < 0) {
      r.error(b.root + "/cylinders", "function \"" + fx.names[f] + "\" drives no cylinder",
              "add a cylinder with \"function\": \"" + fx.names[f] + "\" to plant.cylinders");
    }
  }
  return fx;
}

// --- cylinders ---------------------------------------------------------------

struct CylinderPorts {
  int port_a = -1;  // valve-side nodes
  int port_b = -1;
};

// A valve at a cylinder port, added once every node exists. Positive
// flow goes from -> to: line -> chamber for the checks, chamber -> line
// for a counterbalance valve's relief.
struct PendingPortValve {
  int from, to, pilot_side;
  std::string name;
  double ratio, crack, span, area;
  std::string path;
  bool counterbalance = false;  // else a pilot-operated check
};

// The cylinder's load: resisting force, gravity, workpiece contact, force profile.
void read_load(Builder& b, const json& l, const std::string& pl, Cylinder& cyl) {
  Reader& r = b.r;
  cyl.resisting_force_n = r.number(l, pl, "cylinders[].load", "resisting_force_n");
  const std::string g = r.string(l, pl, "cylinders[].load", "gravity");
  cyl.gravity = g == "extend" ? 1 : g == "retract" ? -1 : 0;
  if (l.contains("contact")) {
    const json& k = l.at("contact");
    const std::string pk = pl + "/contact";
    if (r.object(k, pk, "cylinders[].load.contact")) {
      cyl.contact_m = r.number(k, pk, "cylinders[].load.contact", "at_mm") * 1e-3;
      if (k.contains("at_mm") && cyl.contact_m > cyl.stroke_m) {
        r.error(pk + "/at_mm", "the workpiece is beyond the stroke: the rod never reaches it",
                "put it inside 0 .. stroke_mm");
      }
      cyl.contact_n_m = r.number(k, pk, "cylinders[].load.contact", "stiffness_n_mm") * 1e3;
      cyl.contact_n_s_m = r.number(k, pk, "cylinders[].load.contact", "damping_ratio") * 2.0 *
                          std::sqrt(cyl.contact_n_m * std::max(cyl.mass_kg, 0.1));
    }
  }
  if (l.contains("force_profile")) {
    const json& fp = l.at("force_profile");
    const std::string pf = pl + "/force_profile";
    if (!fp.is_array()) {
      r.error(pf, "expected an array", "write [{\"time_s\": 0, \"force_n\": 0}, ...]");
    } else {
      for (std::size_t k = 0; k < fp.size(); ++k) {
        const std::string pk = pf + "/" + std::to_string(k);
        if (!r.object(fp[k], pk, "cylinders[].load.force_profile[]")) continue;
        ForcePoint pt{r.number(fp[k], pk, "cylinders[].load.force_profile[]", "time_s"),
                      r.number(fp[k], pk, "cylinders[].load.force_profile[]", "force_n")};
        if (!cyl.force_profile.empty() && pt.time_s <= cyl.force_profile.back().time_s) {
          r.error(pk + "/time_s", "times do not increase", "list the points in increasing time");
        }
        cyl.force_profile.push_back(pt);
      }
    }
  }
}

// The cylinder itself: name, areas, stroke, mass, friction, leakage, end
// stops and load (its nodes are added by the caller).
Cylinder read_cylinder(Builder& b, const json& c, const std::string& p, std::set<std::string>& cylinder_names) {
  Reader& r = b.r;
  const std::string s = "cylinders[]";
  Cylinder cyl;
  cyl.name = r.string(c, p, s, "name");
  if (cyl.name.empty() || cyl.name.find('.') != std::string::npos || !cylinder_names.insert(cyl.name).second ||
      b.nodes.count(cyl.name) != 0) {
    r.error(p + "/name", "\"" + cyl.name + "\" is empty, contains a dot or is already used",
            "give each cylinder its own name without dots");
  }
  const double bore = r.number(c, p, s, "bore_mm") * 1e-3;
  const double rod = r.number(c, p, s, "rod_mm") * 1e-3;
  if (rod >= bore) {
    r.error(p + "/rod_mm", "the rod is not thinner than the bore", "use a rod diameter below bore_mm");
  }
  cyl.area_a_m2 = kPi / 4.0 * bore * bore;
  cyl.area_b_m2 = kPi / 4.0 * (bore * bore - rod * rod);
  cyl.stroke_m = r.number(c, p, s, "stroke_mm") * 1e-3;
  cyl.mass_kg = r.number(c, p, s, "mass_kg");
  cyl.coulomb_n = r.number(c, p, s, "coulomb_n");
  cyl.viscous_n_s_m = r.number(c, p, s, "viscous_n_s_m");
  cyl.leak_m3_s_pa = r.number(c, p, s, "leak_mm3_s_bar") * 1e-9 / kBar;
  cyl.initial_position_m = r.number(c, p, s, "initial_position_mm") * 1e-3;
  if (cyl.initial_position_m > cyl.stroke_m) {
    r.error(p + "/initial_position_mm", "the initial position is beyond the stroke", "use 0 .. stroke_mm");
  }
  cyl.end_stop_n_m = r.number(c, p, s, "end_stop_stiffness_n_mm") * 1e3;
  cyl.end_stop_n_s_m = r.number(c, p, s, "end_stop_damping_ratio") * 2.0 * std::sqrt(cyl.end_stop_n_m * std::max(cyl.mass_kg, 0.1));
  if (c.is_object() && c.contains("load")) {
    const json& l = c.at("load");
    const std::string pl = p + "/load";
    if (r.object(l, pl, "cylinders[].load")) read_load(b, l, pl, cyl);
  }
  return cyl;
}

// The valves a cylinder carries at its ports: pilot-operated load-holding
// checks (load_holding) and a counterbalance valve, as the file asks for.
struct PortValveChoice {
  const json* lh = nullptr;  // load_holding, if it is an object
  bool poc_a = false, poc_b = false;
  const json* cb = nullptr;  // counterbalance, if it is an object
  std::string cb_side = "none";
  bool cb_a = false, cb_b = false;
};

PortValveChoice read_port_valve_choice(Builder& b, const json& c, const std::string& p) {
  Reader& r = b.r;
  PortValveChoice v;
  std::string side = "none";
  if (c.is_object() && c.contains("load_holding")) {
    v.lh = &c.at("load_holding");
    if (r.object(*v.lh, p + "/load_holding", "cylinders[].load_holding")) {
      side = r.string(*v.lh, p + "/load_holding", "cylinders[].load_holding", "side");
    } else {
      v.lh = nullptr;
    }
  }
  v.poc_a = side == "A" || side == "both";
  v.poc_b = side == "B" || side == "both";
  // Counterbalance valve: read here, its elements are added with the
  // pilot-operated checks once both line nodes exist.
  const std::string pcb = p + "/counterbalance";
  const std::string scb = "cylinders[].counterbalance";
  if (c.is_object() && c.contains("counterbalance")) {
    v.cb = &c.at("counterbalance");
    if (r.object(*v.cb, pcb, scb)) {
      v.cb_side = r.string(*v.cb, pcb, scb, "side");
    } else {
      v.cb = nullptr;
    }
  }
  v.cb_a = v.cb != nullptr && v.cb_side == "A";
  v.cb_b = v.cb != nullptr && v.cb_side == "B";
  if ((v.cb_a && v.poc_a) || (v.cb_b && v.poc_b)) {
    r.error(pcb + "/side", "port " + v.cb_side + " already carries a load-holding check",
            "use either load_holding or a counterbalance valve on one port");
  }
  return v;
}

// Oil volumes at the cylinder's ports: the chambers' dead volumes and the
// lines to the valve.
struct PortVolumes {
  double dead_a = 0.0, dead_b = 0.0;  // m^3
  double line_a = 0.0, line_b = 0.0;
};

PortVolumes read_port_volumes(Builder& b, const json& c, const std::string& p) {
  Reader& r = b.r;
  const std::string s = "cylinders[]";
  PortVolumes vol;
  vol.dead_a = r.number(c, p, s, "dead_volume_a_cm3") * 1e-6;
  vol.dead_b = r.number(c, p, s, "dead_volume_b_cm3") * 1e-6;
  vol.line_a = r.number(c, p, s, "line_volume_a_cm3") * 1e-6;
  vol.line_b = r.number(c, p, s, "line_volume_b_cm3") * 1e-6;
  return vol;
}

// The two chamber nodes of cylinder `cyl_index`. A port without a valve
// takes its line into the chamber. Returns the chambers as the ports.
CylinderPorts add_chambers(Builder& b, Cylinder& cyl, int cyl_index, const PortVolumes& vol,
                           const PortValveChoice& v) {
  const bool valve_a = v.poc_a || v.cb_a;  // a valve at the port splits its line from the chamber
  const bool valve_b = v.poc_b || v.cb_b;
  const int ch_a = b.add_node(cyl.name + ".A", vol.dead_a + (valve_a ? 0.0 : vol.line_a));
  const int ch_b = b.add_node(cyl.name + ".B", vol.dead_b + (valve_b ? 0.0 : vol.line_b));
  b.net.nodes[static_cast<std::size_t>(ch_a)].cylinder = cyl_index;
  b.net.nodes[static_cast<std::size_t>(ch_a)].side = 1;
  b.net.nodes[static_cast<std::size_t>(ch_b)].cylinder = cyl_index;
  b.net.nodes[static_cast<std::size_t>(ch_b)].side = -1;
  cyl.node_a = ch_a;
  cyl.node_b = ch_b;
  return CylinderPorts{ch_a, ch_b};
}

// The valve side of the counterbalance valve: its own line node, made
// before the load-holding checks so that their pilots see it.
void add_counterbalance_line(Builder& b, const Cylinder& cyl, const PortVolumes& vol, const PortValveChoice& v,
                             const std::string& p, CylinderPorts& ports) {
  const double line = v.cb_a ? vol.line_a : vol.line_b;
  if (line <= 0.0) {
    b.r.error(p + (v.cb_a ? "/line_volume_a_cm3" : "/line_volume_b_cm3"),
              "a counterbalance valve needs a line volume on its valve side", "use a positive line volume");
  }
  (v.cb_a ? ports.port_a : ports.port_b) = b.add_node(cyl.name + "." + v.cb_side + "_line", std::max(line, 1e-6));
}

// Pilot-operated load-holding checks line -> chamber, each piloted by the
// other line; their line nodes.
void add_load_holding_checks(Builder& b, const Cylinder& cyl, const PortVolumes& vol, const PortValveChoice& v,
                             const std::string& p, CylinderPorts& ports,
                             std::vector<PendingPortValve>& port_valves) {
  Reader& r = b.r;
  const double rho = b.net.oil.density_kg_m3;
  const json* lh = v.lh;
  const bool poc_a = v.poc_a, poc_b = v.poc_b;
  const double line_a = vol.line_a, line_b = vol.line_b;
  const int ch_a = cyl.node_a, ch_b = cyl.node_b;
  const std::string pl = p + "/load_holding";
  const std::string sl = "cylinders[].load_holding";
  const double ratio = r.number(*lh, pl, sl, "pilot_ratio");
  const double crack = r.number(*lh, pl, sl, "cracking_bar") * kBar;
  const double span = r.number(*lh, pl, sl, "full_open_bar") * kBar;
  const double area = area_for(r.number(*lh, pl, sl, "rated_flow_l_min") * kLitrePerMin,
                               r.number(*lh, pl, sl, "rated_dp_bar") * kBar, b.cd, rho);
  if (poc_a) {
    if (line_a <= 0.0) r.error(p + "/line_volume_a_cm3", "a load-holding valve needs a line volume on its valve side", "use a positive line volume");
    ports.port_a = b.add_node(cyl.name + ".A_line", std::max(line_a, 1e-6));
  }
  if (poc_b) {
    if (line_b <= 0.0) r.error(p + "/line_volume_b_cm3", "a load-holding valve needs a line volume on its valve side", "use a positive line volume");
    ports.port_b = b.add_node(cyl.name + ".B_line", std::max(line_b, 1e-6));
  }
  if (poc_a) port_valves.push_back({ports.port_a, ch_a, ports.port_b, cyl.name + ".hold_A", ratio, crack, span, area, pl});
  if (poc_b) port_valves.push_back({ports.port_b, ch_b, ports.port_a, cyl.name + ".hold_B", ratio, crack, span, area, pl});
}

// The counterbalance valve chamber -> line, piloted by the other line, and
// its free-flow check into the chamber.
void add_counterbalance(Builder& b, const Cylinder& cyl, const PortValveChoice& v, const std::string& p,
                        const CylinderPorts& ports, std::vector<PendingPortValve>& port_valves) {
  Reader& r = b.r;
  const double rho = b.net.oil.density_kg_m3;
  const json* cb = v.cb;
  const bool cb_a = v.cb_a;
  const std::string& cb_side = v.cb_side;
  const std::string pcb = p + "/counterbalance";
  const std::string scb = "cylinders[].counterbalance";
  const int port = cb_a ? ports.port_a : ports.port_b;
  const int chamber = cb_a ? cyl.node_a : cyl.node_b;
  const int pilot = cb_a ? ports.port_b : ports.port_a;  // the other line (the one that drives)
  const double area = area_for(r.number(*cb, pcb, scb, "rated_flow_l_min") * kLitrePerMin,
                               r.number(*cb, pcb, scb, "rated_dp_bar") * kBar, b.cd, rho);
  port_valves.push_back({chamber, port, pilot, cyl.name + ".counterbalance_" + cb_side,
                         r.number(*cb, pcb, scb, "pilot_ratio"), r.number(*cb, pcb, scb, "setting_bar") * kBar,
                         r.number(*cb, pcb, scb, "full_open_bar") * kBar, area, pcb, /*counterbalance=*/true});
  // The free-flow check into the chamber: a plain check, fully open 2 bar above cracking.
  port_valves.push_back({port, chamber, -1, cyl.name + ".counterbalance_" + cb_side + "_check", 0.0,
                         r.number(*cb, pcb, scb, "check_cracking_bar") * kBar, 2.0 * kBar, area, pcb});
}

// The port valves as elements, after every cylinder's nodes exist.
void add_port_valves(Builder& b, const std::vector<PendingPortValve>& port_valves) {
  for (const PendingPortValve& q : port_valves) {
    Element e;
    e.kind = q.counterbalance ? ElementKind::kCounterbalance : ElementKind::kCheck;
    e.name = q.name;
    e.from = q.from;
    e.to = q.to;
    e.cd = b.cd;
    e.area_m2 = q.area;
    e.cracking_pa = q.crack;
    e.full_open_span_pa = q.span;
    e.pilot = q.pilot_side;
    e.pilot_ratio = q.ratio;
    b.add_element(e, q.path);
  }
}

// The cylinders of the functions, in function order: chambers, lines and the
// valves at their ports. Returns the valve-side node of each function's
// ports (a chamber, or the line in front of a port valve).
std::vector<CylinderPorts> build_cylinders(Builder& b, const Functions& fx) {
  std::vector<CylinderPorts> ports(fx.count());
  std::set<std::string> cylinder_names;
  std::vector<PendingPortValve> port_valves;
  for (std::size_t f = 0; f < fx.count(); ++f) {
    const int ci = fx.cylinder_of[f];
    if (ci < 0) continue;
    const json& c = (*fx.cylinders)[static_cast<std::size_t>(ci)];
    const std::string p = b.root + "/cylinders/" + std::to_string(ci);
    Cylinder cyl = read_cylinder(b, c, p, cylinder_names);
    const PortVolumes vol = read_port_volumes(b, c, p);
    const PortValveChoice v = read_port_valve_choice(b, c, p);
    ports[f] = add_chambers(b, cyl, static_cast<int>(b.net.cylinders.size()), vol, v);
    if (v.cb_a || v.cb_b) add_counterbalance_line(b, cyl, vol, v, p, ports[f]);
    if (v.lh != nullptr && (v.poc_a || v.poc_b)) add_load_holding_checks(b, cyl, vol, v, p, ports[f], port_valves);
    if (v.cb_a || v.cb_b) add_counterbalance(b, cyl, v, p, ports[f], port_valves);
    b.net.cylinders.push_back(cyl);
  }
  add_port_valves(b, port_valves);
  return ports;
}

// --- through (carry-over) passages -------------------------------------------

// Which upstream function feeds each downstream valve, and the node between them.
struct Supplies {
  std::vector<int> supply_of;     // per function: -1 = the pump, else the upstream function
  std::vector<int> through_node;  // per function: the node its centre passes P on to, -1 if none
};

Supplies build_through_passages(Builder& b, const Functions& fx) {
  Reader& r = b.r;
  const core::MachineConfig& machine = b.machine;
  const std::size_t nf = fx.count();
  const json& valves = *fx.valves;
  Supplies out;
  std::vector<int>& supply_of = out.supply_of;
  supply_of.assign(nf, -1);
  for (std::size_t f = 0; f < nf; ++f) {
    const int vi = fx.valve_of[f];
    if (vi < 0) continue;
    const json& v = valves[static_cast<std::size_t>(vi)];
    const std::string p = b.root + "/valves/" + std::to_string(vi);
    if (!v.contains("supply")) continue;
    const json& s = v.at("supply");
    if (s.is_string()) {
      if (s.get<std::string>() != "pump") {
        r.error(p + "/supply", "\"" + s.get<std::string>() + "\" is not a supply",
                "write \"pump\" or {\"through_of\": \"FUNCTION\"}");
      }
      continue;
    }
    if (!r.object(s, p + "/supply", "valves[].supply")) continue;
    const std::string up = r.string(s, p + "/supply", "valves[].supply", "through_of");
    const int u = fx.index(up);
    if (u < 0 || static_cast<std::size_t>(u) == f) {
      r.error(p + "/supply/through_of", "\"" + up + "\" is not another function of the machine file",
              "use one of: " + fx.list);
      continue;
    }
    const core::ValveCentre uc = machine.functions[static_cast<std::size_t>(u)].centre;
    const core::CentreRow* upstream = core::centre_row(uc);
    if (upstream == nullptr || !upstream->p_to_t) {
      r.error(p + "/supply/through_of",
              "the valve of \"" + up + "\" has a " + centre_name(uc) + " centre, which does not pass P on",
              "give the upstream function a tandem or open centre in the machine file, or supply this valve from the pump");
      continue;
    }
    for (std::size_t g = 0; g < nf; ++g) {
      if (supply_of[g] == u) {
        r.error(p + "/supply/through_of", "\"" + up + "\" already feeds \"" + fx.names[g] + "\"",
                "a through passage feeds one downstream valve");
      }
    }
    supply_of[f] = u;
  }
  // Reject loops of through passages.
  for (std::size_t f = 0; f < nf; ++f) {
    int u = supply_of[f];
    for (std::size_t k = 0; u >= 0 && k <= nf; ++k) u = supply_of[static_cast<std::size_t>(u)];
    if (u >= 0) {
      r.error(b.root + "/valves/" + std::to_string(fx.valve_of[f]) + "/supply", "the through passages form a loop",
              "make the chain of through_of end at a valve supplied by the pump");
      supply_of[f] = -1;
    }
  }
  out.through_node.assign(nf, -1);
  for (std::size_t f = 0; f < nf; ++f) {
    if (supply_of[f] < 0) continue;
    const auto u = static_cast<std::size_t>(supply_of[f]);
    const json& uv = fx.valve_of[u] >= 0 ? valves[static_cast<std::size_t>(fx.valve_of[u])] : b.empty;
    out.through_node[u] = b.add_node(fx.names[u] + ".through",
                                     r.number(uv, b.root + "/valves/" + std::to_string(fx.valve_of[u]), "valves[]",
                                              "through_line_volume_cm3") * 1e-6);
  }
  return out;
}

// --- directional valves ------------------------------------------------------

// Checks a valve entry against its function's valve kind and centre in the
// machine file. Returns the centre the plant builds (none for a 4/2 valve).
core::ValveCentre check_valve_entry(Builder& b, const Functions& fx, const Supplies& supplies, std::size_t f,
                                    const json& v, const std::string& p) {
  Reader& r = b.r;
  const core::FunctionConfig& fc = b.machine.functions[f];
  const bool prop = core::is_proportional(fc.valve);
  const core::ValveKindRow* kind_row = core::valve_kind_row(fc.valve);
  const bool four_two = kind_row == nullptr || !kind_row->has_centre;
  const std::string where = " (machine file: functions \"" + fx.names[f] + "\" valve kind " + kind_name(fc.valve) + ")";
  if (prop && v.contains("switch_time_ms")) {
    r.error(p + "/switch_time_ms", "only solenoid valves have a switch time" + where, "use \"response\" instead");
  }
  if (!prop && v.contains("response")) {
    r.error(p + "/response", "only proportional valves have a response" + where, "use \"switch_time_ms\" instead");
  }
  const core::ValveCentre centre = four_two ? core::ValveCentre::kNotApplicable : fc.centre;
  if (!four_two && centre == core::ValveCentre::kNotApplicable) {
    r.error(p + "/function", "the 4/3 valve of \"" + fx.names[f] + "\" has no centre type in the machine file",
            "set the centre in the function's valve object of the machine file");
  }
  const core::CentreRow* centre_facts = core::centre_row(centre);
  const bool throttled = centre_facts != nullptr && centre_facts->throttled;
  if (v.contains("bleed_orifice_mm2") && !throttled) {
    r.error(p + "/bleed_orifice_mm2", "only a bleed centre has bleed orifices (this one is " + centre_name(centre) + ")",
            "remove the field or give the function a bleed centre in the machine file");
  }
  if (throttled && !v.contains("bleed_orifice_mm2")) {
    r.error(p + "/bleed_orifice_mm2", "a bleed centre needs the bleed orifice area", "add \"bleed_orifice_mm2\"");
  }
  if (v.contains("through_line_volume_cm3") && supplies.through_node[f] < 0) {
    r.error(p + "/through_line_volume_cm3", "no downstream valve takes its supply through this valve",
            "remove the field or point a downstream valve's supply at \"" + fx.names[f] + "\"");
  }
  return centre;
}

// The valve's spool: a proportional response (first or second order) or a
// solenoid's switch time. Returns its index, -1 if the response is not an object.
int add_valve_spool(Builder& b, const std::string& function, core::ValveKind kind, const json& v,
                    const std::string& p) {
  Reader& r = b.r;
  const core::ValveKindRow* kind_row = core::valve_kind_row(kind);
  const bool four_two = kind_row == nullptr || !kind_row->has_centre;
  const std::string s = "valves[]";
  int spool = -1;
  if (core::is_proportional(kind)) {
    const json& resp = v.contains("response") ? v.at("response") : b.empty;
    const std::string pr = p + "/response";
    if (r.object(resp, pr, "valves[].response")) {
      const double order = r.number(resp, pr, "valves[].response", "order");
      if (order != 1.0 && order != 2.0) r.error(pr + "/order", "order must be 1 or 2", "write 1 or 2");
      if (order == 1.0) {
        spool = b.add_spool(function, SpoolDynamics::kFirstOrder, 0,
                            r.number(resp, pr, "valves[].response", "time_constant_ms") * 1e-3, 0, 0, 0.0);
      } else {
        spool = b.add_spool(function, SpoolDynamics::kSecondOrder, 0, 0,
                            2.0 * kPi * r.number(resp, pr, "valves[].response", "natural_hz"),
                            r.number(resp, pr, "valves[].response", "damping"), 0.0);
      }
    }
  } else {
    const double ts = r.number(v, p, s, "switch_time_ms") * 1e-3;
    // A 4/2 spool crosses the whole stroke (-1 to +1) in the switch time.
    spool = b.add_spool(function, SpoolDynamics::kRateLimited, (four_two ? 2.0 : 1.0) / ts, 0, 0, 0,
                        four_two ? -1.0 : 0.0);
  }
  return spool;
}

// Each function's directional valve: its spool, the four metering edges
// and the centre passages its centre type has.
void build_directional_valves(Builder& b, const Functions& fx, const std::vector<CylinderPorts>& ports,
                              const Supplies& supplies) {
  Reader& r = b.r;
  const double rho = b.net.oil.density_kg_m3;
  const std::size_t nf = fx.count();
  const std::vector<int>& supply_of = supplies.supply_of;
  const std::vector<int>& through_node = supplies.through_node;
  for (std::size_t f = 0; f < nf; ++f) {
    const int vi = fx.valve_of[f];
    if (vi < 0 || fx.cylinder_of[f] < 0) continue;
    const json& v = (*fx.valves)[static_cast<std::size_t>(vi)];
    const std::string p = b.root + "/valves/" + std::to_string(vi);
    const std::string s = "valves[]";
    const core::FunctionConfig& fc = b.machine.functions[f];
    const core::ValveCentre centre = check_valve_entry(b, fx, supplies, f, v, p);
    const double q = r.number(v, p, s, "rated_flow_l_min") * kLitrePerMin;
    // Rated flow at the total drop over two edges, half per edge (check-values 4.2, [SRC] Fluid Power Journal).
    const double dp_edge = 0.5 * r.number(v, p, s, "rated_dp_bar") * kBar;
    const double a_edge = area_for(q, dp_edge, b.cd, rho);
    const double overlap = r.number(v, p, s, "overlap_percent") / 100.0;
    const double leak = r.number(v, p, s, "leak_mm2") * 1e-6;
    const double a_centre = r.has(v, "centre_area_mm2") ? r.number(v, p, s, "centre_area_mm2") * 1e-6 : a_edge;
    const double width = std::max(overlap, kMinCentreWidth);

    const int spool = add_valve_spool(b, fx.names[f], fc.valve, v, p);
    if (spool < 0) continue;
    Plant::Wiring::Valve link;
    link.function = fx.names[f];
    link.config = fc;
    link.spool = spool;
    b.w->valves.push_back(link);

    const int P = supply_of[f] < 0 ? b.pump : through_node[static_cast<std::size_t>(supply_of[f])];
    const int T = b.tank;
    const int A = ports[f].port_a;
    const int B = ports[f].port_b;
    const int PT = through_node[f] >= 0 ? through_node[f] : T;  // centre P passage goes on downstream if used
    const std::string n = fx.names[f];
    b.add_element(b.edge(n + ".P-A", P, A, spool, EdgeOpening::kPositive, a_edge, overlap, leak), p);
    b.add_element(b.edge(n + ".B-T", B, T, spool, EdgeOpening::kPositive, a_edge, overlap, leak), p);
    b.add_element(b.edge(n + ".P-B", P, B, spool, EdgeOpening::kNegative, a_edge, overlap, leak), p);
    b.add_element(b.edge(n + ".A-T", A, T, spool, EdgeOpening::kNegative, a_edge, overlap, leak), p);
    auto centre_edge = [&](const std::string& name, int from, int to, double area) {
      b.add_element(b.edge(n + ".centre." + name, from, to, spool, EdgeOpening::kCentre, area, 0.0, 0.0, width), p);
    };
    // Centre flow paths, from the centre's row in core::kCentres (check-values 4.19).
    if (const core::CentreRow* c = core::centre_row(centre)) {
      const double a_vent = c->throttled ? r.number(v, p, s, "bleed_orifice_mm2") * 1e-6 : a_centre;
      if (c->p_to_t) centre_edge(PT == T ? "P-T" : "P-through", P, PT, a_centre);
      if (c->p_to_a) centre_edge("P-A", P, A, a_centre);
      if (c->p_to_b) centre_edge("P-B", P, B, a_centre);
      if (c->a_to_t) centre_edge("A-T", A, T, a_vent);
      if (c->b_to_t) centre_edge("B-T", B, T, a_vent);
    }
  }
}

// --- relief ------------------------------------------------------------------

// The main pressure-relief valve, at the pump unless "at" names a node.
void build_relief(Builder& b) {
  Reader& r = b.r;
  const std::string pr = b.root + "/relief";
  if (!(b.plant.contains("relief") && r.object(b.plant.at("relief"), pr, "relief"))) return;
  const json& rj = b.plant.at("relief");
  Element e;
  e.kind = ElementKind::kRelief;
  e.name = "relief";
  e.from = r.has(rj, "at") ? b.node_ref(rj, pr, "relief", "at") : b.pump;
  e.to = b.tank;
  e.cracking_pa = r.number(rj, pr, "relief", "cracking_bar") * kBar;
  // bar per L/min -> Pa per m^3/s
  e.override_pa_s_m3 = r.number(rj, pr, "relief", "override_bar_per_l_min") * kBar / kLitrePerMin;
  e.blend_pa = 0.5 * kBar;  // smooth corner at cracking (our regularisation)
  if (e.from >= 0) b.add_element(e, pr);
}

// --- on/off valves, checks, orifices -----------------------------------------

// 2/2 on/off valves between two nodes, each switched by a coil of the machine file.
void build_on_off_valves(Builder& b) {
  Reader& r = b.r;
  const core::MachineConfig& machine = b.machine;
  const double rho = b.net.oil.density_kg_m3;
  const json& onoff = b.array_of("on_off_valves");
  for (std::size_t i = 0; i < onoff.size(); ++i) {
    const std::string p = b.root + "/on_off_valves/" + std::to_string(i);
    const std::string s = "on_off_valves[]";
    const json& o = onoff[i];
    if (!r.object(o, p, s)) continue;
    const std::string name = r.string(o, p, s, "name");
    const std::string coil = r.string(o, p, s, "coil");
    const int ci = find_index(coil, machine.coils.data(), machine.coil_count);
    if (ci < 0) r.error(p + "/coil", "no coil named \"" + coil + "\" in the machine file", "add it to the machine file's coils or correct the name");
    const int from = b.node_ref(o, p, s, "from");
    const int to = b.node_ref(o, p, s, "to");
    const bool no = r.boolean(o, p, s, "normally_open");
    const double area = area_for(r.number(o, p, s, "rated_flow_l_min") * kLitrePerMin,
                                 r.number(o, p, s, "rated_dp_bar") * kBar, b.cd, rho);
    const double ts = r.number(o, p, s, "switch_time_ms") * 1e-3;
    if (ci < 0 || from < 0 || to < 0) continue;
    const int spool = b.add_spool(name, SpoolDynamics::kRateLimited, 1.0 / ts, 0, 0, 0, no ? 1.0 : 0.0);
    b.add_element(b.edge(name, from, to, spool, EdgeOpening::kPositive, area, 0.0, 0.0), p);
    b.w->on_off.push_back({name, static_cast<std::uint8_t>(ci), spool, no});
  }
}

// Check valves between two nodes.
void build_check_valves(Builder& b) {
  Reader& r = b.r;
  const double rho = b.net.oil.density_kg_m3;
  const json& checks = b.array_of("check_valves");
  for (std::size_t i = 0; i < checks.size(); ++i) {
    const std::string p = b.root + "/check_valves/" + std::to_string(i);
    const std::string s = "check_valves[]";
    const json& o = checks[i];
    if (!r.object(o, p, s)) continue;
    Element e;
    e.kind = ElementKind::kCheck;
    e.name = r.string(o, p, s, "name");
    e.from = b.node_ref(o, p, s, "from");
    e.to = b.node_ref(o, p, s, "to");
    e.cd = b.cd;
    e.cracking_pa = r.number(o, p, s, "cracking_bar") * kBar;
    e.full_open_span_pa = r.number(o, p, s, "full_open_bar") * kBar;
    e.area_m2 = area_for(r.number(o, p, s, "rated_flow_l_min") * kLitrePerMin, r.number(o, p, s, "rated_dp_bar") * kBar,
                         b.cd, rho);
    if (e.from >= 0 && e.to >= 0) b.add_element(e, p);
  }
}

// Fixed orifices between two nodes, sized by diameter or by area.
void build_orifices(Builder& b) {
  Reader& r = b.r;
  const json& orifices = b.array_of("orifices");
  for (std::size_t i = 0; i < orifices.size(); ++i) {
    const std::string p = b.root + "/orifices/" + std::to_string(i);
    const std::string s = "orifices[]";
    const json& o = orifices[i];
    if (!r.object(o, p, s)) continue;
    Element e;
    e.kind = ElementKind::kOrifice;
    e.name = r.string(o, p, s, "name");
    e.from = b.node_ref(o, p, s, "from");
    e.to = b.node_ref(o, p, s, "to");
    e.cd = r.has(o, "discharge_coefficient") ? r.number(o, p, s, "discharge_coefficient") : b.cd;
    if (r.has(o, "diameter_mm") == r.has(o, "area_mm2")) {
      r.error(p, "give exactly one of diameter_mm and area_mm2", "keep one of the two");
    } else if (r.has(o, "diameter_mm")) {
      const double d = r.number(o, p, s, "diameter_mm") * 1e-3;
      e.area_m2 = kPi / 4.0 * d * d;
    } else {
      e.area_m2 = r.number(o, p, s, "area_mm2") * 1e-6;
    }
    if (e.from >= 0 && e.to >= 0) b.add_element(e, p);
  }
}

// --- sensors -----------------------------------------------------------------

// One sensors[] entry while it is read: its JSON, its path and the checks
// every kind shares.
struct SensorEntry {
  Builder& b;
  const json& o;
  const std::string& p;
  const std::string& kind;
  const std::string s = "sensors[]";

  // Fields other than kind, input and `keys` are errors.
  void allow_only(std::initializer_list<const char*> keys) {
    for (auto it = o.begin(); it != o.end(); ++it) {
      bool ok = it.key() == "kind" || it.key() == "input";
      for (const char* k : keys) ok = ok || it.key() == k;
      if (!ok) b.r.error(p + "/" + it.key(), "a " + kind + " sensor has no field \"" + it.key() + "\"", "remove it");
    }
  }
  void need(const char* key) {
    if (!o.contains(key)) b.r.error(p + "/" + key, "a " + kind + " sensor needs this field", std::string("add \"") + key + "\"");
  }
  // The index of the cylinder it names, -1 if none.
  int cylinder_ref() {
    need("cylinder");
    const std::string cn = b.r.string(o, p, s, "cylinder");
    for (std::size_t c = 0; c < b.net.cylinders.size(); ++c) {
      if (b.net.cylinders[c].name == cn) return static_cast<int>(c);
    }
    if (o.contains("cylinder")) b.r.error(p + "/cylinder", "no cylinder named \"" + cn + "\"", "use a name from plant.cylinders");
    return -1;
  }
};

// A pressure or position transducer on an analog input. Returns false if
// the sensor cannot be wired.
bool read_transducer(SensorEntry& e, Plant::Wiring::Sensor& sn, std::set<std::string>& analog_owned) {
  Builder& b = e.b;
  Reader& r = b.r;
  const core::MachineConfig& machine = b.machine;
  const std::string& p = e.p;
  const int ai = [&] {
    for (std::size_t k = 0; k < machine.analog_input_count; ++k) {
      if (core_name(machine.analog_inputs[k].name) == sn.input_name) return static_cast<int>(k);
    }
    return -1;
  }();
  if (ai < 0) {
    r.error(p + "/input", "no analog input named \"" + sn.input_name + "\" in the machine file",
            "add it to the machine file's analog inputs or correct the name");
    return false;
  }
  if (!analog_owned.insert(sn.input_name).second) {
    r.error(p + "/input", "analog input \"" + sn.input_name + "\" already has a sensor", "one sensor per input");
  }
  const core::AnalogInputConfig& ac = machine.analog_inputs[static_cast<std::size_t>(ai)];
  sn.input = static_cast<std::size_t>(ai);
  sn.current_loop = ac.signal == core::AnalogSignal::kCurrent4To20;
  sn.range_min = static_cast<double>(ac.range_min);
  sn.range_max = static_cast<double>(ac.range_max);
  if (sn.current_loop && !(sn.range_max != sn.range_min)) {
    r.error(p + "/input", "the 4-20 mA input \"" + sn.input_name + "\" has an empty range in the machine file",
            "give the input different values at 4 and 20 mA");
  }
  const std::string unit = core_name(ac.unit);
  const std::map<std::string, double> pressure_units{{"bar", 1e5}, {"MPa", 1e6}, {"kPa", 1e3}, {"Pa", 1.0}, {"psi", 6894.757}};
  const std::map<std::string, double> length_units{{"mm", 1e-3}, {"cm", 1e-2}, {"m", 1.0}};
  const auto& units = sn.kind == SensorKind::kPressure ? pressure_units : length_units;
  auto u = units.find(unit);
  if (u == units.end()) {
    std::string list;
    for (const auto& [k, x] : units) list += (list.empty() ? "" : ", ") + k;
    r.error(p + "/input", "the machine file gives input \"" + sn.input_name + "\" the unit \"" + unit +
                              "\", which a " + e.kind + " sensor cannot deliver",
            "use one of: " + list);
  } else {
    sn.unit_si = u->second;
  }
  if (sn.kind == SensorKind::kPressure) {
    e.allow_only({"at"});
    e.need("at");
    sn.node = b.node_ref(e.o, p, e.s, "at");
    if (sn.node < 0) return false;
  } else {
    e.allow_only({"cylinder"});
    sn.cylinder = e.cylinder_ref();
    if (sn.cylinder < 0) return false;
  }
  return true;
}

// A limit switch or a pressure switch on a digital input. Returns false if
// the switch cannot be wired.
bool read_switch(SensorEntry& e, Plant::Wiring::Sensor& sn, std::set<std::string>& digital_owned) {
  Builder& b = e.b;
  Reader& r = b.r;
  const core::MachineConfig& machine = b.machine;
  const json& o = e.o;
  const std::string& p = e.p;
  const std::string& s = e.s;
  const int di = find_index(sn.input_name, machine.digital_inputs.data(), machine.digital_input_count);
  if (di < 0) {
    r.error(p + "/input", "no digital input named \"" + sn.input_name + "\" in the machine file",
            "add it to the machine file's digital inputs or correct the name");
    return false;
  }
  if (!digital_owned.insert(sn.input_name).second) {
    r.error(p + "/input", "digital input \"" + sn.input_name + "\" already has a sensor", "one sensor per input");
  }
  sn.input = static_cast<std::size_t>(di);
  if (sn.kind == SensorKind::kLimitSwitch) {
    e.allow_only({"cylinder", "at_mm", "active", "hysteresis_mm"});
    e.need("at_mm");
    e.need("active");
    sn.cylinder = e.cylinder_ref();
    sn.threshold_si = r.number(o, p, s, "at_mm") * 1e-3;
    sn.hysteresis_si = r.number(o, p, s, "hysteresis_mm") * 1e-3;
    sn.active_above = r.string(o, p, s, "active") == "above";
    if (sn.cylinder < 0) return false;
    // A switching point off the stroke would read the same all the time.
    const double stroke = b.net.cylinders[static_cast<std::size_t>(sn.cylinder)].stroke_m;
    if (o.contains("at_mm") && (sn.threshold_si < 0.0 || sn.threshold_si > stroke)) {
      char buf[160];
      std::snprintf(buf, sizeof buf, "%g mm is off the cylinder's stroke (0 .. %g mm): the switch would never change",
                    sn.threshold_si * 1e3, stroke * 1e3);
      r.error(p + "/at_mm", buf, "put the switching point on the stroke");
    }
  } else {
    e.allow_only({"at", "above_bar", "below_bar", "hysteresis_bar"});
    e.need("at");
    if (o.contains("above_bar") == o.contains("below_bar")) {
      r.error(p, "a pressure switch needs exactly one of above_bar and below_bar", "keep one of the two");
    }
    sn.node = b.node_ref(o, p, s, "at");
    sn.active_above = o.contains("above_bar");
    sn.threshold_si = (sn.active_above ? r.number(o, p, s, "above_bar") : r.number(o, p, s, "below_bar")) * kBar;
    sn.hysteresis_si = r.number(o, p, s, "hysteresis_bar") * kBar;
    if (sn.node < 0) return false;
  }
  return true;
}

// Transducers and switches wired to the machine file's inputs.
void build_sensors(Builder& b) {
  Reader& r = b.r;
  std::set<std::string> analog_owned, digital_owned;
  const json& sensors = b.array_of("sensors");
  for (std::size_t i = 0; i < sensors.size(); ++i) {
    const std::string p = b.root + "/sensors/" + std::to_string(i);
    const std::string s = "sensors[]";
    const json& o = sensors[i];
    if (!r.object(o, p, s)) continue;
    Plant::Wiring::Sensor sn;
    const std::string kind = r.string(o, p, s, "kind");
    sn.input_name = r.string(o, p, s, "input");
    const bool analog = kind == "pressure" || kind == "position";
    sn.kind = kind == "pressure" ? SensorKind::kPressure
              : kind == "position" ? SensorKind::kPosition
              : kind == "limit_switch" ? SensorKind::kLimitSwitch
                                       : SensorKind::kPressureSwitch;
    SensorEntry entry{b, o, p, kind};
    const bool wired = analog ? read_transducer(entry, sn, analog_owned) : read_switch(entry, sn, digital_owned);
    if (wired) b.w->sensors.push_back(sn);
  }
}

}  // namespace

void build_components(Builder& b) {
  build_oil(b);
  build_pump(b);
  build_dump_valve(b);
  build_volumes(b);
  const Functions fx = match_functions(b);
  const std::vector<CylinderPorts> ports = build_cylinders(b, fx);
  const Supplies supplies = build_through_passages(b, fx);
  build_directional_valves(b, fx, ports, supplies);
  build_relief(b);
  build_on_off_valves(b);
  build_check_valves(b);
  build_orifices(b);
  build_sensors(b);
}

}  // namespace spoolstep::hostsim::plant_build
