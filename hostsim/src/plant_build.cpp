// Builds a Plant from the machine file's "plant" object and the core's
// MachineConfig. Every problem becomes a PlantError naming the JSON pointer,
// the reason and the fix; nothing is built unless there are none.
#include <cmath>
#include <exception>
#include <map>
#include <optional>
#include <set>

#include <nlohmann/json.hpp>

#include "plant_params.hpp"
#include "plant_wiring.hpp"
#include "spoolstep/hostsim/plant.hpp"

namespace spoolstep::hostsim {
namespace {

using nlohmann::json;

constexpr double kPi = 3.14159265358979323846;
constexpr double kBar = 1e5;
constexpr double kLitrePerMin = 1e-3 / 60.0;
constexpr double kMinCentreWidth = 0.05;  // centre passages close over at least 5 % of travel

std::string core_name(const core::Name& n) { return std::string(n.text.data()); }

std::string pointer_token(const std::string& key) {
  std::string out;
  for (char c : key) {
    if (c == '~') out += "~0";
    else if (c == '/') out += "~1";
    else out += c;
  }
  return out;
}

std::string kind_name(core::ValveKind k) {
  const core::ValveKindRow* row = core::valve_kind_row(k);
  return row != nullptr ? row->text : "unknown";
}

std::string centre_name(core::ValveCentre c) {
  const core::CentreRow* row = core::centre_row(c);
  return row != nullptr ? row->key : "unknown";
}

// Area that passes `q` at `dp` through one edge by the orifice equation
// (check-values 4.1, [SRC] Rabie eq. 2.36).
double area_for(double q_m3_s, double dp_pa, double cd, double rho) {
  return q_m3_s / (cd * std::sqrt(2.0 * dp_pa / rho));
}

class Reader {
 public:
  Reader(std::string file, std::vector<PlantError>& errors) : file_(std::move(file)), errors_(errors) {
    params_ = plant_params(count_);
  }

  void error(const std::string& path, const std::string& reason, const std::string& fix) {
    errors_.push_back(PlantError{file_, path, reason, fix});
  }

  const ParamSpec* spec(const std::string& section, const std::string& key) const {
    for (std::size_t i = 0; i < count_; ++i) {
      if (section == params_[i].section && key == params_[i].key) return &params_[i];
    }
    return nullptr;
  }

  /// Checks that j is an object whose keys are all known in `section` and
  /// that the required ones are there. Returns false if j is not an object.
  bool object(const json& j, const std::string& path, const std::string& section) {
    if (!j.is_object()) {
      error(path, "expected a JSON object, found " + std::string(j.type_name()),
            "write it as { \"field\": value, ... }");
      return false;
    }
    std::string known;
    std::vector<std::string> fields;
    for (std::size_t i = 0; i < count_; ++i) {
      if (section != params_[i].section) continue;
      known += (known.empty() ? "" : ", ") + std::string(params_[i].key);
      fields.emplace_back(params_[i].key);
    }
    for (auto it = j.begin(); it != j.end(); ++it) {
      if (spec(section, it.key()) == nullptr) {
        error(path + "/" + pointer_token(it.key()), "unknown field \"" + jsondoc::printable(it.key()) + "\"",
              jsondoc::did_you_mean(it.key(), fields, "remove it or use one of: " + known));
      }
    }
    for (std::size_t i = 0; i < count_; ++i) {
      const ParamSpec& s = params_[i];
      if (section == s.section && s.required && !j.contains(s.key)) {
        error(path + "/" + s.key, "missing required field",
              std::string("add \"") + s.key + "\"" + (s.unit[0] ? std::string(" in ") + s.unit : std::string()) +
                  ": " + s.description);
      }
    }
    return true;
  }

  double number(const json& obj, const std::string& path, const std::string& section, const std::string& key) {
    const ParamSpec* s = spec(section, key);
    const double def = s ? s->default_value : 0.0;
    if (!obj.is_object() || !obj.contains(key)) return def;
    const json& v = obj.at(key);
    const std::string p = path + "/" + key;
    if (!v.is_number()) {
      error(p, "expected a number, found " + std::string(v.type_name()),
            std::string("write a number") + (s && s->unit[0] ? std::string(" in ") + s->unit : std::string()));
      return def;
    }
    const double x = v.get<double>();
    if (s != nullptr && (x < s->min || x > s->max || !std::isfinite(x))) {
      char buf[160];
      std::snprintf(buf, sizeof buf, "%g is outside the range %g .. %g%s%s", x, s->min, s->max, s->unit[0] ? " " : "",
                    s->unit);
      error(p, buf, "use a value inside the range");
      return def;
    }
    return x;
  }

  /// A number that must be whole (counts).
  int whole_number(const json& obj, const std::string& path, const std::string& section, const std::string& key) {
    const double x = number(obj, path, section, key);
    if (x != std::floor(x)) {
      char buf[96];
      std::snprintf(buf, sizeof buf, "%g is not a whole number", x);
      error(path + "/" + key, buf, "write a whole number");
      return static_cast<int>(std::floor(x));
    }
    return static_cast<int>(x);
  }

  bool has(const json& obj, const std::string& key) const { return obj.is_object() && obj.contains(key); }

  bool boolean(const json& obj, const std::string& path, const std::string& section, const std::string& key) {
    const ParamSpec* s = spec(section, key);
    const bool def = s ? s->default_value != 0.0 : false;
    if (!has(obj, key)) return def;
    const json& v = obj.at(key);
    if (!v.is_boolean()) {
      error(path + "/" + key, "expected true or false, found " + std::string(v.type_name()), "write true or false");
      return def;
    }
    return v.get<bool>();
  }

  std::string string(const json& obj, const std::string& path, const std::string& section, const std::string& key) {
    const ParamSpec* s = spec(section, key);
    std::string def;
    if (s && s->choices) {
      def = s->choices;
      def = def.substr(0, def.find('|'));
    }
    if (!has(obj, key)) return def;
    const json& v = obj.at(key);
    if (!v.is_string()) {
      error(path + "/" + key, "expected a string, found " + std::string(v.type_name()), "write it in quotes");
      return def;
    }
    std::string x = v.get<std::string>();
    if (s && s->choices) {
      const std::string choices = s->choices;
      bool ok = false;
      std::size_t start = 0;
      while (start <= choices.size()) {
        const std::size_t bar = choices.find('|', start);
        const std::string c = choices.substr(start, bar == std::string::npos ? std::string::npos : bar - start);
        if (c == x) ok = true;
        if (bar == std::string::npos) break;
        start = bar + 1;
      }
      if (!ok) {
        std::string list = choices;
        for (char& c : list) if (c == '|') c = ',';
        error(path + "/" + key, "\"" + x + "\" is not one of the allowed values", "use one of: " + list);
        return def;
      }
    }
    return x;
  }

 private:
  std::string file_;
  std::vector<PlantError>& errors_;
  const ParamSpec* params_ = nullptr;
  std::size_t count_ = 0;
};

struct Builder {
  Reader r;
  const core::MachineConfig& m;
  Network net;
  std::unique_ptr<Plant::Wiring> w = std::make_unique<Plant::Wiring>();
  std::map<std::string, int> nodes;      // name -> index
  std::set<std::string> element_names;
  double cd = 0.61;
  int tank = -1, pump = -1;

  Builder(const std::string& file, std::vector<PlantError>& errors, const core::MachineConfig& machine)
      : r(file, errors), m(machine) {}

  int add_node(const std::string& name, double volume_m3, bool fixed = false, double p = 0.0) {
    Node n;
    n.name = name;
    n.fixed = fixed;
    n.fixed_pressure_pa = p;
    n.base_volume_m3 = volume_m3;
    net.nodes.push_back(n);
    const int idx = static_cast<int>(net.nodes.size() - 1);
    nodes[name] = idx;
    return idx;
  }

  int node_ref(const json& obj, const std::string& path, const std::string& section, const std::string& key) {
    if (!r.has(obj, key)) return -1;
    const std::string name = r.string(obj, path, section, key);
    auto it = nodes.find(name);
    if (it == nodes.end()) {
      std::string list;
      std::vector<std::string> names;
      for (const auto& [n, i] : nodes) {
        list += (list.empty() ? "" : ", ") + n;
        names.push_back(n);
      }
      r.error(path + "/" + key, "no node named \"" + jsondoc::printable(name) + "\"",
              jsondoc::did_you_mean(name, names, "use one of: " + list));
      return -1;
    }
    return it->second;
  }

  void add_element(Element e, const std::string& path) {
    if (!element_names.insert(e.name).second) {
      r.error(path, "the name \"" + e.name + "\" is used twice", "give every valve, check and orifice its own name");
      return;
    }
    net.elements.push_back(std::move(e));
  }

  int add_spool(const std::string& name, SpoolDynamics d, double rate, double tau, double wn, double zeta,
                double initial) {
    Spool s;
    s.name = name;
    s.dynamics = d;
    s.rate_per_s = rate;
    s.time_constant_s = tau;
    s.natural_rad_s = wn;
    s.damping = zeta;
    s.initial = initial;
    net.spools.push_back(s);
    return static_cast<int>(net.spools.size() - 1);
  }

  Element edge(const std::string& name, int from, int to, int spool, EdgeOpening o, double area, double overlap,
               double leak, double centre_width = 0.0) {
    Element e;
    e.kind = ElementKind::kSpoolEdge;
    e.name = name;
    e.from = from;
    e.to = to;
    e.cd = cd;
    e.spool = spool;
    e.opening = o;
    e.area_m2 = area;
    e.overlap = overlap;
    e.leak_area_m2 = leak;
    e.centre_width = centre_width;
    return e;
  }
};

int find_index(const std::string& name, const core::Name* names, std::size_t count) {
  for (std::size_t i = 0; i < count; ++i) {
    if (core_name(names[i]) == name) return static_cast<int>(i);
  }
  return -1;
}

struct CylinderPorts {
  int port_a = -1;  // valve-side nodes
  int port_b = -1;
};

BuildResult build(const json& plant, const core::MachineConfig& machine, const std::string& file) {
  std::vector<PlantError> errors;
  Builder b(file, errors, machine);
  Reader& r = b.r;
  const std::string root = "/plant";
  if (!r.object(plant, root, "")) return errors;
  const json empty = json::object();

  // --- oil -------------------------------------------------------------------
  const json& oil = plant.contains("oil") ? plant.at("oil") : empty;
  const std::string po = root + "/oil";
  if (r.object(oil, po, "oil")) {
    b.net.oil.density_kg_m3 = r.number(oil, po, "oil", "density_kg_m3");
    b.net.oil.bulk_modulus_pa = r.number(oil, po, "oil", "bulk_modulus_bar") * kBar;
    b.net.oil.air_fraction = r.number(oil, po, "oil", "entrained_air_percent") / 100.0;
    b.net.oil.laminar_transition_pa = r.number(oil, po, "oil", "laminar_transition_bar") * kBar;
    b.cd = r.number(oil, po, "oil", "discharge_coefficient");
  }
  const double rho = b.net.oil.density_kg_m3;
  b.tank = b.add_node("tank", 0.0, true, r.number(oil, po, "oil", "tank_pressure_bar") * kBar);

  // --- pump ------------------------------------------------------------------
  const std::string pp = root + "/pump";
  const json& pj = plant.contains("pump") ? plant.at("pump") : empty;
  double pump_q = 0.0;
  if (plant.contains("pump") && r.object(pj, pp, "pump")) {
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
  b.w->has_power_unit = machine.power_unit.present;
  b.w->motor_coil = machine.power_unit.motor_coil;
  b.w->dump_coil = machine.power_unit.dump_coil;
  const bool machine_has_dump = machine.power_unit.present && machine.power_unit.dump_coil != core::kNoIndex8;
  if (pj.is_object() && pj.contains("dump_valve") && !machine_has_dump) {
    r.error(pp + "/dump_valve", "the machine file's power unit has no dump coil, so this valve could never switch",
            "add the dump coil to the power unit in the machine file, or remove plant.pump.dump_valve");
  }
  if (machine_has_dump) {
    const json& d = pj.is_object() && pj.contains("dump_valve") ? pj.at("dump_valve") : empty;
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

  // --- extra volumes ---------------------------------------------------------
  if (plant.contains("volumes")) {
    const json& vs = plant.at("volumes");
    if (!vs.is_array()) {
      r.error(root + "/volumes", "expected an array", "write [ {\"name\": ..., \"volume_cm3\": ...} ]");
    } else {
      for (std::size_t i = 0; i < vs.size(); ++i) {
        const std::string p = root + "/volumes/" + std::to_string(i);
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
  }

  // --- functions: valves and cylinders --------------------------------------
  const std::size_t nf = machine.function_count;
  std::vector<std::string> fnames(nf);
  for (std::size_t f = 0; f < nf; ++f) fnames[f] = core_name(machine.functions[f].name);
  auto function_index = [&](const std::string& name) -> int {
    for (std::size_t f = 0; f < nf; ++f) {
      if (fnames[f] == name) return static_cast<int>(f);
    }
    return -1;
  };
  std::string function_list;
  for (const auto& n : fnames) function_list += (function_list.empty() ? "" : ", ") + n;

  auto array_of = [&](const char* key) -> const json& {
    if (!plant.contains(key)) return empty;
    const json& a = plant.at(key);
    if (!a.is_array()) {
      r.error(root + "/" + key, "expected an array, found " + std::string(a.type_name()), "write [ {...}, ... ]");
      return empty;
    }
    return a;
  };
  const json& valves = array_of("valves");
  const json& cylinders = array_of("cylinders");

  std::vector<int> valve_of(nf, -1), cylinder_of(nf, -1);
  for (std::size_t i = 0; i < valves.size(); ++i) {
    const std::string p = root + "/valves/" + std::to_string(i);
    if (!r.object(valves[i], p, "valves[]")) continue;
    const std::string fn = r.string(valves[i], p, "valves[]", "function");
    const int f = function_index(fn);
    if (f < 0) {
      r.error(p + "/function", "no function named \"" + fn + "\" in the machine file", "use one of: " + function_list);
    } else if (valve_of[static_cast<std::size_t>(f)] >= 0) {
      r.error(p + "/function", "function \"" + fn + "\" already has a valve entry", "keep one entry per function");
    } else {
      valve_of[static_cast<std::size_t>(f)] = static_cast<int>(i);
    }
  }
  for (std::size_t i = 0; i < cylinders.size(); ++i) {
    const std::string p = root + "/cylinders/" + std::to_string(i);
    if (!r.object(cylinders[i], p, "cylinders[]")) continue;
    const std::string fn = r.string(cylinders[i], p, "cylinders[]", "function");
    const int f = function_index(fn);
    if (f < 0) {
      r.error(p + "/function", "no function named \"" + fn + "\" in the machine file", "use one of: " + function_list);
    } else if (cylinder_of[static_cast<std::size_t>(f)] >= 0) {
      r.error(p + "/function", "function \"" + fn + "\" already drives a cylinder",
              "one cylinder per function in this model version");
    } else {
      cylinder_of[static_cast<std::size_t>(f)] = static_cast<int>(i);
    }
  }
  for (std::size_t f = 0; f < nf; ++f) {
    if (valve_of[f] < 0) {
      r.error(root + "/valves", "function \"" + fnames[f] + "\" has no valve entry",
              "add {\"function\": \"" + fnames[f] + "\", \"rated_flow_l_min\": ...} to plant.valves");
    }
    if (cylinder_of[f] < 0) {
      r.error(root + "/cylinders", "function \"" + fnames[f] + "\" drives no cylinder",
              "add a cylinder with \"function\": \"" + fnames[f] + "\" to plant.cylinders");
    }
  }

  // Cylinders: chambers, lines, optional load-holding checks.
  std::vector<CylinderPorts> ports(nf);
  std::set<std::string> cylinder_names;
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
  std::vector<PendingPortValve> port_valves;
  for (std::size_t f = 0; f < nf; ++f) {
    const int ci = cylinder_of[f];
    if (ci < 0) continue;
    const json& c = cylinders[static_cast<std::size_t>(ci)];
    const std::string p = root + "/cylinders/" + std::to_string(ci);
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
      if (r.object(l, pl, "cylinders[].load")) {
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
    }
    const double dead_a = r.number(c, p, s, "dead_volume_a_cm3") * 1e-6;
    const double dead_b = r.number(c, p, s, "dead_volume_b_cm3") * 1e-6;
    const double line_a = r.number(c, p, s, "line_volume_a_cm3") * 1e-6;
    const double line_b = r.number(c, p, s, "line_volume_b_cm3") * 1e-6;
    std::string side = "none";
    const json* lh = nullptr;
    if (c.is_object() && c.contains("load_holding")) {
      lh = &c.at("load_holding");
      if (r.object(*lh, p + "/load_holding", "cylinders[].load_holding")) {
        side = r.string(*lh, p + "/load_holding", "cylinders[].load_holding", "side");
      } else {
        lh = nullptr;
      }
    }
    const bool poc_a = side == "A" || side == "both";
    const bool poc_b = side == "B" || side == "both";
    // Counterbalance valve: read here, its elements are added with the
    // pilot-operated checks once both line nodes exist.
    std::string cb_side = "none";
    const json* cb = nullptr;
    const std::string pcb = p + "/counterbalance";
    const std::string scb = "cylinders[].counterbalance";
    if (c.is_object() && c.contains("counterbalance")) {
      cb = &c.at("counterbalance");
      if (r.object(*cb, pcb, scb)) {
        cb_side = r.string(*cb, pcb, scb, "side");
      } else {
        cb = nullptr;
      }
    }
    const bool cb_a = cb != nullptr && cb_side == "A";
    const bool cb_b = cb != nullptr && cb_side == "B";
    if ((cb_a && poc_a) || (cb_b && poc_b)) {
      r.error(pcb + "/side", "port " + cb_side + " already carries a load-holding check",
              "use either load_holding or a counterbalance valve on one port");
    }
    const int cyl_index = static_cast<int>(b.net.cylinders.size());
    const bool valve_a = poc_a || cb_a;  // a valve at the port splits its line from the chamber
    const bool valve_b = poc_b || cb_b;
    const int ch_a = b.add_node(cyl.name + ".A", dead_a + (valve_a ? 0.0 : line_a));
    const int ch_b = b.add_node(cyl.name + ".B", dead_b + (valve_b ? 0.0 : line_b));
    b.net.nodes[static_cast<std::size_t>(ch_a)].cylinder = cyl_index;
    b.net.nodes[static_cast<std::size_t>(ch_a)].side = 1;
    b.net.nodes[static_cast<std::size_t>(ch_b)].cylinder = cyl_index;
    b.net.nodes[static_cast<std::size_t>(ch_b)].side = -1;
    cyl.node_a = ch_a;
    cyl.node_b = ch_b;
    ports[f].port_a = ch_a;
    ports[f].port_b = ch_b;
    if (cb_a || cb_b) {
      // The valve side of the counterbalance valve: its own line node,
      // made before the load-holding checks so that their pilots see it.
      const double line = cb_a ? line_a : line_b;
      if (line <= 0.0) {
        r.error(p + (cb_a ? "/line_volume_a_cm3" : "/line_volume_b_cm3"),
                "a counterbalance valve needs a line volume on its valve side", "use a positive line volume");
      }
      (cb_a ? ports[f].port_a : ports[f].port_b) = b.add_node(cyl.name + "." + cb_side + "_line", std::max(line, 1e-6));
    }
    if (lh != nullptr && (poc_a || poc_b)) {
      const std::string pl = p + "/load_holding";
      const std::string sl = "cylinders[].load_holding";
      const double ratio = r.number(*lh, pl, sl, "pilot_ratio");
      const double crack = r.number(*lh, pl, sl, "cracking_bar") * kBar;
      const double span = r.number(*lh, pl, sl, "full_open_bar") * kBar;
      const double area = area_for(r.number(*lh, pl, sl, "rated_flow_l_min") * kLitrePerMin,
                                   r.number(*lh, pl, sl, "rated_dp_bar") * kBar, b.cd, rho);
      if (poc_a) {
        if (line_a <= 0.0) r.error(p + "/line_volume_a_cm3", "a load-holding valve needs a line volume on its valve side", "use a positive line volume");
        ports[f].port_a = b.add_node(cyl.name + ".A_line", std::max(line_a, 1e-6));
      }
      if (poc_b) {
        if (line_b <= 0.0) r.error(p + "/line_volume_b_cm3", "a load-holding valve needs a line volume on its valve side", "use a positive line volume");
        ports[f].port_b = b.add_node(cyl.name + ".B_line", std::max(line_b, 1e-6));
      }
      if (poc_a) port_valves.push_back({ports[f].port_a, ch_a, ports[f].port_b, cyl.name + ".hold_A", ratio, crack, span, area, pl});
      if (poc_b) port_valves.push_back({ports[f].port_b, ch_b, ports[f].port_a, cyl.name + ".hold_B", ratio, crack, span, area, pl});
    }
    if (cb_a || cb_b) {
      const int port = cb_a ? ports[f].port_a : ports[f].port_b;
      const int chamber = cb_a ? ch_a : ch_b;
      const int pilot = cb_a ? ports[f].port_b : ports[f].port_a;  // the other line (the one that drives)
      const double area = area_for(r.number(*cb, pcb, scb, "rated_flow_l_min") * kLitrePerMin,
                                   r.number(*cb, pcb, scb, "rated_dp_bar") * kBar, b.cd, rho);
      port_valves.push_back({chamber, port, pilot, cyl.name + ".counterbalance_" + cb_side,
                             r.number(*cb, pcb, scb, "pilot_ratio"), r.number(*cb, pcb, scb, "setting_bar") * kBar,
                             r.number(*cb, pcb, scb, "full_open_bar") * kBar, area, pcb, /*counterbalance=*/true});
      // The free-flow check into the chamber: a plain check, fully open 2 bar above cracking.
      port_valves.push_back({port, chamber, -1, cyl.name + ".counterbalance_" + cb_side + "_check", 0.0,
                      r.number(*cb, pcb, scb, "check_cracking_bar") * kBar, 2.0 * kBar, area, pcb});
    }
    b.net.cylinders.push_back(cyl);
  }
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

  // Through (carry-over) passages: which upstream functions feed a downstream valve.
  std::vector<int> supply_of(nf, -1);  // -1: pump, else upstream function
  for (std::size_t f = 0; f < nf; ++f) {
    const int vi = valve_of[f];
    if (vi < 0) continue;
    const json& v = valves[static_cast<std::size_t>(vi)];
    const std::string p = root + "/valves/" + std::to_string(vi);
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
    const int u = function_index(up);
    if (u < 0 || static_cast<std::size_t>(u) == f) {
      r.error(p + "/supply/through_of", "\"" + up + "\" is not another function of the machine file",
              "use one of: " + function_list);
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
        r.error(p + "/supply/through_of", "\"" + up + "\" already feeds \"" + fnames[g] + "\"",
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
      r.error(root + "/valves/" + std::to_string(valve_of[f]) + "/supply", "the through passages form a loop",
              "make the chain of through_of end at a valve supplied by the pump");
      supply_of[f] = -1;
    }
  }
  std::vector<int> through_node(nf, -1);
  for (std::size_t f = 0; f < nf; ++f) {
    if (supply_of[f] < 0) continue;
    const auto u = static_cast<std::size_t>(supply_of[f]);
    const json& uv = valve_of[u] >= 0 ? valves[static_cast<std::size_t>(valve_of[u])] : empty;
    through_node[u] = b.add_node(fnames[u] + ".through",
                                 r.number(uv, root + "/valves/" + std::to_string(valve_of[u]), "valves[]",
                                          "through_line_volume_cm3") * 1e-6);
  }

  // Valves.
  for (std::size_t f = 0; f < nf; ++f) {
    const int vi = valve_of[f];
    if (vi < 0 || cylinder_of[f] < 0) continue;
    const json& v = valves[static_cast<std::size_t>(vi)];
    const std::string p = root + "/valves/" + std::to_string(vi);
    const std::string s = "valves[]";
    const core::FunctionConfig& fc = machine.functions[f];
    const bool prop = core::is_proportional(fc.valve);
    const core::ValveKindRow* kind_row = core::valve_kind_row(fc.valve);
    const bool four_two = kind_row == nullptr || !kind_row->has_centre;
    const std::string where = " (machine file: functions \"" + fnames[f] + "\" valve kind " + kind_name(fc.valve) + ")";
    if (prop && v.contains("switch_time_ms")) {
      r.error(p + "/switch_time_ms", "only solenoid valves have a switch time" + where, "use \"response\" instead");
    }
    if (!prop && v.contains("response")) {
      r.error(p + "/response", "only proportional valves have a response" + where, "use \"switch_time_ms\" instead");
    }
    const core::ValveCentre centre = four_two ? core::ValveCentre::kNotApplicable : fc.centre;
    if (!four_two && centre == core::ValveCentre::kNotApplicable) {
      r.error(p + "/function", "the 4/3 valve of \"" + fnames[f] + "\" has no centre type in the machine file",
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
    if (v.contains("through_line_volume_cm3") && through_node[f] < 0) {
      r.error(p + "/through_line_volume_cm3", "no downstream valve takes its supply through this valve",
              "remove the field or point a downstream valve's supply at \"" + fnames[f] + "\"");
    }
    const double q = r.number(v, p, s, "rated_flow_l_min") * kLitrePerMin;
    // Rated flow at the total drop over two edges, half per edge (check-values 4.2, [SRC] Fluid Power Journal).
    const double dp_edge = 0.5 * r.number(v, p, s, "rated_dp_bar") * kBar;
    const double a_edge = area_for(q, dp_edge, b.cd, rho);
    const double overlap = r.number(v, p, s, "overlap_percent") / 100.0;
    const double leak = r.number(v, p, s, "leak_mm2") * 1e-6;
    const double a_centre = r.has(v, "centre_area_mm2") ? r.number(v, p, s, "centre_area_mm2") * 1e-6 : a_edge;
    const double width = std::max(overlap, kMinCentreWidth);

    int spool = -1;
    if (prop) {
      const json& resp = v.contains("response") ? v.at("response") : empty;
      const std::string pr = p + "/response";
      if (r.object(resp, pr, "valves[].response")) {
        const double order = r.number(resp, pr, "valves[].response", "order");
        if (order != 1.0 && order != 2.0) r.error(pr + "/order", "order must be 1 or 2", "write 1 or 2");
        if (order == 1.0) {
          spool = b.add_spool(fnames[f], SpoolDynamics::kFirstOrder, 0,
                              r.number(resp, pr, "valves[].response", "time_constant_ms") * 1e-3, 0, 0, 0.0);
        } else {
          spool = b.add_spool(fnames[f], SpoolDynamics::kSecondOrder, 0, 0,
                              2.0 * kPi * r.number(resp, pr, "valves[].response", "natural_hz"),
                              r.number(resp, pr, "valves[].response", "damping"), 0.0);
        }
      }
    } else {
      const double ts = r.number(v, p, s, "switch_time_ms") * 1e-3;
      // A 4/2 spool crosses the whole stroke (-1 to +1) in the switch time.
      spool = b.add_spool(fnames[f], SpoolDynamics::kRateLimited, (four_two ? 2.0 : 1.0) / ts, 0, 0, 0,
                          four_two ? -1.0 : 0.0);
    }
    if (spool < 0) continue;
    Plant::Wiring::Valve link;
    link.function = fnames[f];
    link.config = fc;
    link.spool = spool;
    b.w->valves.push_back(link);

    const int P = supply_of[f] < 0 ? b.pump : through_node[static_cast<std::size_t>(supply_of[f])];
    const int T = b.tank;
    const int A = ports[f].port_a;
    const int B = ports[f].port_b;
    const int PT = through_node[f] >= 0 ? through_node[f] : T;  // centre P passage goes on downstream if used
    const std::string n = fnames[f];
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

  // --- relief ----------------------------------------------------------------
  const std::string pr = root + "/relief";
  if (plant.contains("relief") && r.object(plant.at("relief"), pr, "relief")) {
    const json& rj = plant.at("relief");
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

  // --- on/off valves, checks, orifices ---------------------------------------
  const json& onoff = array_of("on_off_valves");
  for (std::size_t i = 0; i < onoff.size(); ++i) {
    const std::string p = root + "/on_off_valves/" + std::to_string(i);
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
  const json& checks = array_of("check_valves");
  for (std::size_t i = 0; i < checks.size(); ++i) {
    const std::string p = root + "/check_valves/" + std::to_string(i);
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
  const json& orifices = array_of("orifices");
  for (std::size_t i = 0; i < orifices.size(); ++i) {
    const std::string p = root + "/orifices/" + std::to_string(i);
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

  // --- sensors ---------------------------------------------------------------
  std::set<std::string> analog_owned, digital_owned;
  const json& sensors = array_of("sensors");
  for (std::size_t i = 0; i < sensors.size(); ++i) {
    const std::string p = root + "/sensors/" + std::to_string(i);
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
    auto allow_only = [&](std::initializer_list<const char*> keys) {
      for (auto it = o.begin(); it != o.end(); ++it) {
        bool ok = it.key() == "kind" || it.key() == "input";
        for (const char* k : keys) ok = ok || it.key() == k;
        if (!ok) r.error(p + "/" + it.key(), "a " + kind + " sensor has no field \"" + it.key() + "\"", "remove it");
      }
    };
    auto need = [&](const char* key) {
      if (!o.contains(key)) r.error(p + "/" + key, "a " + kind + " sensor needs this field", std::string("add \"") + key + "\"");
    };
    auto cylinder_ref = [&]() -> int {
      need("cylinder");
      const std::string cn = r.string(o, p, s, "cylinder");
      for (std::size_t c = 0; c < b.net.cylinders.size(); ++c) {
        if (b.net.cylinders[c].name == cn) return static_cast<int>(c);
      }
      if (o.contains("cylinder")) r.error(p + "/cylinder", "no cylinder named \"" + cn + "\"", "use a name from plant.cylinders");
      return -1;
    };
    if (analog) {
      const int ai = [&] {
        for (std::size_t k = 0; k < machine.analog_input_count; ++k) {
          if (core_name(machine.analog_inputs[k].name) == sn.input_name) return static_cast<int>(k);
        }
        return -1;
      }();
      if (ai < 0) {
        r.error(p + "/input", "no analog input named \"" + sn.input_name + "\" in the machine file",
                "add it to the machine file's analog inputs or correct the name");
        continue;
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
                                  "\", which a " + kind + " sensor cannot deliver",
                "use one of: " + list);
      } else {
        sn.unit_si = u->second;
      }
      if (sn.kind == SensorKind::kPressure) {
        allow_only({"at"});
        need("at");
        sn.node = b.node_ref(o, p, s, "at");
        if (sn.node < 0) continue;
      } else {
        allow_only({"cylinder"});
        sn.cylinder = cylinder_ref();
        if (sn.cylinder < 0) continue;
      }
    } else {
      const int di = find_index(sn.input_name, machine.digital_inputs.data(), machine.digital_input_count);
      if (di < 0) {
        r.error(p + "/input", "no digital input named \"" + sn.input_name + "\" in the machine file",
                "add it to the machine file's digital inputs or correct the name");
        continue;
      }
      if (!digital_owned.insert(sn.input_name).second) {
        r.error(p + "/input", "digital input \"" + sn.input_name + "\" already has a sensor", "one sensor per input");
      }
      sn.input = static_cast<std::size_t>(di);
      if (sn.kind == SensorKind::kLimitSwitch) {
        allow_only({"cylinder", "at_mm", "active", "hysteresis_mm"});
        need("at_mm");
        need("active");
        sn.cylinder = cylinder_ref();
        sn.threshold_si = r.number(o, p, s, "at_mm") * 1e-3;
        sn.hysteresis_si = r.number(o, p, s, "hysteresis_mm") * 1e-3;
        sn.active_above = r.string(o, p, s, "active") == "above";
        if (sn.cylinder < 0) continue;
        // A switching point off the stroke would read the same all the time.
        const double stroke = b.net.cylinders[static_cast<std::size_t>(sn.cylinder)].stroke_m;
        if (o.contains("at_mm") && (sn.threshold_si < 0.0 || sn.threshold_si > stroke)) {
          char buf[160];
          std::snprintf(buf, sizeof buf, "%g mm is off the cylinder's stroke (0 .. %g mm): the switch would never change",
                        sn.threshold_si * 1e3, stroke * 1e3);
          r.error(p + "/at_mm", buf, "put the switching point on the stroke");
        }
      } else {
        allow_only({"at", "above_bar", "below_bar", "hysteresis_bar"});
        need("at");
        if (o.contains("above_bar") == o.contains("below_bar")) {
          r.error(p, "a pressure switch needs exactly one of above_bar and below_bar", "keep one of the two");
        }
        sn.node = b.node_ref(o, p, s, "at");
        sn.active_above = o.contains("above_bar");
        sn.threshold_si = (sn.active_above ? r.number(o, p, s, "above_bar") : r.number(o, p, s, "below_bar")) * kBar;
        sn.hysteresis_si = r.number(o, p, s, "hysteresis_bar") * kBar;
        if (sn.node < 0) continue;
      }
    }
    b.w->sensors.push_back(sn);
  }

  // --- solver ----------------------------------------------------------------
  SolverSettings solver;
  if (plant.contains("solver")) {
    const json& sj = plant.at("solver");
    const std::string ps = root + "/solver";
    if (r.object(sj, ps, "solver")) {
      solver.method = r.string(sj, ps, "solver", "method") == "rosenbrock4" ? SolverMethod::kOdeintRosenbrock4
                                                                           : SolverMethod::kRos2;
      solver.rtol = r.number(sj, ps, "solver", "rtol");
      solver.atol = r.number(sj, ps, "solver", "atol");
      solver.velocity_atol_mm_s = r.number(sj, ps, "solver", "velocity_atol_mm_s");
      solver.max_window_periods = r.whole_number(sj, ps, "solver", "max_window_periods");
    }
  } else {
    const json none = json::object();
    solver.method = r.string(none, root, "solver", "method") == "rosenbrock4" ? SolverMethod::kOdeintRosenbrock4
                                                                             : SolverMethod::kRos2;
    solver.rtol = r.number(none, root, "solver", "rtol");
    solver.atol = r.number(none, root, "solver", "atol");
    solver.velocity_atol_mm_s = r.number(none, root, "solver", "velocity_atol_mm_s");
    solver.max_window_periods = r.whole_number(none, root, "solver", "max_window_periods");
  }

  for (std::size_t i = 0; i < machine.coil_count; ++i) b.w->coil_names.push_back(core_name(machine.coils[i]));
  for (std::size_t i = 0; i < machine.prop_output_count; ++i) {
    b.w->prop_names.push_back(core_name(machine.prop_outputs[i].name));
  }
  b.w->coil_failed.assign(core::kMaxCoils, false);
  b.w->prop_failed.assign(core::kMaxPropOutputs, false);

  if (!errors.empty()) return errors;
  return std::make_unique<Plant>(std::move(b.net), solver, std::move(b.w));
}

}  // namespace

BuildResult build_plant(const nlohmann::json& plant, const core::MachineConfig& machine, const std::string& file) {
  try {
    return build(plant, machine, file);
  } catch (const std::exception& e) {
    // nlohmann_json or the standard library threw: turn it into one message.
    return std::vector<PlantError>{PlantError{file, "/plant", std::string("could not read the plant section: ") + e.what(),
                                              "check the JSON types against docs/plant-model.md"}};
  }
}

}  // namespace spoolstep::hostsim
