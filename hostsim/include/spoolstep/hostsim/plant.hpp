#pragma once
/// The hydraulic plant model behind the control core: built once from the
/// machine file's "plant" section plus the core's MachineConfig (valve kinds
/// and centre types, coil and channel names are read from there, never
/// repeated), then stepped in lock-step with the core:
///   read_inputs -> core scan -> apply_outputs -> advance(period).
/// Host code: it allocates at build time, and in advance() only while the
/// integration window's buffers grow to the run's working size.
#include <cstddef>
#include <memory>
#include <string>
#include <string_view>
#include <variant>
#include <vector>

#include <nlohmann/json_fwd.hpp>

#include "spoolstep/jsondoc/diagnostic.hpp"

#include "spoolstep/core/config.hpp"
#include "spoolstep/core/io_image.hpp"
#include "spoolstep/hostsim/integrator.hpp"
#include "spoolstep/hostsim/network.hpp"

namespace spoolstep::hostsim {

/// One problem in the plant section: the project's one diagnostic type
/// (file, pointer such as "/plant/valves/0/overlap_percent", reason, hint).
using PlantError = jsondoc::Diagnostic;

enum class FaultKind {
  kStuckSpool,       ///< target: function name; the spool freezes where it is
  kCoilOpen,         ///< target: coil or proportional channel name; no current flows
  kCoilShort,        ///< target: coil or proportional channel name; the driver trips, no force
  kSensorWireBreak,  ///< target: input name; 4-20 mA reads 0 mA, engineering input unhealthy, switch reads false
  kSensorStuck,      ///< target: input name; the value freezes at its present reading
  kSensorDrift,      ///< target: input name; value: drift in the input's unit per second
  kSensorFailLow,    ///< target: input name; transmitter signals failure, 3.6 mA (NAMUR NE 43)
  kSensorFailHigh,   ///< target: input name; transmitter signals failure, 21 mA (NAMUR NE 43)
  kSealLeak,         ///< target: cylinder name; value: added piston leak in mm^3/s per bar
  kPumpFailure,      ///< target: ignored; value: remaining fraction of the pump flow (0 = dead)
  kLoadChange,       ///< target: cylinder name; value: added resisting force in N (replaces an earlier one)
};

struct PlantFault {
  FaultKind kind = FaultKind::kStuckSpool;
  std::string target;
  double value = 0.0;
};

/// Values with their names (units in the names), for trace writers.
struct PlantSnapshot {
  double time_s = 0.0;
  const std::vector<std::string>* names = nullptr;  ///< owned by the plant, fixed after build
  std::vector<double> values;
  /// Value of the named column; NaN if there is none.
  double get(std::string_view name) const;
};

/// Oil volume bookkeeping since build (m^3). pumped - returned must equal
/// displaced + compressed: every element's flow leaves one node and enters
/// another, so only the pump, the tank, the cylinders and compression remain.
struct OilBalance {
  double pumped_m3 = 0.0;     ///< delivered by the pump
  double returned_m3 = 0.0;   ///< net flow into the tank (fixed-pressure nodes)
  double displaced_m3 = 0.0;  ///< growth of all chamber volumes (cylinder travel)
  double compressed_m3 = 0.0; ///< sum over nodes of the integral of V/beta dp
  /// (pumped - returned - displaced - compressed) / pumped (0 if nothing pumped).
  double relative_residual() const;
};

class StepWindow;

class Plant {
 public:
  Plant(const Plant&) = delete;
  Plant& operator=(const Plant&) = delete;
  ~Plant();

  // --- lock-step with the control core -----------------------------------
  /// Turns the core's outputs into spool targets, pump motor and dump valve
  /// states. Coil and channel faults are applied here.
  void apply_outputs(const core::OutputImage& out);
  /// Integrates from time_s() to time_s() + dt_s under the present commands.
  /// Switches are sampled at every internal step and at the end. Returns
  /// false if the integrator's step size collapsed (state and time then
  /// stay as they were) or dt_s is negative or NaN; dt_s = 0 does nothing.
  /// While the commands stay as they were, the ros2 plant integrates up to
  /// SolverSettings::max_window_periods periods ahead at once (as far as the
  /// error control lets a step grow) and later calls read the state inside
  /// that window between its step points; a change of command, a fault or
  /// a state set from outside drops the rest of the window and integration
  /// goes on from the present state.
  bool advance(double dt_s);
  /// Writes every wired sensor into its input slot (4-20 mA as the input's
  /// signal says; healthy = true and age 0 unless a fault says otherwise).
  void read_inputs(core::InputImage& in) const;
  /// Whether a plant sensor writes digital input i (a limit or pressure
  /// switch) or analog input i (a transducer) in read_inputs().
  bool drives_digital_input(std::size_t i) const;
  bool drives_analog_input(std::size_t i) const;
  /// Injects a fault from now on. Returns false if the target is unknown.
  [[nodiscard]] bool inject(const PlantFault& fault);
  /// Removes every injected fault.
  void clear_faults();

  // --- open loop (no core) -------------------------------------------------
  /// Sets the spool target of a function's valve directly (-1..1, + = P->A).
  /// Returns false if there is no such function.
  [[nodiscard]] bool set_spool_target(std::string_view function, double target);
  /// Pump motor on/off and dump valve closed (loaded) or open.
  void set_pump(bool running, bool loaded);
  /// Sets a cylinder's position (m) and velocity (m/s) now (an initial
  /// condition: restarts the oil balance). False if unknown.
  [[nodiscard]] bool set_cylinder_state(std::string_view cylinder, double x_m, double v_m_s);
  /// Sets a node's pressure (Pa gauge) now (an initial condition: restarts
  /// the oil balance). False if unknown or fixed.
  [[nodiscard]] bool set_node_pressure(std::string_view node, double p_pa);

  // --- observation ---------------------------------------------------------
  double time_s() const { return time_s_; }
  PlantSnapshot snapshot() const;
  OilBalance oil_balance() const;
  /// Pressure (Pa) of a node, NaN if unknown.
  double node_pressure(std::string_view node) const;
  /// Position (m) and velocity (m/s) of a cylinder, NaN if unknown.
  double cylinder_position(std::string_view cylinder) const;
  double cylinder_velocity(std::string_view cylinder) const;
  /// Spool position (-1..1) of a function's valve, NaN if unknown.
  double spool_position(std::string_view function) const;
  const Network& network() const { return net_; }
  const StateLayout& layout() const { return layout_; }
  const NetworkInputs& network_inputs() const { return inputs_; }
  const std::vector<double>& state() const { return y_; }
  const SolverSettings& solver_settings() const { return solver_; }
  const SolverStats& solver_stats() const;

  // Built only by build_plant.
  struct Wiring;
  Plant(Network net, SolverSettings solver, std::unique_ptr<Wiring> wiring);

 private:
  void sample_switches(const double* y);
  /// Integrates a new window from (time_s_, y_) that reaches at least t_end.
  bool open_window(double t_end, double dt_s);
  /// The longest window the settings allow (1 for rosenbrock4).
  int max_window_periods() const;
  /// Forgets the step-size history and the window (the state or the
  /// equations jumped).
  void restart_integration();
  void restart_balance();
  int node_index(std::string_view name) const;
  int cylinder_index(std::string_view name) const;

  Network net_;
  StateLayout layout_;
  SolverSettings solver_;
  std::unique_ptr<Integrator> integrator_;
  std::unique_ptr<StepWindow> window_;
  std::vector<double> y_work_;              ///< the integrator's state while it fills a window
  int window_periods_ = 1;                  ///< periods the next window may cover (grows in quiet stretches)
  std::unique_ptr<Wiring> wiring_;
  NetworkInputs inputs_;
  NetworkInputs last_inputs_;  ///< inputs of the previous advance(), to notice changes
  std::vector<double> y_;
  double time_s_ = 0.0;
  std::vector<std::string> snapshot_names_;
  std::vector<double> x_origin_m_;  ///< cylinder positions where the oil balance started
  std::vector<ElementConstants> element_constants_;  ///< for the element flows of snapshot()
  mutable std::vector<double> p_scratch_;
};

using BuildResult = std::variant<std::unique_ptr<Plant>, std::vector<PlantError>>;

/// Builds the plant from the machine file's "plant" object and the parsed
/// control part. Collects every problem it finds; returns either a complete
/// plant or the list of errors (never a half-built plant). `file` is only
/// used in the messages. Never throws.
BuildResult build_plant(const nlohmann::json& plant, const core::MachineConfig& machine,
                        const std::string& file = "");

/// The plant parameter table (type, unit, default, range, description) as a
/// Markdown table: the loader validates against the same table.
std::string plant_parameter_table_markdown();

}  // namespace spoolstep::hostsim
