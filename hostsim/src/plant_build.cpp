// Builds a Plant from the machine file's "plant" object and the core's
// MachineConfig. Every problem becomes a PlantError naming the JSON pointer,
// the reason and the fix; nothing is built unless there are none.
//
// This file has the shared reader and builder (plant_builder.hpp), the
// solver settings and the entry point; the components themselves, one
// builder per kind, are in plant_components.cpp.
#include <cmath>
#include <cstdio>
#include <exception>

#include <nlohmann/json.hpp>

#include "plant_builder.hpp"
#include "plant_params.hpp"
#include "plant_wiring.hpp"
#include "spoolstep/hostsim/plant.hpp"

namespace spoolstep::hostsim {
namespace plant_build {

std::string core_name(const core::Name& n) { return std::string(n.text.data()); }

int find_index(const std::string& name, const core::Name* names, std::size_t count) {
  for (std::size_t i = 0; i < count; ++i) {
    if (core_name(names[i]) == name) return static_cast<int>(i);
  }
  return -1;
}

namespace {

std::string pointer_token(const std::string& key) {
  std::string out;
  for (char c : key) {
    if (c == '~') out += "~0";
    else if (c == '/') out += "~1";
    else out += c;
  }
  return out;
}

}  // namespace

// --- Reader ------------------------------------------------------------------

Reader::Reader(std::string file, std::vector<PlantError>& errors) : file_(std::move(file)), errors_(errors) {
  params_ = plant_params(count_);
}

void Reader::error(const std::string& path, const std::string& reason, const std::string& fix) {
  errors_.push_back(PlantError{file_, path, reason, fix});
}

const ParamSpec* Reader::spec(const std::string& section, const std::string& key) const {
  for (std::size_t i = 0; i < count_; ++i) {
    if (section == params_[i].section && key == params_[i].key) return &params_[i];
  }
  return nullptr;
}

bool Reader::object(const json& j, const std::string& path, const std::string& section) {
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

double Reader::number(const json& obj, const std::string& path, const std::string& section, const std::string& key) {
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

int Reader::whole_number(const json& obj, const std::string& path, const std::string& section,
                         const std::string& key) {
  const double x = number(obj, path, section, key);
  if (x != std::floor(x)) {
    char buf[96];
    std::snprintf(buf, sizeof buf, "%g is not a whole number", x);
    error(path + "/" + key, buf, "write a whole number");
    return static_cast<int>(std::floor(x));
  }
  return static_cast<int>(x);
}

bool Reader::has(const json& obj, const std::string& key) const { return obj.is_object() && obj.contains(key); }

bool Reader::boolean(const json& obj, const std::string& path, const std::string& section, const std::string& key) {
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

std::string Reader::string(const json& obj, const std::string& path, const std::string& section,
                           const std::string& key) {
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

// --- Builder -----------------------------------------------------------------

Builder::Builder(const std::string& file, std::vector<PlantError>& errors, const core::MachineConfig& machine_config,
                 const json& plant_section)
    : r(file, errors), machine(machine_config), plant(plant_section) {}

const json& Builder::section(const char* key) const { return plant.contains(key) ? plant.at(key) : empty; }

const json& Builder::array_of(const char* key) {
  if (!plant.contains(key)) return empty;
  const json& a = plant.at(key);
  if (!a.is_array()) {
    r.error(root + "/" + key, "expected an array, found " + std::string(a.type_name()), "write [ {...}, ... ]");
    return empty;
  }
  return a;
}

int Builder::add_node(const std::string& name, double volume_m3, bool fixed, double p) {
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

int Builder::node_ref(const json& obj, const std::string& path, const std::string& section_name,
                      const std::string& key) {
  if (!r.has(obj, key)) return -1;
  const std::string name = r.string(obj, path, section_name, key);
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

void Builder::add_element(Element e, const std::string& path) {
  if (!element_names.insert(e.name).second) {
    r.error(path, "the name \"" + e.name + "\" is used twice", "give every valve, check and orifice its own name");
    return;
  }
  net.elements.push_back(std::move(e));
}

int Builder::add_spool(const std::string& name, SpoolDynamics d, double rate, double tau, double wn, double zeta,
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

Element Builder::edge(const std::string& name, int from, int to, int spool, EdgeOpening o, double area,
                      double overlap, double leak, double centre_width) const {
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

namespace {

// --- solver ------------------------------------------------------------------

SolverSettings read_solver(Builder& b) {
  Reader& r = b.r;
  SolverSettings solver;
  if (b.plant.contains("solver")) {
    const json& sj = b.plant.at("solver");
    const std::string ps = b.root + "/solver";
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
    solver.method = r.string(none, b.root, "solver", "method") == "rosenbrock4" ? SolverMethod::kOdeintRosenbrock4
                                                                               : SolverMethod::kRos2;
    solver.rtol = r.number(none, b.root, "solver", "rtol");
    solver.atol = r.number(none, b.root, "solver", "atol");
    solver.velocity_atol_mm_s = r.number(none, b.root, "solver", "velocity_atol_mm_s");
    solver.max_window_periods = r.whole_number(none, b.root, "solver", "max_window_periods");
  }
  return solver;
}

// The names of the core's coils and proportional channels, for fault
// injection by name; no output has failed at the start.
void name_outputs(Builder& b) {
  const core::MachineConfig& machine = b.machine;
  for (std::size_t i = 0; i < machine.coil_count; ++i) b.w->coil_names.push_back(core_name(machine.coils[i]));
  for (std::size_t i = 0; i < machine.prop_output_count; ++i) {
    b.w->prop_names.push_back(core_name(machine.prop_outputs[i].name));
  }
  b.w->coil_failed.assign(core::kMaxCoils, false);
  b.w->prop_failed.assign(core::kMaxPropOutputs, false);
}

BuildResult build(const json& plant, const core::MachineConfig& machine, const std::string& file) {
  std::vector<PlantError> errors;
  Builder b(file, errors, machine, plant);
  if (!b.r.object(plant, b.root, "")) return errors;
  build_components(b);
  const SolverSettings solver = read_solver(b);
  name_outputs(b);
  if (!errors.empty()) return errors;
  return std::make_unique<Plant>(std::move(b.net), solver, std::move(b.w));
}

}  // namespace
}  // namespace plant_build

BuildResult build_plant(const nlohmann::json& plant, const core::MachineConfig& machine, const std::string& file) {
  try {
    return plant_build::build(plant, machine, file);
  } catch (const std::exception& e) {
    // nlohmann_json or the standard library threw: turn it into one message.
    return std::vector<PlantError>{PlantError{file, "/plant", std::string("could not read the plant section: ") + e.what(),
                                              "check the JSON types against docs/plant-model.md"}};
  }
}

}  // namespace spoolstep::hostsim
