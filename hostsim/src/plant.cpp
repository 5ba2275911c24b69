#include "spoolstep/core/analog.hpp"
#include "spoolstep/hostsim/plant.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "plant_wiring.hpp"
#include "step_window.hpp"

namespace spoolstep::hostsim {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// NAMUR NE 43 signal levels (core/analog.hpp; check-values section 2, [SRC]
// g-sensor.net, industryhub.site): valid measurement 3.8 .. 20.5 mA
// (saturation limits), failure <= 3.6 mA (low) or >= 21 mA (high).
constexpr double kNe43SaturationLowMa = core::kNe43SaturationLowMa;
constexpr double kNe43SaturationHighMa = core::kNe43SaturationHighMa;
constexpr double kNe43FailLowMa = core::kNe43FailLowMa;
constexpr double kNe43FailHighMa = core::kNe43FailHighMa;
// An open current loop carries no current at all (physics; below 3.6 mA, so
// a NE 43 receiver reads it as a low failure).
constexpr double kOpenLoopMa = 0.0;

double clamp_pm1(double v) { return std::clamp(v, -1.0, 1.0); }

// Whether going from inputs `a` to `b` changes df/dy, the Jacobian of the
// network equations. A proportional spool's target enters its equation as an
// additive term, an extra load force is additive, and a pump without a
// compensator delivers a flow that does not depend on the state: changing
// them leaves df/dy as it was, so the integrator may keep its Jacobian
// (which it still checks along every step). A closed-loop ramp changes a
// proportional target in every period; refreshing the Jacobian for each of
// those cost 16 right-hand sides per period for nothing.
bool jacobian_changed(const Network& net, const NetworkInputs& a, const NetworkInputs& b) {
  if (a.spool_stuck != b.spool_stuck || a.extra_leak_m3_s_pa != b.extra_leak_m3_s_pa) return true;
  if (net.pump.compensated &&
      (a.pump_running != b.pump_running || a.pump_flow_factor != b.pump_flow_factor)) {
    return true;
  }
  for (std::size_t s = 0; s < net.spools.size() && s < a.spool_target.size() && s < b.spool_target.size(); ++s) {
    // The rate limiter's saturation moves with the target (a stale
    // Jacobian there lets a spool crawl), so those targets count.
    if (a.spool_target[s] != b.spool_target[s] && net.spools[s].dynamics == SpoolDynamics::kRateLimited) {
      return true;
    }
  }
  return a.spool_target.size() != b.spool_target.size();
}

}  // namespace


double PlantSnapshot::get(std::string_view name) const {
  if (names == nullptr) return kNaN;
  for (std::size_t i = 0; i < names->size(); ++i) {
    if ((*names)[i] == name) return values[i];
  }
  return kNaN;
}

double OilBalance::relative_residual() const {
  if (pumped_m3 == 0.0) return 0.0;
  return (pumped_m3 - returned_m3 - displaced_m3 - compressed_m3) / pumped_m3;
}

Plant::Plant(Network net, SolverSettings solver, std::unique_ptr<Wiring> wiring)
    : net_(std::move(net)), layout_(make_layout(net_)), solver_(solver), wiring_(std::move(wiring)) {
  integrator_ = make_integrator(net_, layout_, solver_);
  window_ = std::make_unique<StepWindow>(layout_.size);
  element_constants_ = element_constants(net_);
  y_ = initial_state(net_, layout_);
  y_work_ = y_;
  inputs_.spool_target.assign(net_.spools.size(), 0.0);
  for (std::size_t s = 0; s < net_.spools.size(); ++s) inputs_.spool_target[s] = net_.spools[s].initial;
  inputs_.spool_stuck.assign(net_.spools.size(), false);
  inputs_.extra_leak_m3_s_pa.assign(net_.cylinders.size(), 0.0);
  inputs_.extra_force_n.assign(net_.cylinders.size(), 0.0);
  // Without a power unit in the machine file the pump runs from the start.
  inputs_.pump_running = !wiring_->has_power_unit;
  for (std::size_t i = 0; i < net_.nodes.size(); ++i) {
    if (!net_.nodes[i].fixed) snapshot_names_.push_back(net_.nodes[i].name + ".p_bar");
  }
  for (const Cylinder& c : net_.cylinders) {
    snapshot_names_.push_back(c.name + ".x_mm");
    snapshot_names_.push_back(c.name + ".v_mm_s");
  }
  for (const Spool& s : net_.spools) snapshot_names_.push_back(s.name + ".spool");
  snapshot_names_.push_back("pump.q_l_min");
  for (const Element& e : net_.elements) snapshot_names_.push_back(e.name + ".q_l_min");
  restart_balance();
  sample_switches(y_.data());
}

Plant::~Plant() = default;

void Plant::restart_integration() {
  integrator_->restart();
  window_->clear();
  window_periods_ = 1;
}

void Plant::restart_balance() {
  y_[layout_.pumped] = y_[layout_.returned] = y_[layout_.compressed] = 0.0;
  x_origin_m_.resize(net_.cylinders.size());
  for (std::size_t c = 0; c < net_.cylinders.size(); ++c) {
    x_origin_m_[c] = y_[layout_.first_cylinder + 2 * c] * kLengthScale;
  }
}

const SolverStats& Plant::solver_stats() const { return integrator_->stats(); }

void Plant::apply_outputs(const core::OutputImage& out) {
  Wiring& w = *wiring_;
  auto coil = [&](std::uint8_t i) {
    return i != core::kNoIndex8 && i < out.coils.size() && out.coils[i] && !w.coil_failed[i];
  };
  auto prop = [&](std::uint8_t i) -> double {
    if (i == core::kNoIndex8 || i >= out.prop.size() || w.prop_failed[i]) return 0.0;
    return static_cast<double>(out.prop[i].value);
  };
  for (Wiring::Valve& v : w.valves) {
    const core::FunctionConfig& f = v.config;
    const bool enabled = f.enable_coil == core::kNoIndex8 || coil(f.enable_coil);
    double target = 0.0;
    switch (f.valve) {
      case core::ValveKind::kSolenoid43SpringCentred: {
        const bool e = coil(f.coil_extend), r = coil(f.coil_retract);
        target = (e && !r) ? 1.0 : (r && !e) ? -1.0 : 0.0;
        break;
      }
      case core::ValveKind::kSolenoid42Detented: {
        const bool e = coil(f.coil_extend), r = coil(f.coil_retract);
        if (e && !r) v.held_target = 1.0;
        if (r && !e) v.held_target = -1.0;
        target = v.held_target;
        break;
      }
      case core::ValveKind::kSolenoid42SpringReturn:
        target = coil(f.coil_extend) ? 1.0 : -1.0;
        break;
      case core::ValveKind::kProportional43TwoSolenoid: {
        // Spool travel proportional to solenoid current (the force of a
        // proportional solenoid against its centring spring); the dither is
        // averaged out.
        const double ma_e = std::max(1e-9, static_cast<double>(f.current_extend.max_ma));
        const double ma_r = std::max(1e-9, static_cast<double>(f.current_retract.max_ma));
        target = std::clamp(prop(f.prop_extend) / ma_e, 0.0, 1.0) -
                 std::clamp(prop(f.prop_retract) / ma_r, 0.0, 1.0);
        if (!enabled) target = 0.0;
        break;
      }
      case core::ValveKind::kProportional43SignedCommand:
        target = enabled ? clamp_pm1(prop(f.prop_extend) / 100.0) : 0.0;
        break;
    }
    inputs_.spool_target[static_cast<std::size_t>(v.spool)] = target;
  }
  for (const Wiring::OnOff& o : w.on_off) {
    const bool energised = coil(o.coil);
    inputs_.spool_target[static_cast<std::size_t>(o.spool)] = (energised != o.normally_open) ? 1.0 : 0.0;
  }
  if (w.has_power_unit) {
    inputs_.pump_running = coil(w.motor_coil);
    if (w.dump_spool >= 0) {
      const bool energised = coil(w.dump_coil);
      inputs_.spool_target[static_cast<std::size_t>(w.dump_spool)] =
          (energised != w.dump_normally_open) ? 1.0 : 0.0;
    }
  }
}

bool Plant::set_spool_target(std::string_view function, double target) {
  for (const Wiring::Valve& v : wiring_->valves) {
    if (v.function == function) {
      inputs_.spool_target[static_cast<std::size_t>(v.spool)] = clamp_pm1(target);
      return true;
    }
  }
  return false;
}

void Plant::set_pump(bool running, bool loaded) {
  inputs_.pump_running = running;
  const Wiring& w = *wiring_;
  if (w.dump_spool >= 0) {
    // The dump spool's state 1 means open (dumping).
    inputs_.spool_target[static_cast<std::size_t>(w.dump_spool)] = loaded ? 0.0 : 1.0;
  }
}

bool Plant::set_cylinder_state(std::string_view cylinder, double x_m, double v_m_s) {
  const int c = cylinder_index(cylinder);
  if (c < 0) return false;
  const std::size_t k = layout_.first_cylinder + 2 * static_cast<std::size_t>(c);
  y_[k] = x_m / kLengthScale;
  y_[k + 1] = v_m_s / kLengthScale;
  restart_integration();
  restart_balance();
  sample_switches(y_.data());
  return true;
}

bool Plant::set_node_pressure(std::string_view node, double p_pa) {
  const int n = node_index(node);
  if (n < 0 || layout_.node_state[static_cast<std::size_t>(n)] < 0) return false;
  y_[static_cast<std::size_t>(layout_.node_state[static_cast<std::size_t>(n)])] = p_pa / kPressureScale;
  restart_integration();
  restart_balance();
  sample_switches(y_.data());
  return true;
}

bool Plant::advance(double dt_s) {
  if (!(dt_s > 0.0)) return dt_s == 0.0;  // no time: nothing to do; negative or NaN: refused
  const double t_end = time_s_ + dt_s;
  if (inputs_ != last_inputs_) {
    if (jacobian_changed(net_, last_inputs_, inputs_)) integrator_->inputs_changed();
    last_inputs_ = inputs_;  // same sizes: copies without allocating
    // The rest of the window was integrated under the old commands.
    if (!window_->empty() && window_->end_time() > time_s_) window_periods_ = 1;
    window_->clear();
  }
  // A window ending "at" t_end covers it despite the rounding of time sums.
  const double slack = 1e-9 * dt_s + 16.0 * std::numeric_limits<double>::epsilon() * std::fabs(t_end);
  if (window_->empty() || window_->end_time() < t_end - slack) {
    if (!open_window(t_end, dt_s)) return false;
  }
  // The switches see every step point up to t_end, then the state at t_end.
  const double t_read = std::min(t_end, window_->end_time());
  window_->read_up_to(t_read, [this](const double* y) { sample_switches(y); }, y_.data());
  sample_switches(y_.data());
  time_s_ = t_end;
  if (window_->end_time() <= t_end + slack) {
    // Used up to its end without a change of command: the next may reach further.
    window_periods_ = std::min(2 * window_periods_, max_window_periods());
  }
  return true;
}

int Plant::max_window_periods() const {
  // Reading a window by straight lines between step points is within the
  // tolerance for ROS2 (hostsim/src/step_window.hpp); Odeint's rosenbrock4
  // takes steps too long for that (order 4), so it integrates period by
  // period.
  return solver_.method == SolverMethod::kRos2 ? std::max(1, solver_.max_window_periods) : 1;
}

bool Plant::open_window(double t_end, double dt_s) {
  // As far as the error control would step anyway, in whole periods, and
  // never further than the stretch without a change of command so far
  // allows (window_periods_ doubles with every window used up), so that a
  // window is seldom thrown away.
  int periods = 1;
  const double hint = integrator_->step_hint();
  if (window_periods_ > 1 && hint > dt_s) {
    const double fit = std::floor(hint / dt_s * (1.0 + 1e-9));
    periods = static_cast<int>(std::clamp(fit, 1.0, static_cast<double>(window_periods_)));
  }
  for (;;) {
    const double t_stop = periods == 1 ? t_end : time_s_ + periods * dt_s;
    y_work_ = y_;
    window_->start(time_s_, y_.data());
    const bool ok = integrator_->advance(inputs_, y_work_, time_s_, t_stop,
                                         [this](double t, const std::vector<double>& y) { window_->add(t, y.data()); });
    if (ok) return true;
    integrator_->restart();
    window_->clear();
    window_periods_ = 1;
    if (periods == 1) return false;  // y_ and time_s_ stay as they were: the last good state
    periods = 1;  // once more, one period only
  }
}

void Plant::sample_switches(const double* y) {
  // Runs after every internal step: only the switched nodes' pressures.
  for (Wiring::Sensor& s : wiring_->sensors) {
    double value = 0.0;
    if (s.kind == SensorKind::kLimitSwitch) {
      value = y[layout_.first_cylinder + 2 * static_cast<std::size_t>(s.cylinder)] * kLengthScale;
    } else if (s.kind == SensorKind::kPressureSwitch) {
      value = node_pressure_of(net_, layout_, static_cast<std::size_t>(s.node), y);
    } else {
      continue;
    }
    // Switching point with hysteresis: on at the threshold, off once back
    // past threshold -/+ hysteresis.
    if (s.active_above) {
      if (value >= s.threshold_si) s.on = true;
      else if (value < s.threshold_si - s.hysteresis_si) s.on = false;
    } else {
      if (value <= s.threshold_si) s.on = true;
      else if (value > s.threshold_si + s.hysteresis_si) s.on = false;
    }
  }
}

void Plant::read_inputs(core::InputImage& in) const {
  node_pressures(net_, layout_, y_.data(), p_scratch_);
  for (const Wiring::Sensor& s : wiring_->sensors) {
    if (s.kind == SensorKind::kLimitSwitch || s.kind == SensorKind::kPressureSwitch) {
      bool v = s.on;
      if (s.fault == SensorFault::kWireBreak) v = false;
      if (s.fault == SensorFault::kStuck) v = s.stuck_value != 0.0;
      in.digital[s.input] = v;
      continue;
    }
    double eng = 0.0;
    if (s.kind == SensorKind::kPressure) {
      eng = p_scratch_[static_cast<std::size_t>(s.node)] / s.unit_si;
    } else {
      eng = y_[layout_.first_cylinder + 2 * static_cast<std::size_t>(s.cylinder)] * kLengthScale / s.unit_si;
    }
    if (s.fault == SensorFault::kStuck) eng = s.stuck_value;
    if (s.fault == SensorFault::kDrift) eng += s.drift_per_s * (time_s_ - s.fault_since_s);
    core::AnalogSample sample;
    sample.healthy = true;
    sample.age_us = 0;
    if (s.current_loop) {
      double ma = core::loop_from_engineering(eng, s.range_min, s.range_max);
      ma = std::clamp(ma, kNe43SaturationLowMa, kNe43SaturationHighMa);
      if (s.fault == SensorFault::kWireBreak) ma = kOpenLoopMa;
      if (s.fault == SensorFault::kFailLow) ma = kNe43FailLowMa;
      if (s.fault == SensorFault::kFailHigh) ma = kNe43FailHighMa;
      sample.value = static_cast<float>(ma);
    } else {
      sample.value = static_cast<float>(eng);
      // An engineering-unit input has no live zero: the I/O layer flags it.
      if (s.fault == SensorFault::kWireBreak || s.fault == SensorFault::kFailLow ||
          s.fault == SensorFault::kFailHigh) {
        sample.healthy = false;
      }
    }
    in.analog[s.input] = sample;
  }
}

bool Plant::drives_digital_input(std::size_t i) const {
  return std::any_of(wiring_->sensors.begin(), wiring_->sensors.end(), [i](const Wiring::Sensor& s) {
    return s.input == i && (s.kind == SensorKind::kLimitSwitch || s.kind == SensorKind::kPressureSwitch);
  });
}

bool Plant::drives_analog_input(std::size_t i) const {
  return std::any_of(wiring_->sensors.begin(), wiring_->sensors.end(), [i](const Wiring::Sensor& s) {
    return s.input == i && (s.kind == SensorKind::kPressure || s.kind == SensorKind::kPosition);
  });
}

bool Plant::inject(const PlantFault& fault) {
  Wiring& w = *wiring_;
  switch (fault.kind) {
    case FaultKind::kStuckSpool:
      for (const Wiring::Valve& v : w.valves) {
        if (v.function == fault.target) {
          inputs_.spool_stuck[static_cast<std::size_t>(v.spool)] = true;
          return true;
        }
      }
      return false;
    case FaultKind::kCoilOpen:
    case FaultKind::kCoilShort: {
      bool found = false;
      for (std::size_t i = 0; i < w.coil_names.size(); ++i) {
        if (w.coil_names[i] == fault.target) w.coil_failed[i] = found = true;
      }
      for (std::size_t i = 0; i < w.prop_names.size(); ++i) {
        if (w.prop_names[i] == fault.target) w.prop_failed[i] = found = true;
      }
      return found;
    }
    case FaultKind::kSensorWireBreak:
    case FaultKind::kSensorStuck:
    case FaultKind::kSensorDrift:
    case FaultKind::kSensorFailLow:
    case FaultKind::kSensorFailHigh: {
      core::InputImage now{};
      read_inputs(now);
      for (Wiring::Sensor& s : w.sensors) {
        if (s.input_name != fault.target) continue;
        s.fault_since_s = time_s_;
        switch (fault.kind) {
          case FaultKind::kSensorWireBreak: s.fault = SensorFault::kWireBreak; break;
          case FaultKind::kSensorFailLow: s.fault = SensorFault::kFailLow; break;
          case FaultKind::kSensorFailHigh: s.fault = SensorFault::kFailHigh; break;
          case FaultKind::kSensorDrift:
            s.fault = SensorFault::kDrift;
            s.drift_per_s = fault.value;
            break;
          default: {
            s.fault = SensorFault::kStuck;
            if (s.kind == SensorKind::kLimitSwitch || s.kind == SensorKind::kPressureSwitch) {
              s.stuck_value = now.digital[s.input] ? 1.0 : 0.0;
            } else if (s.kind == SensorKind::kPressure) {
              s.stuck_value = p_scratch_[static_cast<std::size_t>(s.node)] / s.unit_si;
            } else {
              s.stuck_value = y_[layout_.first_cylinder + 2 * static_cast<std::size_t>(s.cylinder)] *
                              kLengthScale / s.unit_si;
            }
            break;
          }
        }
        return true;
      }
      return false;
    }
    case FaultKind::kSealLeak: {
      const int c = cylinder_index(fault.target);
      if (c < 0) return false;
      // mm^3/s per bar -> m^3/s per Pa
      inputs_.extra_leak_m3_s_pa[static_cast<std::size_t>(c)] = fault.value * 1e-9 / 1e5;
      restart_integration();
      return true;
    }
    case FaultKind::kPumpFailure:
      inputs_.pump_flow_factor = std::clamp(fault.value, 0.0, 1.0);
      restart_integration();
      return true;
    case FaultKind::kLoadChange: {
      const int c = cylinder_index(fault.target);
      if (c < 0) return false;
      inputs_.extra_force_n[static_cast<std::size_t>(c)] = fault.value;
      restart_integration();
      return true;
    }
  }
  return false;
}

void Plant::clear_faults() {
  Wiring& w = *wiring_;
  std::fill(inputs_.spool_stuck.begin(), inputs_.spool_stuck.end(), false);
  std::fill(w.coil_failed.begin(), w.coil_failed.end(), false);
  std::fill(w.prop_failed.begin(), w.prop_failed.end(), false);
  for (Wiring::Sensor& s : w.sensors) s.fault = SensorFault::kNone;
  std::fill(inputs_.extra_leak_m3_s_pa.begin(), inputs_.extra_leak_m3_s_pa.end(), 0.0);
  std::fill(inputs_.extra_force_n.begin(), inputs_.extra_force_n.end(), 0.0);
  inputs_.pump_flow_factor = 1.0;
  restart_integration();
}

int Plant::node_index(std::string_view name) const {
  for (std::size_t i = 0; i < net_.nodes.size(); ++i) {
    if (net_.nodes[i].name == name) return static_cast<int>(i);
  }
  return -1;
}

int Plant::cylinder_index(std::string_view name) const {
  for (std::size_t i = 0; i < net_.cylinders.size(); ++i) {
    if (net_.cylinders[i].name == name) return static_cast<int>(i);
  }
  return -1;
}

double Plant::node_pressure(std::string_view node) const {
  const int n = node_index(node);
  if (n < 0) return kNaN;
  node_pressures(net_, layout_, y_.data(), p_scratch_);
  return p_scratch_[static_cast<std::size_t>(n)];
}

double Plant::cylinder_position(std::string_view cylinder) const {
  const int c = cylinder_index(cylinder);
  return c < 0 ? kNaN : y_[layout_.first_cylinder + 2 * static_cast<std::size_t>(c)] * kLengthScale;
}

double Plant::cylinder_velocity(std::string_view cylinder) const {
  const int c = cylinder_index(cylinder);
  return c < 0 ? kNaN : y_[layout_.first_cylinder + 2 * static_cast<std::size_t>(c) + 1] * kLengthScale;
}

double Plant::spool_position(std::string_view function) const {
  for (const Wiring::Valve& v : wiring_->valves) {
    if (v.function == function) return y_[layout_.spool_state[static_cast<std::size_t>(v.spool)]];
  }
  return kNaN;
}

PlantSnapshot Plant::snapshot() const {
  PlantSnapshot s;
  s.time_s = time_s_;
  s.names = &snapshot_names_;
  // Taken every period by the closed loop: one allocation, no growth.
  s.values.resize(snapshot_names_.size());
  double* v = s.values.data();
  node_pressures(net_, layout_, y_.data(), p_scratch_);
  for (std::size_t i = 0; i < net_.nodes.size(); ++i) {
    if (!net_.nodes[i].fixed) *v++ = p_scratch_[i] / 1e5;
  }
  for (std::size_t c = 0; c < net_.cylinders.size(); ++c) {
    *v++ = y_[layout_.first_cylinder + 2 * c];
    *v++ = y_[layout_.first_cylinder + 2 * c + 1];
  }
  for (std::size_t k = 0; k < net_.spools.size(); ++k) *v++ = y_[layout_.spool_state[k]];
  const double to_l_min = 60000.0;
  *v++ = net_.pump.node >= 0
             ? pump_flow(net_.pump, inputs_, p_scratch_[static_cast<std::size_t>(net_.pump.node)]) * to_l_min
             : 0.0;
  element_flows(net_, layout_, element_constants_, p_scratch_, y_.data(), v);
  for (std::size_t j = 0; j < net_.elements.size(); ++j) v[j] *= to_l_min;
  return s;
}

OilBalance Plant::oil_balance() const {
  OilBalance b;
  b.pumped_m3 = y_[layout_.pumped] * kVolumeScale;
  b.returned_m3 = y_[layout_.returned] * kVolumeScale;
  b.compressed_m3 = y_[layout_.compressed] * kVolumeScale;
  for (std::size_t c = 0; c < net_.cylinders.size(); ++c) {
    const Cylinder& cyl = net_.cylinders[c];
    const double dx = y_[layout_.first_cylinder + 2 * c] * kLengthScale - x_origin_m_[c];
    b.displaced_m3 += (cyl.area_a_m2 - cyl.area_b_m2) * dx;
  }
  return b;
}

}  // namespace spoolstep::hostsim
