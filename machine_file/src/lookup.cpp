// Name lookups over a loaded configuration, for the plant model and tools.
#include <cstring>

#include "spoolstep/machine_file/machine_file.hpp"

namespace spoolstep::machine_file {
namespace {

template <typename Table, typename NameOf>
std::optional<std::uint8_t> find_in(const Table& table, std::size_t count, std::string_view name, NameOf name_of) {
  for (std::size_t i = 0; i < count && i < table.size(); ++i) {
    if (name_view(name_of(table[i])) == name) return static_cast<std::uint8_t>(i);
  }
  return std::nullopt;
}

const core::Name& self(const core::Name& n) { return n; }

}  // namespace

std::string_view name_view(const core::Name& name) {
  return std::string_view(name.text.data(), strnlen(name.text.data(), name.text.size()));
}

std::optional<std::uint8_t> find_digital_input(const core::MachineConfig& c, std::string_view name) {
  return find_in(c.digital_inputs, c.digital_input_count, name, self);
}
std::optional<std::uint8_t> find_analog_input(const core::MachineConfig& c, std::string_view name) {
  return find_in(c.analog_inputs, c.analog_input_count, name, [](const auto& a) -> const core::Name& { return a.name; });
}
std::optional<std::uint8_t> find_coil(const core::MachineConfig& c, std::string_view name) {
  return find_in(c.coils, c.coil_count, name, self);
}
std::optional<std::uint8_t> find_prop_output(const core::MachineConfig& c, std::string_view name) {
  return find_in(c.prop_outputs, c.prop_output_count, name, [](const auto& p) -> const core::Name& { return p.name; });
}
std::optional<std::uint8_t> find_function(const core::MachineConfig& c, std::string_view name) {
  return find_in(c.functions, c.function_count, name, [](const auto& f) -> const core::Name& { return f.name; });
}
std::optional<std::uint8_t> find_step(const core::MachineConfig& c, std::string_view name) {
  return find_in(c.steps, c.step_count, name, [](const auto& s) -> const core::Name& { return s.name; });
}
std::optional<std::uint8_t> find_interlock(const core::MachineConfig& c, std::string_view name) {
  return find_in(c.interlocks, c.interlock_count, name, [](const auto& i) -> const core::Name& { return i.name; });
}
std::optional<std::uint8_t> find_two_hand(const core::MachineConfig& c, std::string_view name) {
  return find_in(c.two_hand, c.two_hand_count, name, [](const auto& t) -> const core::Name& { return t.name; });
}
std::optional<std::uint8_t> find_ramp(const core::MachineConfig& c, std::uint8_t function, std::string_view name) {
  if (function >= c.function_count) return std::nullopt;
  const auto& f = c.functions[function];
  return find_in(f.ramps, f.ramp_count, name, [](const auto& r) -> const core::Name& { return r.name; });
}

namespace {

template <typename Table, typename NameOf>
std::vector<std::string> names_in(const Table& table, std::size_t count, NameOf name_of) {
  std::vector<std::string> names;
  for (std::size_t i = 0; i < count && i < table.size(); ++i) names.emplace_back(name_view(name_of(table[i])));
  return names;
}

}  // namespace

std::vector<std::string> names_of(const core::MachineConfig& c, NamedKind kind) {
  switch (kind) {
    case NamedKind::kDigitalInput:
      return names_in(c.digital_inputs, c.digital_input_count, self);
    case NamedKind::kAnalogInput:
      return names_in(c.analog_inputs, c.analog_input_count, [](const auto& a) -> const core::Name& { return a.name; });
    case NamedKind::kCoil:
      return names_in(c.coils, c.coil_count, self);
    case NamedKind::kPropOutput:
      return names_in(c.prop_outputs, c.prop_output_count, [](const auto& p) -> const core::Name& { return p.name; });
    case NamedKind::kFunction:
      return names_in(c.functions, c.function_count, [](const auto& f) -> const core::Name& { return f.name; });
    case NamedKind::kStep:
      return names_in(c.steps, c.step_count, [](const auto& st) -> const core::Name& { return st.name; });
  }
  return {};
}

}  // namespace spoolstep::machine_file
