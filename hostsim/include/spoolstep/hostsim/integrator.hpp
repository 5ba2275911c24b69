#pragma once
/// Stiff integrators for the network equations. Both advance the state from
/// t to t_end with local error control and call `on_step` after every
/// accepted internal step (where limit and pressure switches are sampled).
#include <cstddef>
#include <functional>
#include <memory>
#include <string>
#include <vector>

#include "spoolstep/hostsim/network.hpp"

namespace spoolstep::hostsim {

enum class SolverMethod {
  /// Boost.Odeint rosenbrock4 (4th order Rosenbrock, Shampine's coefficients)
  /// with its step-size controller; finite-difference Jacobian every step.
  kOdeintRosenbrock4,
  /// Purpose-written ROS2 (2nd order, L-stable Rosenbrock-W method of Verwer,
  /// Spee, Blom and Hundsdorfer 1999), which keeps its order with an outdated
  /// Jacobian: the Jacobian and its LU factors are reused while the step size
  /// stays the same and no step is rejected.
  kRos2,
};

struct SolverSettings {
  SolverMethod method = SolverMethod::kOdeintRosenbrock4;
  /// Relative tolerance of every state but cylinder positions, whose size
  /// (the distance from the retracted end) says nothing about how exactly
  /// they must be known: they take `atol` alone (Ros2; Odeint's rosenbrock4
  /// takes `rtol` for every state).
  double rtol = 1e-5;
  /// Absolute tolerance in state units: bar (pressures), mm (positions),
  /// stroke fraction (spools), cm^3 (oil accumulators). A second-order
  /// spool's rate (stroke fraction/s) gets atol times its natural frequency,
  /// so that its error weighs like the spool position's.
  double atol = 1e-5;
  /// Absolute tolerance of cylinder velocities (mm/s). Ros2 only; Odeint's
  /// rosenbrock4 takes the one `atol` for every state.
  double velocity_atol_mm_s = 1e-5;
  /// The most scan periods the plant integrates ahead in one window under
  /// unchanged inputs (see Plant::advance); 1 integrates period by period.
  /// ros2 only: rosenbrock4 always integrates period by period.
  int max_window_periods = 1;
};

/// Per-state absolute tolerances of `settings` for this network (see
/// SolverSettings::atol).
std::vector<double> absolute_tolerances(const Network& net, const StateLayout& layout,
                                        const SolverSettings& settings);
/// Per-state relative tolerances: `rtol`, except cylinder positions (0:
/// the absolute tolerance alone, see SolverSettings::rtol).
std::vector<double> relative_tolerances(const Network& net, const StateLayout& layout,
                                        const SolverSettings& settings);

struct SolverStats {
  std::size_t accepted = 0;
  std::size_t rejected = 0;
  std::size_t rhs_calls = 0;
  std::size_t jacobians = 0;
  std::size_t factorisations = 0;
};

class Integrator {
 public:
  virtual ~Integrator() = default;
  /// Advances y (state units) from t to t_end under constant inputs, calling
  /// on_step after every accepted internal step. Returns false if the step
  /// size collapsed (y then holds the last good state).
  bool advance(const NetworkInputs& in, std::vector<double>& y, double t, double t_end,
               const std::function<void(double, const std::vector<double>&)>& on_step) {
    return do_advance(in, y, t, t_end, on_step);
  }
  /// Counters since construction.
  const SolverStats& stats() const { return do_stats(); }
  /// The step size the error control proposes next (s); 0 before the first
  /// step or after restart().
  double step_hint() const { return do_step_hint(); }
  /// Forgets the step-size history (after a jump in the state).
  void restart() { do_restart(); }
  /// Tells the integrator that the inputs changed in a way that alters df/dy:
  /// a reused Jacobian may no longer fit. (Changes that only add a constant
  /// to f, such as a proportional spool's target, need not be told.)
  void inputs_changed() { do_inputs_changed(); }

 private:
  virtual bool do_advance(const NetworkInputs& in, std::vector<double>& y, double t, double t_end,
                          const std::function<void(double, const std::vector<double>&)>& on_step) = 0;
  virtual const SolverStats& do_stats() const = 0;
  virtual double do_step_hint() const = 0;
  virtual void do_restart() = 0;
  virtual void do_inputs_changed() = 0;
};

/// Creates the integrator for a network; `net` and `layout` must outlive it.
std::unique_ptr<Integrator> make_integrator(const Network& net, const StateLayout& layout,
                                            const SolverSettings& settings);

}  // namespace spoolstep::hostsim
