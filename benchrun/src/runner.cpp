#include "spoolstep/benchrun/runner.hpp"

#include <cmath>

#include "spoolstep/core/soft_command.hpp"
#include "spoolstep/machine_file/machine_file.hpp"

namespace spoolstep::benchrun {
namespace {

using machine_file::name_view;

std::string str(const core::Name& n) { return std::string(name_view(n)); }

// The loop's view of the machine's analog scaling: engineering value -> mA.
float to_milliamp(const core::AnalogInputConfig& a, double value) {
  const double span = static_cast<double>(a.range_max) - static_cast<double>(a.range_min);
  return static_cast<float>(4.0 + 16.0 * (value - static_cast<double>(a.range_min)) / span);
}

void set_command(core::OperatorCommands& c, core::SoftCommand command, bool on) {
  if (bool* flag = core::soft_command_flag(c, command)) *flag = on;
}

}  // namespace

int find_signal(const std::vector<Signal>& signals, const std::string& name) {
  for (std::size_t i = 0; i < signals.size(); ++i) {
    if (signals[i].name == name) return static_cast<int>(i);
  }
  return -1;
}

std::vector<Signal> core_signals(const core::MachineConfig& m) {
  std::vector<Signal> s;
  s.push_back({"state", "", SignalKind::kInteger, SignalGroup::kState});
  s.push_back({"step", "", SignalKind::kInteger, SignalGroup::kState});
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

RunOutcome run_scenario(const core::MachineConfig& machine, const Scenario& scenario, PlantPort* plant,
                        const std::vector<TraceSink*>& sinks, const RunOptions& options) {
  RunOutcome outcome;
  std::vector<Signal> signals = core_signals(machine);
  if (plant != nullptr) {
    const std::vector<Signal> extra = plant->signals();
    signals.insert(signals.end(), extra.begin(), extra.end());
  }
  for (TraceSink* sink : sinks) sink->begin(signals);

  core::Controller controller;
  const core::Status status = controller.init(machine);
  if (!status.is_ok()) {
    outcome.error = std::string("the control core rejects the configuration (") + core::to_string(status.code()) +
                    " in " + status.where() + " row " + std::to_string(status.index()) + ")";
    for (TraceSink* sink : sinks) sink->end(0.0);
    return outcome;
  }
  core::InputImage inputs{};
  core::OutputImage outputs{};
  for (std::uint8_t i = 0; i < machine.analog_input_count; ++i) {
    inputs.analog[i].healthy = true;
    const auto& a = machine.analog_inputs[i];
    inputs.analog[i].value = a.signal == core::AnalogSignal::kCurrent4To20 ? to_milliamp(a, a.range_min) : a.range_min;
  }

  const std::uint64_t period_us = machine.safety.scan_period_us == 0 ? 1000 : machine.safety.scan_period_us;
  const double period_s = static_cast<double>(period_us) * 1e-6;
  const auto end_us = static_cast<std::uint64_t>(std::llround(scenario.duration_s * 1e6));
  const std::uint64_t progress_step = end_us / 10 == 0 ? end_us + 1 : end_us / 10;
  std::uint64_t next_progress = progress_step;
  std::size_t next_event = 0;
  std::uint64_t clock_offset_us = 0;  // delay_scan events push every later time stamp back
  std::uint64_t t_us = 0;
  std::vector<double> row;
  row.reserve(signals.size());

  for (; t_us <= end_us; t_us += period_us) {
    // Scenario events first (a plant fault acts on this scan's sensors), then
    // the plant's sensors, which the scenario may not script.
    while (next_event < scenario.events.size() && scenario.events[next_event].at_us <= t_us) {
      const TimelineEvent& ev = scenario.events[next_event++];
      switch (ev.kind) {
        case TimelineEvent::Kind::kSetDigital:
          inputs.digital[ev.index] = ev.value != 0.0;
          break;
        case TimelineEvent::Kind::kSetAnalog: {
          const auto& a = machine.analog_inputs[ev.index];
          inputs.analog[ev.index].value = a.signal == core::AnalogSignal::kCurrent4To20
                                              ? to_milliamp(a, ev.value)
                                              : static_cast<float>(ev.value);
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
          if (plant != nullptr) {
            if (const auto problem = plant->inject(ev.plant_fault)) {
              outcome.error = ev.json_path + ": " + *problem;
              for (TraceSink* sink : sinks) sink->end(static_cast<double>(t_us) * 1e-6);
              return outcome;
            }
          }
          break;
        case TimelineEvent::Kind::kDelayScan:
          clock_offset_us += static_cast<std::uint64_t>(ev.value);
          break;
      }
    }
    if (plant != nullptr) plant->read_inputs(inputs);
    // A delayed scan: this one comes late by the delay, and every later one
    // keeps the same period after it. The plant runs on in machine time.
    const auto now_us = static_cast<std::uint32_t>((t_us + clock_offset_us) & 0xFFFFFFFFu);
    if (options.before_scan) options.before_scan(inputs, now_us);
    controller.scan(inputs, now_us, outputs);
    if (options.after_scan) options.after_scan(outputs, controller.diagnostics());
    ++outcome.scans;

    const double t_s = static_cast<double>(t_us) / 1e6;  // the nearest double to the time, so figures print as written
    if (!sinks.empty()) {  // a row costs a plant snapshot: only when someone reads it
      const core::Diagnostics& d = controller.diagnostics();
      row.clear();
      row.push_back(static_cast<double>(d.state));
      row.push_back(static_cast<double>(d.active_step));
      row.push_back(static_cast<double>(d.fault_count));
      row.push_back(static_cast<double>(d.power_unit));
      row.push_back(static_cast<double>(d.completed_cycles));
      for (std::uint8_t i = 0; i < machine.digital_input_count; ++i) row.push_back(inputs.digital[i] ? 1.0 : 0.0);
      for (std::uint8_t i = 0; i < machine.analog_input_count; ++i) row.push_back(static_cast<double>(d.analog_value[i]));
      for (std::uint8_t i = 0; i < machine.coil_count; ++i) row.push_back(outputs.coils[i] ? 1.0 : 0.0);
      for (std::uint8_t i = 0; i < machine.prop_output_count; ++i) row.push_back(static_cast<double>(outputs.prop[i].value));
      for (std::uint8_t i = 0; i < machine.function_count; ++i) row.push_back(static_cast<double>(d.functions[i].command));
      if (plant != nullptr) plant->sample(row);
      for (TraceSink* sink : sinks) sink->row(t_s, row);
    }

    if (plant != nullptr) {
      plant->apply_outputs(outputs);
      plant->advance(period_s);
    }
    if (options.progress && t_us >= next_progress) {
      options.progress(t_s, scenario.duration_s);
      next_progress += progress_step;
    }
  }
  for (TraceSink* sink : sinks) sink->end(scenario.duration_s);
  outcome.completed = true;
  return outcome;
}

}  // namespace spoolstep::benchrun
