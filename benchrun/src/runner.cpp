#include "spoolstep/benchrun/runner.hpp"
#include "spoolstep/benchrun/sinks.hpp"

#include <cmath>

#include <fmt/format.h>

#include "spoolstep/core/analog.hpp"
#include "spoolstep/core/soft_command.hpp"
#include "spoolstep/io/clock.hpp"
#include "spoolstep/machine_file/machine_file.hpp"

namespace spoolstep::benchrun {
namespace {

using machine_file::name_view;

std::string str(const core::Name& n) { return std::string(name_view(n)); }

// A scenario writes engineering values; a 4-20 mA input gets the loop current.
float to_milliamp(const core::AnalogInputConfig& a, double value) {
  return static_cast<float>(
      core::loop_from_engineering(value, static_cast<double>(a.range_min), static_cast<double>(a.range_max)));
}

void set_command(core::OperatorCommands& c, core::SoftCommand command, bool on) {
  if (bool* flag = core::soft_command_flag(c, command)) *flag = on;
}

/// The scenario's timeline over the backend's sensors: at each scan it
/// applies the events due (inputs the scenario sets, plant faults, late
/// scans), then lets the sensors write the inputs they drive. The loader
/// refuses events on inputs a plant sensor drives, so neither overwrites
/// the other's inputs.
class TimelineInput final : public io::InputPort {
 public:
  TimelineInput(const core::MachineConfig& machine, const Scenario& scenario, const BenchBackend& backend,
                io::SimulatedClock& clock)
      : machine_(machine), scenario_(scenario), backend_(backend), clock_(clock) {}

 private:
  io::PortStatus do_read(core::InputImage& inputs, std::uint64_t scan_time_us) override {
    if (first_) {
      first_ = false;
      // Analog inputs start healthy at the bottom of their range.
      for (std::uint8_t i = 0; i < machine_.analog_input_count; ++i) {
        inputs.analog[i].healthy = true;
        const auto& a = machine_.analog_inputs[i];
        inputs.analog[i].value = a.signal == core::AnalogSignal::kCurrent4To20 ? to_milliamp(a, a.range_min) : a.range_min;
      }
    }
    while (next_event_ < scenario_.events.size() && scenario_.events[next_event_].at_us <= scan_time_us) {
      const TimelineEvent& ev = scenario_.events[next_event_++];
      if (io::PortStatus s = apply(ev, inputs); !s.is_ok()) return s;
    }
    if (backend_.sensors != nullptr) return backend_.sensors->read(inputs, scan_time_us);
    return io::PortStatus::ok();
  }

  io::PortStatus apply(const TimelineEvent& ev, core::InputImage& inputs) {
    switch (ev.kind) {
      case TimelineEvent::Kind::kSetDigital:
        inputs.digital[ev.index] = ev.value != 0.0;
        break;
      case TimelineEvent::Kind::kSetAnalog: {
        const auto& a = machine_.analog_inputs[ev.index];
        inputs.analog[ev.index].value =
            a.signal == core::AnalogSignal::kCurrent4To20 ? to_milliamp(a, ev.value) : static_cast<float>(ev.value);
        break;
      }
      case TimelineEvent::Kind::kSetAnalogMa:
        inputs.analog[ev.index].value = static_cast<float>(ev.value);
        break;
      case TimelineEvent::Kind::kAnalogHealth:
        inputs.analog[ev.index].healthy = ev.value != 0.0;
        break;
      case TimelineEvent::Kind::kCommand:
        set_command(inputs.commands, ev.command, ev.value != 0.0);
        break;
      case TimelineEvent::Kind::kJog:
        inputs.commands.jog[ev.index] = ev.direction;
        break;
      case TimelineEvent::Kind::kPlantFault:
        if (backend_.faults != nullptr) {
          if (const auto problem = backend_.faults->inject(ev.plant_fault)) {
            return io::PortStatus::failed(io::PortError::kScript, ev.json_path + ": " + *problem);
          }
        }
        break;
      case TimelineEvent::Kind::kDelayScan:
        // This scan comes late by the delay, and every later one keeps the
        // same period after it. The plant runs on in machine time.
        clock_.add_skew(static_cast<std::uint64_t>(ev.value));
        break;
    }
    return io::PortStatus::ok();
  }

  const core::MachineConfig& machine_;
  const Scenario& scenario_;
  const BenchBackend& backend_;
  io::SimulatedClock& clock_;
  std::size_t next_event_ = 0;
  bool first_ = true;
};

/// Builds one trace row per scan (core signals, then the backend's) and
/// hands it to every sink.
class RowRecorder final : public runtime::ScanObserver {
 public:
  RowRecorder(const core::MachineConfig& machine, const TraceSource* source, const std::vector<TraceSink*>& sinks,
              std::size_t width)
      : machine_(machine), source_(source), sinks_(sinks) {
    row_.reserve(width);
  }

 private:
  void after_scan(const runtime::ScanView& scan) override {
    if (sinks_.empty()) return;  // a row costs a plant snapshot: only when someone reads it
    const core::Diagnostics& d = scan.diagnostics;
    row_.clear();
    row_.push_back(static_cast<double>(d.state));
    row_.push_back(static_cast<double>(d.active_step));
    row_.push_back(static_cast<double>(d.fault_count));
    row_.push_back(static_cast<double>(d.power_unit));
    row_.push_back(static_cast<double>(d.completed_cycles));
    for (std::uint8_t i = 0; i < machine_.digital_input_count; ++i) row_.push_back(scan.inputs.digital[i] ? 1.0 : 0.0);
    for (std::uint8_t i = 0; i < machine_.analog_input_count; ++i) row_.push_back(static_cast<double>(d.analog_value[i]));
    for (std::uint8_t i = 0; i < machine_.coil_count; ++i) row_.push_back(scan.outputs.coils[i] ? 1.0 : 0.0);
    for (std::uint8_t i = 0; i < machine_.prop_output_count; ++i) row_.push_back(static_cast<double>(scan.outputs.prop[i].value));
    for (std::uint8_t i = 0; i < machine_.function_count; ++i) row_.push_back(static_cast<double>(d.functions[i].command));
    if (source_ != nullptr) source_->sample(row_);
    const double t_s = static_cast<double>(scan.scan_time_us) / 1e6;  // the nearest double to the time, so figures print as written
    for (TraceSink* sink : sinks_) sink->row(t_s, row_);
  }

  const core::MachineConfig& machine_;
  const TraceSource* source_;
  const std::vector<TraceSink*>& sinks_;
  std::vector<double> row_;
};

/// Calls the progress callback about every tenth of the run.
class ProgressReporter final : public runtime::ScanObserver {
 public:
  ProgressReporter(std::function<void(double, double)> progress, std::uint64_t end_us, double duration_s)
      : progress_(std::move(progress)), step_us_(end_us / 10 == 0 ? end_us + 1 : end_us / 10), next_us_(step_us_),
        duration_s_(duration_s) {}

 private:
  void after_scan(const runtime::ScanView& scan) override {
    if (!progress_ || scan.scan_time_us < next_us_) return;
    progress_(static_cast<double>(scan.scan_time_us) / 1e6, duration_s_);
    next_us_ += step_us_;
  }
  std::function<void(double, double)> progress_;
  std::uint64_t step_us_;
  std::uint64_t next_us_;
  double duration_s_;
};

}  // namespace

int find_signal(const std::vector<Signal>& signals, const std::string& name) {
  for (std::size_t i = 0; i < signals.size(); ++i) {
    if (signals[i].name == name) return static_cast<int>(i);
  }
  return -1;
}

std::vector<Signal> core_signals(const core::MachineConfig& m) {
  std::vector<Signal> s;
  std::vector<std::string> states;
  for (std::uint8_t k = 0; k < core::kMachineStateCount; ++k) states.emplace_back(state_name(k));
  std::vector<std::string> steps;
  for (std::uint8_t k = 0; k < m.step_count; ++k) steps.push_back(str(m.steps[k].name));
  s.push_back({"state", "", SignalKind::kInteger, SignalGroup::kState, std::move(states)});
  s.push_back({"step", "", SignalKind::kInteger, SignalGroup::kState, std::move(steps)});
  s.push_back({"faults", "", SignalKind::kInteger, SignalGroup::kState});
  s.push_back({"pump", "", SignalKind::kInteger, SignalGroup::kState});
  s.push_back({"cycles", "", SignalKind::kInteger, SignalGroup::kState});
  for (std::uint8_t i = 0; i < m.digital_input_count; ++i)
    s.push_back({"di." + str(m.digital_inputs[i]), "", SignalKind::kDigital, SignalGroup::kInput});
  for (std::uint8_t i = 0; i < m.analog_input_count; ++i)
    s.push_back({"ai." + str(m.analog_inputs[i].name), str(m.analog_inputs[i].unit), SignalKind::kAnalog, SignalGroup::kInput});
  for (std::uint8_t i = 0; i < m.coil_count; ++i)
    s.push_back({"coil." + str(m.coils[i]), "", SignalKind::kDigital, SignalGroup::kOutput});
  for (std::uint8_t i = 0; i < m.prop_output_count; ++i)
    s.push_back({"out." + str(m.prop_outputs[i].name),
                 m.prop_outputs[i].unit == core::PropUnit::kMilliamp ? "mA" : "%", SignalKind::kAnalog,
                 SignalGroup::kOutput});
  for (std::uint8_t i = 0; i < m.function_count; ++i)
    s.push_back({"cmd." + str(m.functions[i].name), "", SignalKind::kAnalog, SignalGroup::kCommand});
  return s;
}

RunOutcome run_scenario(const core::MachineConfig& machine, const Scenario& scenario, const BenchBackend& backend,
                        const std::vector<TraceSink*>& sinks, const RunOptions& options) {
  std::vector<Signal> signals = core_signals(machine);
  if (backend.trace != nullptr) {
    const std::vector<Signal> extra = backend.trace->signals();
    signals.insert(signals.end(), extra.begin(), extra.end());
  }
  for (TraceSink* sink : sinks) sink->begin(signals);

  io::SimulatedClock clock;
  TimelineInput timeline(machine, scenario, backend, clock);
  io::DiscardingOutputPort nowhere;
  runtime::ScanLoop loop(timeline, backend.actuators != nullptr ? *backend.actuators : nowhere, clock, backend.model);
  for (runtime::ScanObserver* o : options.observers) loop.add_observer(*o);
  RowRecorder rows(machine, backend.trace, sinks, signals.size());
  loop.add_observer(rows);
  const auto end_us = static_cast<std::uint64_t>(std::llround(scenario.duration_s * 1e6));
  ProgressReporter progress(options.progress, end_us, scenario.duration_s);
  loop.add_observer(progress);

  const runtime::LoopResult result = loop.run(machine, runtime::LoopSchedule{runtime::scan_period_us(machine), end_us});
  RunOutcome outcome;
  outcome.outcome = result.outcome;
  outcome.error = result.error;
  outcome.scans = result.scans;
  const double end_s = result.completed() ? scenario.duration_s : static_cast<double>(result.ended_at_us) * 1e-6;
  for (TraceSink* sink : sinks) sink->end(end_s);
  return outcome;
}

}  // namespace spoolstep::benchrun
