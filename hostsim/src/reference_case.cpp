#include <cmath>

#include <nlohmann/json.hpp>

#include "spoolstep/hostsim/open_loop.hpp"

namespace spoolstep::hostsim {

int Trace::column(const std::string& name) const {
  for (std::size_t i = 0; i < names.size(); ++i) {
    if (names[i] == name) return static_cast<int>(i);
  }
  return -1;
}

std::vector<double> Trace::series(const std::string& name) const {
  std::vector<double> out;
  const int c = column(name);
  if (c < 0) return out;
  out.reserve(rows.size());
  for (const auto& r : rows) out.push_back(r[static_cast<std::size_t>(c)]);
  return out;
}

bool run_open_loop(Plant& plant, const Timeline& timeline, double period_s, Trace& trace) {
  std::size_t next = 0;
  auto record = [&] {
    PlantSnapshot s = plant.snapshot();
    if (trace.names.empty()) trace.names = *s.names;
    trace.time_s.push_back(s.time_s);
    trace.rows.push_back(std::move(s.values));
  };
  const long steps = std::lround((timeline.end_s - plant.time_s()) / period_s);
  const double t0 = plant.time_s();
  for (long k = 0; k <= steps; ++k) {
    const double now = t0 + static_cast<double>(k) * period_s;
    bool changed = false;
    while (next < timeline.events.size() && timeline.events[next].time_s <= now + 0.5 * period_s) {
      const TimelineEvent& e = timeline.events[next++];
      changed = true;
      switch (e.what) {
        case TimelineEvent::What::kSpool:
          (void)plant.set_spool_target(e.function, e.target);
          break;
        case TimelineEvent::What::kPump:
          plant.set_pump(e.running, e.loaded);
          break;
        case TimelineEvent::What::kFault:
          (void)plant.inject(e.fault);
          break;
      }
    }
    if (changed || trace.segments.empty()) trace.segments.push_back({now, plant.network_inputs()});
    record();
    if (k == steps) break;
    if (!plant.advance(period_s)) return false;
  }
  return true;
}

namespace {

const char* edge_opening(EdgeOpening o) {
  switch (o) {
    case EdgeOpening::kPositive: return "positive";
    case EdgeOpening::kNegative: return "negative";
    case EdgeOpening::kCentre: return "centre";
  }
  return "?";
}

const char* element_kind(ElementKind k) {
  switch (k) {
    case ElementKind::kOrifice: return "orifice";
    case ElementKind::kSpoolEdge: return "spool_edge";
    case ElementKind::kCheck: return "check";
    case ElementKind::kCounterbalance: return "counterbalance";
    case ElementKind::kRelief: return "relief";
    case ElementKind::kLaminar: return "laminar";
  }
  return "?";
}

const char* dynamics(SpoolDynamics d) {
  switch (d) {
    case SpoolDynamics::kRateLimited: return "rate_limited";
    case SpoolDynamics::kFirstOrder: return "first_order";
    case SpoolDynamics::kSecondOrder: return "second_order";
  }
  return "?";
}

}  // namespace

nlohmann::json reference_case(const Network& net, const std::vector<double>& y0, const Trace& trace, double rtol,
                              double atol) {
  using nlohmann::json;
  json j;
  j["units"] = "SI inside; state vector in bar, mm, mm/s, stroke fraction, cm^3";
  j["oil"] = {{"density_kg_m3", net.oil.density_kg_m3},
              {"bulk_modulus_pa", net.oil.bulk_modulus_pa},
              {"air_fraction", net.oil.air_fraction},
              {"min_air_fraction", kMinAirFraction},
              {"cavitation_bulk_modulus_pa", kCavitationBulkModulusPa},
              {"atmospheric_pa", net.oil.atmospheric_pa},
              {"laminar_transition_pa", net.oil.laminar_transition_pa}};
  json nodes = json::array();
  for (const Node& n : net.nodes) {
    nodes.push_back({{"name", n.name},
                     {"fixed", n.fixed},
                     {"fixed_pressure_pa", n.fixed_pressure_pa},
                     {"base_volume_m3", n.base_volume_m3},
                     {"cylinder", n.cylinder},
                     {"side", n.side}});
  }
  j["nodes"] = nodes;
  json elements = json::array();
  for (const Element& e : net.elements) {
    elements.push_back({{"kind", element_kind(e.kind)},
                        {"name", e.name},
                        {"from", e.from},
                        {"to", e.to},
                        {"cd", e.cd},
                        {"area_m2", e.area_m2},
                        {"leak_area_m2", e.leak_area_m2},
                        {"spool", e.spool},
                        {"opening", edge_opening(e.opening)},
                        {"overlap", e.overlap},
                        {"centre_width", e.centre_width},
                        {"cracking_pa", e.cracking_pa},
                        {"full_open_span_pa", e.full_open_span_pa},
                        {"pilot", e.pilot},
                        {"pilot_ratio", e.pilot_ratio},
                        {"override_pa_s_m3", e.override_pa_s_m3},
                        {"blend_pa", e.blend_pa},
                        {"conductance_m3_s_pa", e.conductance_m3_s_pa}});
  }
  j["elements"] = elements;
  json spools = json::array();
  for (const Spool& s : net.spools) {
    spools.push_back({{"name", s.name},
                      {"dynamics", dynamics(s.dynamics)},
                      {"rate_per_s", s.rate_per_s},
                      {"time_constant_s", s.time_constant_s},
                      {"natural_rad_s", s.natural_rad_s},
                      {"damping", s.damping}});
  }
  j["spools"] = spools;
  json cyls = json::array();
  for (const Cylinder& c : net.cylinders) {
    json prof = json::array();
    for (const ForcePoint& p : c.force_profile) prof.push_back({p.time_s, p.force_n});
    cyls.push_back({{"name", c.name},
                    {"node_a", c.node_a},
                    {"node_b", c.node_b},
                    {"area_a_m2", c.area_a_m2},
                    {"area_b_m2", c.area_b_m2},
                    {"stroke_m", c.stroke_m},
                    {"mass_kg", c.mass_kg},
                    {"coulomb_n", c.coulomb_n},
                    {"coulomb_velocity_m_s", c.coulomb_velocity_m_s},
                    {"viscous_n_s_m", c.viscous_n_s_m},
                    {"leak_m3_s_pa", c.leak_m3_s_pa},
                    {"end_stop_n_m", c.end_stop_n_m},
                    {"end_stop_n_s_m", c.end_stop_n_s_m},
                    {"resisting_force_n", c.resisting_force_n},
                    {"gravity", c.gravity},
                    {"contact_m", c.contact_m},
                    {"contact_n_m", c.contact_n_m},
                    {"contact_n_s_m", c.contact_n_s_m},
                    {"force_profile", prof}});
  }
  j["cylinders"] = cyls;
  j["pump"] = {{"node", net.pump.node},
               {"nominal_m3_s", net.pump.nominal_m3_s},
               {"compensated", net.pump.compensated},
               {"compensator_pa", net.pump.compensator_pa},
               {"compensator_band_pa", net.pump.compensator_band_pa}};
  const StateLayout layout = make_layout(net);
  // State names matching the plant's snapshot columns.
  json names = json::array();
  std::vector<std::string> state_names(layout.size);
  for (std::size_t i = 0; i < net.nodes.size(); ++i) {
    if (layout.node_state[i] >= 0) state_names[static_cast<std::size_t>(layout.node_state[i])] = net.nodes[i].name + ".p_bar";
  }
  for (std::size_t c = 0; c < net.cylinders.size(); ++c) {
    state_names[layout.first_cylinder + 2 * c] = net.cylinders[c].name + ".x_mm";
    state_names[layout.first_cylinder + 2 * c + 1] = net.cylinders[c].name + ".v_mm_s";
  }
  for (std::size_t s = 0; s < net.spools.size(); ++s) {
    state_names[layout.spool_state[s]] = net.spools[s].name + ".spool";
    if (net.spools[s].dynamics == SpoolDynamics::kSecondOrder) {
      state_names[layout.spool_state[s] + 1] = net.spools[s].name + ".spool_rate";
    }
  }
  state_names[layout.pumped] = "pumped_cm3";
  state_names[layout.returned] = "returned_cm3";
  state_names[layout.compressed] = "compressed_cm3";
  j["layout"] = {{"node_state", layout.node_state},
                 {"first_cylinder", layout.first_cylinder},
                 {"spool_state", layout.spool_state},
                 {"pumped", layout.pumped},
                 {"returned", layout.returned},
                 {"compressed", layout.compressed},
                 {"size", layout.size},
                 {"names", state_names}};
  j["y0"] = y0;
  json segs = json::array();
  for (const InputSegment& s : trace.segments) {
    std::vector<int> stuck;
    for (bool b : s.inputs.spool_stuck) stuck.push_back(b ? 1 : 0);
    segs.push_back({{"start_s", s.start_s},
                    {"spool_target", s.inputs.spool_target},
                    {"spool_stuck", stuck},
                    {"pump_running", s.inputs.pump_running},
                    {"pump_flow_factor", s.inputs.pump_flow_factor},
                    {"extra_leak_m3_s_pa", s.inputs.extra_leak_m3_s_pa},
                    {"extra_force_n", s.inputs.extra_force_n}});
  }
  j["segments"] = segs;
  j["sample_times_s"] = trace.time_s;
  j["rtol"] = rtol;
  j["atol"] = atol;
  return j;
}

}  // namespace spoolstep::hostsim
