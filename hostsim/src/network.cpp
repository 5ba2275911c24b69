// The network equations. tools/ref/plant_ref.py implements the same
// equations independently (numpy/scipy); keep the two in step.
#include "spoolstep/hostsim/network.hpp"

#include <algorithm>
#include <cmath>

namespace spoolstep::hostsim {
namespace {

// Standard gravity, defined by the 3rd CGPM (1901) (from memory).
constexpr double kStandardGravity = 9.80665;

double clamp01(double u) { return u < 0.0 ? 0.0 : (u > 1.0 ? 1.0 : u); }

// C1 ramp from 0 to 1 over u in [0, 1] (our own smoothing choice).
double smoothstep(double u) {
  if (u <= 0.0) return 0.0;
  if (u >= 1.0) return 1.0;
  return u * u * (3.0 - 2.0 * u);
}

// max(d, 0) with a C1 quadratic corner of width w centred on d = 0: exact
// line for d >= w/2, zero for d <= -w/2.
double soft_positive(double d, double w) {
  if (w <= 0.0) return d > 0.0 ? d : 0.0;
  if (d >= 0.5 * w) return d;
  if (d <= -0.5 * w) return 0.0;
  const double u = d + 0.5 * w;
  return u * u / (2.0 * w);
}

double node_volume(const Network& net, const Node& node, const double* y,
                   const StateLayout& layout) {
  double v = node.base_volume_m3;
  if (node.cylinder >= 0) {
    const Cylinder& c = net.cylinders[static_cast<std::size_t>(node.cylinder)];
    const double x =
        y[layout.first_cylinder + 2 * static_cast<std::size_t>(node.cylinder)] * kLengthScale;
    v += node.side > 0 ? c.area_a_m2 * x : c.area_b_m2 * (c.stroke_m - x);
  }
  // Guard against a chamber pressed far into an end stop; never reached with
  // a positive dead volume and a stiff end stop.
  return std::max(v, 0.1 * node.base_volume_m3);
}

}  // namespace

StateLayout make_layout(const Network& net) {
  StateLayout l;
  std::size_t k = 0;
  l.node_state.assign(net.nodes.size(), -1);
  for (std::size_t i = 0; i < net.nodes.size(); ++i) {
    if (!net.nodes[i].fixed) l.node_state[i] = static_cast<int>(k++);
  }
  l.first_cylinder = k;
  k += 2 * net.cylinders.size();
  l.first_spool = k;
  for (const Spool& s : net.spools) {
    l.spool_state.push_back(k);
    k += s.dynamics == SpoolDynamics::kSecondOrder ? 2 : 1;
  }
  l.pumped = k++;
  l.returned = k++;
  l.compressed = k++;
  l.size = k;
  return l;
}

std::vector<double> initial_state(const Network& net, const StateLayout& layout) {
  std::vector<double> y(layout.size, 0.0);
  for (std::size_t c = 0; c < net.cylinders.size(); ++c) {
    y[layout.first_cylinder + 2 * c] = net.cylinders[c].initial_position_m / kLengthScale;
  }
  for (std::size_t s = 0; s < net.spools.size(); ++s) {
    y[layout.spool_state[s]] = net.spools[s].initial;
  }
  return y;
}

namespace {

// Absolute pressure below which the cavitation transform applies: where the
// air term alone would give kCavitationBulkModulusPa.
double cavitation_floor_pa(const OilModel& oil) {
  const double air = std::max(oil.air_fraction, kMinAirFraction);
  return std::sqrt(air * oil.atmospheric_pa * kCavitationBulkModulusPa);
}

}  // namespace

double effective_bulk_modulus(const OilModel& oil, double p_pa) {
  // 1/beta_e = 1/beta_oil + (V_air/V)/beta_air with isothermal air,
  // beta_air = p_abs and V_air/V = a * p_atm / p_abs
  // (check-values 4.3a, formula [SRC] "Equivalent bulk modulus", eq. 6.30).
  const double air = std::max(oil.air_fraction, kMinAirFraction);
  const double p_abs = std::max(p_pa + oil.atmospheric_pa, 1e-300);
  return 1.0 / (1.0 / oil.bulk_modulus_pa + air * oil.atmospheric_pa / (p_abs * p_abs));
}

namespace {

double physical_pressure_at(const OilModel& oil, double p_state_pa, double f) {
  const double s_abs = p_state_pa + oil.atmospheric_pa;
  if (s_abs >= f) return p_state_pa;
  return f * f / (2.0 * f - s_abs) - oil.atmospheric_pa;
}

// The state rate with the oil's constants precomputed: f = the cavitation
// floor, inv_beta = 1/beta_oil, air_patm = a * p_atm. Above the floor it is
// beta_e/V * Q with 1/beta_e = inv_beta + air_patm/p_abs^2 (the law of
// effective_bulk_modulus()), written with one division.
inline double pressure_state_rate_at(const OilModel& oil, double p_state_pa, double volume_m3,
                                     double net_flow_m3_s, double f, double inv_beta, double air_patm) {
  const double s_abs = p_state_pa + oil.atmospheric_pa;
  if (s_abs >= f) {
    const double p2 = s_abs * s_abs;
    return net_flow_m3_s * p2 / (volume_m3 * (p2 * inv_beta + air_patm));
  }
  const double p_abs = f * f / (2.0 * f - s_abs);
  return net_flow_m3_s / volume_m3 * f * f / (p_abs * p_abs * inv_beta + air_patm);
}

double air_times_patm(const OilModel& oil) {
  return std::max(oil.air_fraction, kMinAirFraction) * oil.atmospheric_pa;
}

// The reciprocal an element's law divides by, computed once per element
// (the right-hand side runs ~100 000 times per simulated minute; a
// multiplication is several times cheaper than a division there):
// spool edges 1/(1 - overlap) or 1/centre width, checks 1/full-open span,
// relief 1/override gradient.
double element_inverse(const Element& e) {
  switch (e.kind) {
    case ElementKind::kSpoolEdge:
      return e.opening == EdgeOpening::kCentre ? 1.0 / e.centre_width : 1.0 / (1.0 - e.overlap);
    case ElementKind::kCheck:
    case ElementKind::kCounterbalance:
      return 1.0 / e.full_open_span_pa;
    case ElementKind::kRelief:
      return 1.0 / e.override_pa_s_m3;
    case ElementKind::kOrifice:
    case ElementKind::kLaminar:
      break;
  }
  return 0.0;
}

// Open area of a spool edge; inv = element_inverse(edge).
inline double edge_area_inv(const Element& edge, double spool_position, double inv) {
  const double s = std::clamp(spool_position, -1.0, 1.0);
  double frac = 0.0;
  switch (edge.opening) {
    case EdgeOpening::kPositive:
      frac = clamp01((s - edge.overlap) * inv);
      break;
    case EdgeOpening::kNegative:
      frac = clamp01((-s - edge.overlap) * inv);
      break;
    case EdgeOpening::kCentre:
      frac = clamp01(1.0 - std::fabs(s) * inv);
      break;
  }
  return edge.area_m2 * frac + edge.leak_area_m2;
}

// The laminar blend's constants for transition pressure pt: c1 = 1.25/sqrt(pt),
// c3 = 0.25/(pt^2 sqrt(pt)), so the blend needs no division per call.
struct LaminarBlend {
  double pt, c1, c3;
};
LaminarBlend laminar_blend(double transition_pa) {
  const double st = std::sqrt(transition_pa);
  return LaminarBlend{transition_pa, 1.25 / st, 0.25 / (transition_pa * transition_pa * st)};
}

// Both laws are evaluated and one is selected, so the compiler can do without
// a branch that flips unpredictably from element to element.
inline double orifice_flow_k(double k, double area_m2, double dp_pa, const LaminarBlend& lb) {
  const double ka = k * area_m2;
  const double a = std::fabs(dp_pa);
  const double turbulent = ka * std::copysign(std::sqrt(a), dp_pa);
  const double laminar = ka * dp_pa * (lb.c1 - lb.c3 * dp_pa * dp_pa);
  return a >= lb.pt ? turbulent : laminar;
}

}  // namespace

double physical_pressure(const OilModel& oil, double p_state_pa) {
  // Below the floor f the state maps to p_abs = f^2 / (2 f - s): C1 at f,
  // never below absolute zero, and the state falls linearly with the
  // cavity (free gas) volume, beta_cav per unit volume fraction, so it stays
  // well scaled while a node cavitates. The rate of the state is divided by
  // dp/ds, so the free-air law itself is integrated unchanged (our own
  // regularisation).
  return physical_pressure_at(oil, p_state_pa, cavitation_floor_pa(oil));
}

double pressure_state_rate(const OilModel& oil, double p_state_pa, double volume_m3, double net_flow_m3_s) {
  // Pressure build-up dp/dt = beta/V (Q_in - dV/dt) (check-values 4.13 [SRC]).
  // Below the floor: ds/dt = (dp/dt) / (dp/ds), dp/ds = p_abs^2 / f^2,
  // written so that it stays finite as p_abs -> 0.
  return pressure_state_rate_at(oil, p_state_pa, volume_m3, net_flow_m3_s, cavitation_floor_pa(oil),
                                1.0 / oil.bulk_modulus_pa, air_times_patm(oil));
}

double orifice_flow(double cd, double area_m2, double dp_pa, double density_kg_m3,
                    double transition_pa) {
  // Orifice equation Q = Cd A sqrt(2 dp / rho) (check-values 4.1, [SRC] Rabie
  // eq. 2.36). Below the transition: a + b dp^3 matched in value and slope
  // at dp = transition (our own regularisation).
  return orifice_flow_k(cd * std::sqrt(2.0 / density_kg_m3), area_m2, dp_pa, laminar_blend(transition_pa));
}

double edge_area(const Element& edge, double spool_position) {
  return edge_area_inv(edge, spool_position, element_inverse(edge));
}

void node_pressures(const Network& net, const StateLayout& layout, const double* y,
                    std::vector<double>& p_pa) {
  p_pa.resize(net.nodes.size());
  const double floor_pa = cavitation_floor_pa(net.oil);
  for (std::size_t i = 0; i < net.nodes.size(); ++i) {
    const int k = layout.node_state[i];
    p_pa[i] = k < 0 ? net.nodes[i].fixed_pressure_pa : physical_pressure_at(net.oil, y[k] * kPressureScale, floor_pa);
  }
}

namespace {

// k = Cd sqrt(2/rho) and inv = element_inverse(e) of the element,
// precomputed by the caller.
inline double element_flow_k(const StateLayout& layout, const Element& e, double k, double inv,
                             const LaminarBlend& ptr, const std::vector<double>& p, const double* y) {
  const double pf = p[static_cast<std::size_t>(e.from)];
  const double pt = p[static_cast<std::size_t>(e.to)];
  const double dp = pf - pt;
  switch (e.kind) {
    case ElementKind::kOrifice:
      return orifice_flow_k(k, e.area_m2, dp, ptr);
    case ElementKind::kSpoolEdge: {
      const double s = y[layout.spool_state[static_cast<std::size_t>(e.spool)]];
      return orifice_flow_k(k, edge_area_inv(e, s, inv), dp, ptr);
    }
    case ElementKind::kCheck: {
      double open = smoothstep((dp - e.cracking_pa) * inv);
      if (e.pilot >= 0) {
        // Pilot-operated check: the pilot piston lifts the poppet against the
        // load pressure (to side) once ratio * p_pilot exceeds it.
        const double pp = p[static_cast<std::size_t>(e.pilot)];
        open = std::max(open, smoothstep((e.pilot_ratio * pp + dp - e.cracking_pa) * inv));
      }
      return orifice_flow_k(k, e.area_m2 * open + e.leak_area_m2, dp, ptr);
    }
    case ElementKind::kCounterbalance: {
      // The load pressure across the valve and the pilot pressure (times
      // the pilot ratio) both push it open against the spring setting:
      // p_load + ratio p_pilot >= setting (common practice, no source).
      const double pp = e.pilot >= 0 ? p[static_cast<std::size_t>(e.pilot)] : 0.0;
      const double open = smoothstep((dp + e.pilot_ratio * pp - e.cracking_pa) * inv);
      return orifice_flow_k(k, e.area_m2 * open + e.leak_area_m2, dp, ptr);
    }
    case ElementKind::kRelief:
      // Cracking pressure plus an override gradient (linear pressure-flow
      // characteristic above cracking; common practice, no source).
      return soft_positive(dp - e.cracking_pa, e.blend_pa) * inv;
    case ElementKind::kLaminar:
      return e.conductance_m3_s_pa * dp;
  }
  return 0.0;
}

}  // namespace

std::vector<ElementConstants> element_constants(const Network& net) {
  std::vector<ElementConstants> c;
  c.reserve(net.elements.size());
  for (const Element& e : net.elements) {
    const LaminarBlend lb = laminar_blend(net.oil.laminar_transition_pa);
    c.push_back(ElementConstants{e.cd * std::sqrt(2.0 / net.oil.density_kg_m3), element_inverse(e), lb.c1, lb.c3});
  }
  return c;
}

void element_flows(const Network& net, const StateLayout& layout, const std::vector<ElementConstants>& constants,
                   const std::vector<double>& p, const double* y, double* q) {
  for (std::size_t j = 0; j < net.elements.size(); ++j) {
    const ElementConstants& c = constants[j];
    q[j] = element_flow_k(layout, net.elements[j], c.k, c.inv,
                          LaminarBlend{net.oil.laminar_transition_pa, c.laminar_c1, c.laminar_c3}, p, y);
  }
}

double element_flow(const Network& net, const StateLayout& layout, const Element& e,
                    const std::vector<double>& p, const double* y) {
  return element_flow_k(layout, e, e.cd * std::sqrt(2.0 / net.oil.density_kg_m3), element_inverse(e),
                        laminar_blend(net.oil.laminar_transition_pa), p, y);
}

double node_pressure_of(const Network& net, const StateLayout& layout, std::size_t node, const double* y) {
  const int k = layout.node_state[node];
  return k < 0 ? net.nodes[node].fixed_pressure_pa
               : physical_pressure_at(net.oil, y[k] * kPressureScale, cavitation_floor_pa(net.oil));
}

double pump_flow(const Pump& pump, const NetworkInputs& in, double p_pa) {
  if (!in.pump_running || pump.node < 0) return 0.0;
  double q = pump.nominal_m3_s * in.pump_flow_factor;
  if (pump.compensated) {
    q *= smoothstep((pump.compensator_pa - p_pa) / pump.compensator_band_pa);
  }
  return q;
}

double load_force(const Cylinder& c, const NetworkInputs& in, std::size_t index, double t_s,
                  double x_m, double v_m_s) {
  double resisting = c.resisting_force_n;
  if (index < in.extra_force_n.size()) resisting += in.extra_force_n[index];
  const auto& prof = c.force_profile;
  if (!prof.empty()) {
    if (t_s <= prof.front().time_s) {
      resisting += prof.front().force_n;
    } else if (t_s >= prof.back().time_s) {
      resisting += prof.back().force_n;
    } else {
      for (std::size_t i = 1; i < prof.size(); ++i) {
        if (t_s <= prof[i].time_s) {
          const double u = (t_s - prof[i - 1].time_s) / (prof[i].time_s - prof[i - 1].time_s);
          resisting += prof[i - 1].force_n + u * (prof[i].force_n - prof[i - 1].force_n);
          break;
        }
      }
    }
  }
  double f = -resisting + c.gravity * c.mass_kg * kStandardGravity;
  if (c.contact_n_m > 0.0 && x_m > c.contact_m) {
    // Workpiece: a stiff spring-damper that can only push.
    f -= std::max(0.0, c.contact_n_m * (x_m - c.contact_m) + c.contact_n_s_m * v_m_s);
  }
  return f;
}

NetworkRhs::NetworkRhs(const Network& net, const StateLayout& layout)
    : net_(&net),
      layout_(&layout),
      floor_pa_(cavitation_floor_pa(net.oil)),
      inv_beta_(1.0 / net.oil.bulk_modulus_pa),
      air_patm_(air_times_patm(net.oil)),
      laminar_c1_(laminar_blend(net.oil.laminar_transition_pa).c1),
      laminar_c3_(laminar_blend(net.oil.laminar_transition_pa).c3),
      p_(net.nodes.size()),
      q_net_(net.nodes.size()),
      dvdt_(net.nodes.size()),
      constants_(element_constants(net)) {
  for (const Element& e : net.elements) {
    // +1: the element returns oil to a fixed node (tank), -1: draws from one.
    returned_sign_.push_back((net.nodes[static_cast<std::size_t>(e.to)].fixed ? 1.0 : 0.0) -
                             (net.nodes[static_cast<std::size_t>(e.from)].fixed ? 1.0 : 0.0));
  }
  for (const Cylinder& c : net.cylinders) {
    cyl_inv_.push_back(1.0 / c.coulomb_velocity_m_s);
    cyl_inv_.push_back(1.0 / (c.mass_kg * kLengthScale));  // force (N) to acceleration (mm/s^2)
  }
}

void NetworkRhs::operator()(const NetworkInputs& in, double t_s, const double* y, double* dydt) {
  const Network& net = *net_;
  const StateLayout& L = *layout_;
  const std::size_t nn = net.nodes.size();
  for (std::size_t i = 0; i < nn; ++i) {
    const int k = L.node_state[i];
    p_[i] = k < 0 ? net.nodes[i].fixed_pressure_pa : physical_pressure_at(net.oil, y[k] * kPressureScale, floor_pa_);
    q_net_[i] = 0.0;
    dvdt_[i] = 0.0;
  }
  double returned = 0.0;

  const LaminarBlend laminar{net.oil.laminar_transition_pa, laminar_c1_, laminar_c3_};
  for (std::size_t j = 0; j < net.elements.size(); ++j) {
    const Element& e = net.elements[j];
    const double q = element_flow_k(L, e, constants_[j].k, constants_[j].inv, laminar, p_, y);
    q_net_[static_cast<std::size_t>(e.from)] -= q;
    q_net_[static_cast<std::size_t>(e.to)] += q;
    returned += returned_sign_[j] * q;
  }
  double pumped = 0.0;
  if (net.pump.node >= 0) {
    pumped = pump_flow(net.pump, in, p_[static_cast<std::size_t>(net.pump.node)]);
    q_net_[static_cast<std::size_t>(net.pump.node)] += pumped;
  }

  for (std::size_t c = 0; c < net.cylinders.size(); ++c) {
    const Cylinder& cyl = net.cylinders[c];
    const std::size_t k = L.first_cylinder + 2 * c;
    const double x = y[k] * kLengthScale;
    const double v = y[k + 1] * kLengthScale;
    const auto a = static_cast<std::size_t>(cyl.node_a);
    const auto b = static_cast<std::size_t>(cyl.node_b);
    const double leak = cyl.leak_m3_s_pa + (c < in.extra_leak_m3_s_pa.size() ? in.extra_leak_m3_s_pa[c] : 0.0);
    const double q_leak = leak * (p_[a] - p_[b]);
    q_net_[a] -= q_leak;
    q_net_[b] += q_leak;
    dvdt_[a] += cyl.area_a_m2 * v;
    dvdt_[b] -= cyl.area_b_m2 * v;

    double f = p_[a] * cyl.area_a_m2 - p_[b] * cyl.area_b_m2;
    // tanh(u) rounds to +-1 for |u| >= 20, where the library call is skipped.
    const double u = v * cyl_inv_[2 * c];
    f -= cyl.coulomb_n * (std::fabs(u) >= 20.0 ? std::copysign(1.0, u) : std::tanh(u)) + cyl.viscous_n_s_m * v;
    f += load_force(cyl, in, c, t_s, x, v);
    // End stops: stiff spring-dampers that can only push back.
    if (x < 0.0) f += std::max(0.0, -cyl.end_stop_n_m * x - cyl.end_stop_n_s_m * v);
    if (x > cyl.stroke_m) f += std::min(0.0, -cyl.end_stop_n_m * (x - cyl.stroke_m) - cyl.end_stop_n_s_m * v);
    dydt[k] = y[k + 1];
    dydt[k + 1] = f * cyl_inv_[2 * c + 1];
  }

  double compressed = 0.0;
  for (std::size_t i = 0; i < net.nodes.size(); ++i) {
    const int k = L.node_state[i];
    if (k < 0) continue;
    const double vol = node_volume(net, net.nodes[i], y, L);
    dydt[k] = pressure_state_rate_at(net.oil, y[k] * kPressureScale, vol, q_net_[i] - dvdt_[i], floor_pa_,
                                     inv_beta_, air_patm_) /
              kPressureScale;
    // V/beta dp/dt equals the net inflow by the continuity equation.
    compressed += q_net_[i] - dvdt_[i];
  }

  for (std::size_t s = 0; s < net.spools.size(); ++s) {
    const Spool& sp = net.spools[s];
    const std::size_t k = L.spool_state[s];
    const bool stuck = s < in.spool_stuck.size() && in.spool_stuck[s];
    const double target = s < in.spool_target.size() ? in.spool_target[s] : 0.0;
    switch (sp.dynamics) {
      case SpoolDynamics::kRateLimited: {
        // Linear in a 1 % band around the target so the rate stays continuous.
        const double tau = 0.01 / sp.rate_per_s;
        dydt[k] = stuck ? 0.0 : std::clamp((target - y[k]) / tau, -sp.rate_per_s, sp.rate_per_s);
        break;
      }
      case SpoolDynamics::kFirstOrder:
        dydt[k] = stuck ? 0.0 : (target - y[k]) / sp.time_constant_s;
        break;
      case SpoolDynamics::kSecondOrder: {
        const double w = sp.natural_rad_s;
        dydt[k] = stuck ? 0.0 : y[k + 1];
        dydt[k + 1] = stuck ? 0.0 : w * w * (target - y[k]) - 2.0 * sp.damping * w * y[k + 1];
        break;
      }
    }
  }
  dydt[L.pumped] = pumped / kVolumeScale;
  dydt[L.returned] = returned / kVolumeScale;
  dydt[L.compressed] = compressed / kVolumeScale;
}

}  // namespace spoolstep::hostsim
