#pragma once
// The state the plant-section builders share (private to hostsim): a Reader
// that checks JSON values against the parameter table and collects every
// problem as a PlantError, and a Builder that holds the network and the
// wiring under construction. plant_build.cpp defines both and the entry
// point; plant_components.cpp has one builder per component kind.
#include <cmath>
#include <map>
#include <memory>
#include <set>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "plant_params.hpp"
#include "plant_wiring.hpp"
#include "spoolstep/core/config.hpp"
#include "spoolstep/hostsim/network.hpp"
#include "spoolstep/hostsim/plant.hpp"

namespace spoolstep::hostsim::plant_build {

using nlohmann::json;

constexpr double kPi = 3.14159265358979323846;
constexpr double kBar = 1e5;
constexpr double kLitrePerMin = 1e-3 / 60.0;

/// The text of a core name.
std::string core_name(const core::Name& n);

/// Index of `name` among the first `count` names, -1 if it is not there.
int find_index(const std::string& name, const core::Name* names, std::size_t count);

// Area that passes `q` at `dp` through one edge by the orifice equation
// (check-values 4.1, [SRC] Rabie eq. 2.36).
inline double area_for(double q_m3_s, double dp_pa, double cd, double rho) {
  return q_m3_s / (cd * std::sqrt(2.0 * dp_pa / rho));
}

/// Reads values of the plant section against the parameter table
/// (plant_params.cpp). Every problem is appended to the error list; a value
/// that is missing or wrong reads as the table's default, so reading goes on
/// and one pass reports everything.
class Reader {
 public:
  Reader(std::string file, std::vector<PlantError>& errors);

  /// Appends a PlantError at JSON pointer `path`.
  void error(const std::string& path, const std::string& reason, const std::string& fix);

  /// The table row of `key` in `section` ("oil", "valves[]", ...), nullptr if none.
  const ParamSpec* spec(const std::string& section, const std::string& key) const;

  /// Checks that j is an object whose keys are all known in `section` and
  /// that the required ones are there. Returns false if j is not an object.
  bool object(const json& j, const std::string& path, const std::string& section);

  /// The number at obj[key], in range; the default if it is absent or wrong.
  double number(const json& obj, const std::string& path, const std::string& section, const std::string& key);

  /// A number that must be whole (counts).
  int whole_number(const json& obj, const std::string& path, const std::string& section, const std::string& key);

  /// Whether obj is an object with `key`.
  bool has(const json& obj, const std::string& key) const;

  /// The boolean at obj[key]; the default if it is absent or wrong.
  bool boolean(const json& obj, const std::string& path, const std::string& section, const std::string& key);

  /// The string at obj[key], one of the row's choices if it has any; the
  /// default (the first choice, else empty) if it is absent or wrong.
  std::string string(const json& obj, const std::string& path, const std::string& section, const std::string& key);

 private:
  std::string file_;
  std::vector<PlantError>& errors_;
  const ParamSpec* params_ = nullptr;
  std::size_t count_ = 0;
};

/// The network and the wiring under construction, with the names that later
/// components refer to. Nodes and elements keep the order in which they are
/// added: it is the order of the state vector and of the trace columns.
struct Builder {
  Reader r;
  const core::MachineConfig& machine;
  const json& plant;                // the "plant" object (checked to be one)
  const std::string root = "/plant";
  const json empty = json::object();  // stands in for an absent section
  Network net;
  std::unique_ptr<Plant::Wiring> w = std::make_unique<Plant::Wiring>();
  std::map<std::string, int> nodes;  // name -> index
  std::set<std::string> element_names;
  double cd = 0.61;
  int tank = -1, pump = -1;

  Builder(const std::string& file, std::vector<PlantError>& errors, const core::MachineConfig& machine_config,
          const json& plant_section);

  /// plant[key] if it is there, else an empty object.
  const json& section(const char* key) const;
  /// plant[key] if it is an array; an empty one (and an error if it is
  /// something else) otherwise.
  const json& array_of(const char* key);

  /// Adds a node and returns its index.
  int add_node(const std::string& name, double volume_m3, bool fixed = false, double p = 0.0);
  /// The index of the node named at obj[key]; -1 (an error if the name is
  /// unknown) otherwise.
  int node_ref(const json& obj, const std::string& path, const std::string& section_name, const std::string& key);
  /// Adds an element unless its name is taken (then an error at `path`).
  void add_element(Element e, const std::string& path);
  /// Adds a spool and returns its index.
  int add_spool(const std::string& name, SpoolDynamics d, double rate, double tau, double wn, double zeta,
                double initial);
  /// A spool edge with the oil's discharge coefficient (not added).
  Element edge(const std::string& name, int from, int to, int spool, EdgeOpening o, double area, double overlap,
               double leak, double centre_width = 0.0) const;
};

/// Reads every component of the plant section (oil, pump, volumes, the
/// functions' cylinders and valves, relief, on/off valves, checks,
/// orifices, sensors) into b, in the order of the network
/// (plant_components.cpp).
void build_components(Builder& b);

}  // namespace spoolstep::hostsim::plant_build
