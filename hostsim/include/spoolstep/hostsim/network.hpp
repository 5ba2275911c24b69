#pragma once
/// The plant as a flat lumped-parameter network: oil volumes (nodes) with a
/// pressure state, elements that pass flow between nodes, spools, cylinders
/// and one pump. Plain data plus one function that evaluates the equations,
/// so the same description can be integrated here, written to JSON for the
/// independent reference integrator (tools/ref/plant_ref.py), and reviewed.
///
/// Everything inside is SI: Pa (gauge), m, m^2, m^3, m^3/s, s, N, kg.
#include <cstddef>
#include <string>
#include <vector>

namespace spoolstep::hostsim {

/// Oil properties shared by every node.
struct OilModel {
  double density_kg_m3 = 870.0;
  double bulk_modulus_pa = 1.4e9;  ///< pure oil, no air
  /// Free air by volume at atmospheric pressure. Never below kMinAirFraction,
  /// so that a node cannot fall below absolute zero (cavitation floor).
  double air_fraction = 0.0;
  double atmospheric_pa = 1.0e5;
  /// Below this pressure difference the orifice flow blends to a laminar
  /// (cubic) law, so dQ/d(dp) stays finite at dp = 0.
  double laminar_transition_pa = 1.0e4;
};

/// Smallest free-air fraction used in the bulk modulus; see OilModel.
inline constexpr double kMinAirFraction = 1e-7;
/// Below the absolute pressure where the air term alone gives this bulk
/// modulus (Pa), i.e. p_abs = sqrt(air * p_atm * this), the pressure state
/// is mapped so that the physical pressure stays above absolute zero.
inline constexpr double kCavitationBulkModulusPa = 1.0e8;

struct Node {
  std::string name;
  bool fixed = false;          ///< tank: pressure held at fixed_pressure_pa
  double fixed_pressure_pa = 0.0;
  double base_volume_m3 = 0.0; ///< lines, dead volume
  int cylinder = -1;           ///< chamber of this cylinder (volume grows with travel), or -1
  int side = 0;                ///< +1: A side (V grows with x), -1: B side (V shrinks with x)
};

/// How the open area of a spool edge follows the spool position s (-1..1).
enum class EdgeOpening {
  kPositive,  ///< opens for s > overlap (P->A, B->T on a 4/3 valve)
  kNegative,  ///< opens for s < -overlap (P->B, A->T)
  kCentre,    ///< fully open at s = 0, closed for |s| >= centre width (centre passages)
};

enum class ElementKind {
  kOrifice,   ///< fixed area, orifice equation
  kSpoolEdge, ///< area from a spool position, orifice equation
  kCheck,     ///< area from the pressure across it (and an optional pilot), orifice equation
  /// Counterbalance valve (load-holding relief, pilot assisted): opens from
  /// the loaded chamber (from) to the valve line (to) as the load pressure
  /// across it plus pilot_ratio times the pilot pressure passes the setting
  /// (cracking_pa), fully open full_open_span_pa above; orifice equation.
  kCounterbalance,
  kRelief,    ///< flow = blended(p_from - p_to - cracking) / override gradient
  kLaminar,   ///< flow = conductance * (p_from - p_to)
};

struct Element {
  ElementKind kind = ElementKind::kOrifice;
  std::string name;
  int from = 0;  ///< node index; positive flow goes from -> to
  int to = 0;
  double cd = 0.61;
  double area_m2 = 0.0;       ///< full open area
  double leak_area_m2 = 0.0;  ///< always open (spool clearance), spool edges and checks
  // spool edge
  int spool = -1;
  EdgeOpening opening = EdgeOpening::kPositive;
  double overlap = 0.0;       ///< fraction of spool stroke (0..0.5)
  double centre_width = 0.0;  ///< kCentre: fraction of stroke over which the passage closes
  // check valve, optionally pilot operated; counterbalance valve (setting)
  double cracking_pa = 0.0;
  double full_open_span_pa = 0.0;  ///< pressure above cracking at which the check is fully open
  int pilot = -1;                  ///< pilot node, -1 = plain check
  double pilot_ratio = 0.0;        ///< pilot piston area / seat area
  // relief
  double override_pa_s_m3 = 0.0;   ///< pressure rise per flow above cracking
  double blend_pa = 0.0;           ///< width of the smooth corner at cracking
  // laminar
  double conductance_m3_s_pa = 0.0;
};

enum class SpoolDynamics {
  kRateLimited,  ///< solenoid: moves at a fixed rate towards its target
  kFirstOrder,   ///< proportional, first order lag
  kSecondOrder,  ///< proportional, second order (natural frequency, damping)
};

struct Spool {
  std::string name;
  SpoolDynamics dynamics = SpoolDynamics::kRateLimited;
  double rate_per_s = 0.0;        ///< kRateLimited: stroke fraction per second
  double time_constant_s = 0.0;   ///< kFirstOrder
  double natural_rad_s = 0.0;     ///< kSecondOrder
  double damping = 0.0;           ///< kSecondOrder
  double initial = 0.0;
};

struct ForcePoint {
  double time_s = 0.0;
  double force_n = 0.0;
};

struct Cylinder {
  std::string name;
  int node_a = -1;
  int node_b = -1;
  double area_a_m2 = 0.0;
  double area_b_m2 = 0.0;
  double stroke_m = 0.0;
  double mass_kg = 0.0;
  double coulomb_n = 0.0;
  double coulomb_velocity_m_s = 1e-3;  ///< tanh smoothing of Coulomb friction
  double viscous_n_s_m = 0.0;
  double leak_m3_s_pa = 0.0;           ///< across the piston, A <-> B
  double end_stop_n_m = 1e9;           ///< stiffness beyond either end of stroke
  double end_stop_n_s_m = 0.0;         ///< damping at the end stops
  double initial_position_m = 0.0;
  // load, force positive = resisting extension
  double resisting_force_n = 0.0;
  int gravity = 0;                     ///< +1 weight pulls towards extension, -1 towards retraction
  double contact_m = 0.0;              ///< workpiece contact position
  double contact_n_m = 0.0;            ///< 0 = no workpiece
  double contact_n_s_m = 0.0;
  std::vector<ForcePoint> force_profile;  ///< extra resisting force vs time, linear between points
};

struct Pump {
  int node = -1;
  double nominal_m3_s = 0.0;       ///< Vg * n * volumetric efficiency
  bool compensated = false;
  double compensator_pa = 0.0;     ///< flow reaches 0 here
  double compensator_band_pa = 0.0;///< flow starts to fall this far below the setting
};

struct Network {
  OilModel oil;
  std::vector<Node> nodes;
  std::vector<Element> elements;
  std::vector<Spool> spools;
  std::vector<Cylinder> cylinders;
  Pump pump;
};

/// Everything that may change between two control periods: commands and
/// injected faults. Constant inside one advance().
struct NetworkInputs {
  std::vector<double> spool_target;      ///< per spool, -1..1
  std::vector<bool> spool_stuck;         ///< per spool
  bool pump_running = false;
  double pump_flow_factor = 1.0;         ///< 0 = pump failed
  std::vector<double> extra_leak_m3_s_pa;///< per cylinder, added piston leak (seal fault)
  std::vector<double> extra_force_n;     ///< per cylinder, added resisting force (load change)
};

/// Same commands and faults, field by field (a field added to
/// NetworkInputs must be added here: the plant keeps an integration window
/// only while the inputs compare equal).
inline bool operator==(const NetworkInputs& a, const NetworkInputs& b) {
  return a.spool_target == b.spool_target && a.spool_stuck == b.spool_stuck && a.pump_running == b.pump_running &&
         a.pump_flow_factor == b.pump_flow_factor && a.extra_leak_m3_s_pa == b.extra_leak_m3_s_pa &&
         a.extra_force_n == b.extra_force_n;
}
inline bool operator!=(const NetworkInputs& a, const NetworkInputs& b) { return !(a == b); }

/// Layout of the state vector. Pressures are stored in bar, positions in mm,
/// velocities in mm/s and accumulated volumes in cm^3, so that one absolute
/// tolerance fits every component; the physics converts to SI.
struct StateLayout {
  std::vector<int> node_state;  ///< per node: state index or -1 for fixed nodes
  std::size_t first_cylinder = 0;  ///< 2 per cylinder: x, v
  std::size_t first_spool = 0;     ///< 1 per spool (+1 for second order)
  std::vector<std::size_t> spool_state;
  std::size_t pumped = 0;       ///< accumulated pump delivery
  std::size_t returned = 0;     ///< accumulated flow into fixed nodes (tank) minus flow out of them
  std::size_t compressed = 0;   ///< accumulated sum of V/beta dp
  std::size_t size = 0;
};

inline constexpr double kPressureScale = 1e5;   ///< state unit: bar
inline constexpr double kLengthScale = 1e-3;    ///< state unit: mm, mm/s
inline constexpr double kVolumeScale = 1e-6;    ///< state unit: cm^3

/// Builds the state layout of a network.
StateLayout make_layout(const Network& net);

/// Initial state: pressures at fixed/zero gauge, cylinders at their initial
/// positions at rest, spools at their initial positions, accumulators zero.
std::vector<double> initial_state(const Network& net, const StateLayout& layout);

/// Effective bulk modulus at gauge pressure p (Pa): pure oil plus free air.
double effective_bulk_modulus(const OilModel& oil, double p_pa);

/// Physical gauge pressure (Pa) of a node whose pressure state is
/// p_state_pa: equal above the cavitation floor, and mapped so that it never
/// falls below absolute zero below it.
double physical_pressure(const OilModel& oil, double p_state_pa);

/// d(pressure state)/dt (Pa/s) of a node of volume V with net inflow
/// Q_in - dV/dt (m^3/s).
double pressure_state_rate(const OilModel& oil, double p_state_pa, double volume_m3, double net_flow_m3_s);

/// Orifice equation Q = Cd A sqrt(2 dp / rho), with a cubic laminar blend
/// below `transition_pa`; sign follows dp. Returns m^3/s.
double orifice_flow(double cd, double area_m2, double dp_pa, double density_kg_m3,
                    double transition_pa);

/// Open area (m^2) of a spool edge at spool position s.
double edge_area(const Element& edge, double spool_position);

/// Pressure (Pa) of every node for the state y.
void node_pressures(const Network& net, const StateLayout& layout, const double* y,
                    std::vector<double>& p_pa);

/// Flow (m^3/s) through one element for the node pressures p and state y.
double element_flow(const Network& net, const StateLayout& layout, const Element& element,
                    const std::vector<double>& p_pa, const double* y);

/// Per-element constants of the flow laws, computed once: k = Cd sqrt(2/rho),
/// the reciprocal the element's law divides by (1/(1 - overlap),
/// 1/centre width, 1/full-open span or 1/override gradient) and the laminar
/// blend's coefficients 1.25/sqrt(p_t) and 0.25/(p_t^2 sqrt(p_t)).
struct ElementConstants {
  double k = 0.0;
  double inv = 0.0;
  double laminar_c1 = 0.0;
  double laminar_c3 = 0.0;
};
std::vector<ElementConstants> element_constants(const Network& net);

/// element_flow() of every element (m^3/s) into q, with the elements'
/// constants given (the same values, one call for all).
void element_flows(const Network& net, const StateLayout& layout, const std::vector<ElementConstants>& constants,
                   const std::vector<double>& p_pa, const double* y, double* q);

/// Pressure (Pa) of one node for the state y (as node_pressures()).
double node_pressure_of(const Network& net, const StateLayout& layout, std::size_t node, const double* y);

/// Pump delivery (m^3/s) at outlet pressure p_pa.
double pump_flow(const Pump& pump, const NetworkInputs& in, double p_pa);

/// External force on a cylinder rod (N, positive = towards extension) from
/// the load, gravity, contact and the injected extra force.
double load_force(const Cylinder& cyl, const NetworkInputs& in, std::size_t index, double t_s,
                  double x_m, double v_m_s);

/// The right-hand side dy/dt of the network equations. `work` is scratch
/// space (resized once), so the cyclic path does not allocate.
class NetworkRhs {
 public:
  NetworkRhs(const Network& net, const StateLayout& layout);
  /// dydt = f(t, y) for the given inputs.
  void operator()(const NetworkInputs& in, double t_s, const double* y, double* dydt);

 private:
  const Network* net_;
  const StateLayout* layout_;
  double floor_pa_ = 0.0;         ///< cavitation floor (absolute), computed once
  double inv_beta_ = 0.0;         ///< 1 / bulk modulus of the oil
  double air_patm_ = 0.0;         ///< free-air fraction * atmospheric pressure
  double laminar_c1_ = 0.0;       ///< laminar blend: 1.25 / sqrt(p_t)
  double laminar_c3_ = 0.0;       ///< laminar blend: 0.25 / (p_t^2 sqrt(p_t))
  std::vector<double> p_;
  std::vector<double> q_net_;
  std::vector<double> dvdt_;
  std::vector<ElementConstants> constants_;  ///< per element
  std::vector<double> returned_sign_;  ///< per element: +1 into a fixed node, -1 out of one
  std::vector<double> cyl_inv_;   ///< per cylinder: 1/Coulomb velocity, 1/(mass * length scale)
};

}  // namespace spoolstep::hostsim
