#include "spoolstep/benchrun/plant_adapter.hpp"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <cstring>

#include <fmt/format.h>

#include "spoolstep/machine_file/machine_file.hpp"

namespace spoolstep::benchrun {
namespace {

using hostsim::FaultKind;

struct FaultName {
  const char* name;
  FaultKind kind;
  const char* target_kind;  // what the target names: function, output, input, analog input, cylinder, none
  const char* value;        // what "value" means, or nullptr if the kind takes none
};

const FaultName kFaultNames[] = {
    {"stuck_spool", FaultKind::kStuckSpool, "function", nullptr},
    {"coil_open", FaultKind::kCoilOpen, "output", nullptr},
    {"coil_short", FaultKind::kCoilShort, "output", nullptr},
    {"sensor_wire_break", FaultKind::kSensorWireBreak, "input", nullptr},
    {"sensor_stuck", FaultKind::kSensorStuck, "input", nullptr},
    {"sensor_drift", FaultKind::kSensorDrift, "analog input", "the drift in the input's unit per second"},
    {"sensor_fail_low", FaultKind::kSensorFailLow, "analog input", nullptr},
    {"sensor_fail_high", FaultKind::kSensorFailHigh, "analog input", nullptr},
    {"seal_leak", FaultKind::kSealLeak, "cylinder", "the added leak coefficient in mm^3/s per bar"},
    {"pump_failure", FaultKind::kPumpFailure, "none", "the remaining fraction of the pump flow, 0 to 1"},
    {"load_change", FaultKind::kLoadChange, "cylinder", "the added resisting force in N"},
};

bool ends_with(const std::string& name, const char* suffix) {
  const std::string s(suffix);
  return name.size() >= s.size() && name.compare(name.size() - s.size(), s.size(), s) == 0;
}

SignalGroup group_of(const std::string& name) {
  if (ends_with(name, ".p_bar")) return SignalGroup::kPressure;
  if (ends_with(name, ".x_mm")) return SignalGroup::kPosition;
  if (ends_with(name, ".v_mm_s")) return SignalGroup::kVelocity;
  if (ends_with(name, ".spool")) return SignalGroup::kSpool;
  return SignalGroup::kOther;
}

std::string unit_of(const std::string& name) {
  if (ends_with(name, ".p_bar")) return "bar";
  if (ends_with(name, ".x_mm")) return "mm";
  if (ends_with(name, ".v_mm_s")) return "mm/s";
  if (ends_with(name, ".q_l_min")) return "L/min";
  return "";
}

// A double is NaN or infinite exactly when its exponent bits are all ones;
// adding one to the exponent field then carries into the sign bit. Integer
// adds and ORs without a branch vectorise (this runs on every scan).
bool all_finite(const std::vector<double>& values) {
  constexpr std::uint64_t kExponent = 0x7FF0000000000000u;
  constexpr std::uint64_t kExponentOne = 0x0010000000000000u;
  std::uint64_t carry = 0;
  for (const double y : values) {
    std::uint64_t bits = 0;
    std::memcpy(&bits, &y, sizeof bits);
    carry |= (bits & kExponent) + kExponentOne;
  }
  return (carry >> 63) == 0;
}

}  // namespace

PlantAdapter::PlantAdapter(hostsim::Plant& plant) : plant_(plant) {
  const hostsim::PlantSnapshot snap = plant_.snapshot();
  for (const std::string& n : *snap.names) {
    signals_.push_back(Signal{"plant." + n, unit_of(n), SignalKind::kAnalog, group_of(n)});
  }
}

void PlantAdapter::do_sample(std::vector<double>& values) const {
  const hostsim::PlantSnapshot snap = plant_.snapshot();
  values.insert(values.end(), snap.values.begin(), snap.values.end());
}

io::PortStatus PlantAdapter::do_advance(std::uint64_t dt_us) {
  const double t_s = plant_.time_s();
  if (!plant_.advance(static_cast<double>(dt_us) * 1e-6)) {
    return io::PortStatus::failed(io::PortError::kModelFailed,
                                  fmt::format("at {:.6f} s: the plant integrator's step size collapsed", t_s));
  }
  if (!all_finite(plant_.state())) {
    // Name the first signal that went bad, so the user can find the cause
    // (a load of 1e308 N, a leak that empties a chamber in one step, ...).
    const hostsim::PlantSnapshot snap = plant_.snapshot();
    std::string which = "a state variable";
    for (std::size_t i = 0; i < snap.values.size(); ++i) {
      if (!std::isfinite(snap.values[i])) {
        which = "plant." + (*snap.names)[i];
        break;
      }
    }
    return io::PortStatus::failed(
        io::PortError::kModelFailed,
        fmt::format("at {:.6f} s: the plant state is not finite ({} reads NaN or infinity); the model cannot go on",
                    t_s, which));
  }
  return io::PortStatus::ok();
}

std::optional<std::string> PlantAdapter::do_inject(const nlohmann::json& fault) {
  const std::string kind = fault.value("kind", "");
  for (const FaultName& f : kFaultNames) {
    if (kind != f.name) continue;
    const hostsim::PlantFault pf{f.kind, fault.value("target", ""), fault.value("value", 0.0)};
    if (!plant_.inject(pf)) return fmt::format("the plant has no {} named '{}'", f.target_kind, pf.target);
    return std::nullopt;
  }
  return fmt::format("unknown plant fault kind '{}'", kind);
}

PlantFacts plant_facts(const hostsim::Plant& plant, const core::MachineConfig& machine,
                       const std::vector<Signal>& signals) {
  PlantFacts facts;
  facts.plant_digital.resize(machine.digital_input_count);
  facts.plant_analog.resize(machine.analog_input_count);
  for (std::size_t i = 0; i < facts.plant_digital.size(); ++i) facts.plant_digital[i] = plant.drives_digital_input(i);
  for (std::size_t i = 0; i < facts.plant_analog.size(); ++i) facts.plant_analog[i] = plant.drives_analog_input(i);
  for (const auto& s : signals) facts.signal_names.push_back(s.name);
  // Valid targets by kind, so a misspelt target is bad input at load time.
  // Sensor faults act on the plant's sensors: only inputs a plant sensor
  // drives can take one, and drift or a transmitter failure only analog ones.
  std::vector<std::string> functions, inputs, analog_inputs, outputs, cylinders;
  for (std::uint8_t i = 0; i < machine.function_count; ++i) functions.emplace_back(machine_file::name_view(machine.functions[i].name));
  for (std::uint8_t i = 0; i < machine.digital_input_count; ++i) {
    if (facts.plant_digital[i]) inputs.emplace_back(machine_file::name_view(machine.digital_inputs[i]));
  }
  for (std::uint8_t i = 0; i < machine.analog_input_count; ++i) {
    if (!facts.plant_analog[i]) continue;
    inputs.emplace_back(machine_file::name_view(machine.analog_inputs[i].name));
    analog_inputs.emplace_back(machine_file::name_view(machine.analog_inputs[i].name));
  }
  for (std::uint8_t i = 0; i < machine.coil_count; ++i) outputs.emplace_back(machine_file::name_view(machine.coils[i]));
  for (std::uint8_t i = 0; i < machine.prop_output_count; ++i) outputs.emplace_back(machine_file::name_view(machine.prop_outputs[i].name));
  for (const auto& s : signals) {
    if (ends_with(s.name, ".x_mm")) cylinders.push_back(s.name.substr(6, s.name.size() - 6 - 5));  // "plant." ... ".x_mm"
  }
  using Problem = PlantFacts::FaultProblem;
  facts.check_fault = [functions, inputs, analog_inputs, outputs, cylinders](const nlohmann::json& f) -> std::optional<Problem> {
    if (!f.is_object()) return Problem{"", "a plant fault is an object: {\"kind\": ..., \"target\": ..., \"value\": ...}"};
    for (const auto& [key, value] : f.items()) {
      if (key != "kind" && key != "target" && key != "value")
        return Problem{key, fmt::format("unknown field '{}' in a plant fault (fields: kind, target, value)", key)};
    }
    if (!f.contains("kind") || !f["kind"].is_string()) return Problem{"kind", "a plant fault needs \"kind\" (a string)"};
    const std::string kind = f["kind"].get<std::string>();
    const FaultName* found = nullptr;
    for (const FaultName& n : kFaultNames) found = kind == n.name ? &n : found;
    if (found == nullptr) {
      std::string all;
      for (const FaultName& n : kFaultNames) all += (all.empty() ? "" : ", ") + std::string(n.name);
      return Problem{"kind", fmt::format("unknown plant fault kind '{}' (kinds: {})", kind, all)};
    }
    const std::string target_kind = found->target_kind;
    if (target_kind == "none") {
      if (f.contains("target")) return Problem{"target", fmt::format("a {} fault takes no \"target\"", kind)};
    } else {
      if (!f.contains("target") || !f["target"].is_string())
        return Problem{"target", fmt::format("a {} fault needs \"target\": the {} name", kind, target_kind)};
      const std::string target = f["target"].get<std::string>();
      const bool sensor = target_kind == "input" || target_kind == "analog input";
      const std::vector<std::string>& names = target_kind == "function"       ? functions
                                              : target_kind == "input"        ? inputs
                                              : target_kind == "analog input" ? analog_inputs
                                              : target_kind == "output"       ? outputs
                                                                              : cylinders;
      if (std::find(names.begin(), names.end(), target) == names.end()) {
        std::string list;
        for (const auto& n : names) list += (list.empty() ? "" : ", ") + n;
        return Problem{"target", fmt::format("no {} named '{}'{} (the {}s{}: {})", target_kind, target,
                                             sensor ? " that a plant sensor drives" : "", target_kind,
                                             sensor ? " with a sensor" : "", list.empty() ? "none" : list)};
      }
    }
    if (found->value == nullptr) {
      if (f.contains("value")) return Problem{"value", fmt::format("a {} fault takes no \"value\"", kind)};
    } else if (!f.contains("value")) {
      return Problem{"value", fmt::format("a {} fault needs \"value\": {}", kind, found->value)};
    }
    if (f.contains("value") && !f["value"].is_number()) return Problem{"value", "\"value\" must be a number"};
    const double value = f.value("value", 0.0);
    if (found->kind == FaultKind::kPumpFailure && !(value >= 0.0 && value <= 1.0))
      return Problem{"value", "a pump failure's value is the remaining fraction of the flow, 0 to 1"};
    if (found->kind == FaultKind::kSealLeak && !(value >= 0.0))
      return Problem{"value", "a seal leak's value is a leak coefficient in mm^3/s per bar, 0 or more"};
    if (!std::isfinite(value)) return Problem{"value", "\"value\" must be finite"};
    return std::nullopt;
  };
  return facts;
}

}  // namespace spoolstep::benchrun
