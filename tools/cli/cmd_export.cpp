// `spoolstep export MACHINE.json [-o FILE] [--namespace NS] [--symbol NAME]`:
// loads a machine file on the host and writes its configuration as a C++
// header of constant data (a constexpr core::MachineConfig), so a firmware
// build runs the same configuration without a JSON parser on the target.
//
// Every field of every used table row is written as one assignment, floats
// so that they read back to the same bits, names as char arrays. The file is
// written atomically: a temporary file next to the target, then a rename;
// on any error nothing is left behind and the old file (if any) is intact.
#include <unistd.h>

#include <cctype>
#include <cerrno>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <memory>
#include <sstream>
#include <string>
#include <string_view>

#include <fmt/format.h>

#include "command_registry.hpp"
#include "spoolstep/core/controller.hpp"
#include "spoolstep/machine_file/machine_file.hpp"

namespace spoolstep::cli {
namespace {

using namespace spoolstep::core;

// The emitter below writes every field of these structs. When a struct
// changes size, a field was added or removed: update the emitter (and the
// field-by-field comparison in tests/firmware/config_compare.hpp), then the
// sizes here. Sizes are those of the host ABI (x86-64 / AArch64 Linux).
static_assert(sizeof(Name) == 24, "Name changed: update cmd_export.cpp");
static_assert(sizeof(RampConfig) == 48, "RampConfig changed: update cmd_export.cpp");
static_assert(sizeof(FunctionConfig) == 288, "FunctionConfig changed: update cmd_export.cpp");
static_assert(sizeof(ConditionNode) == 44, "ConditionNode changed: update cmd_export.cpp");
static_assert(sizeof(InterlockConfig) == 32, "InterlockConfig changed: update cmd_export.cpp");
static_assert(sizeof(TwoHandConfig) == 36, "TwoHandConfig changed: update cmd_export.cpp");
static_assert(sizeof(AnalogInputConfig) == 64, "AnalogInputConfig changed: update cmd_export.cpp");
static_assert(sizeof(PropOutputConfig) == 25, "PropOutputConfig changed: update cmd_export.cpp");
static_assert(sizeof(PowerUnitConfig) == 20, "PowerUnitConfig changed: update cmd_export.cpp");
static_assert(sizeof(OperatorConfig) == 16, "OperatorConfig changed: update cmd_export.cpp");
static_assert(sizeof(StepAction) == 12, "StepAction changed: update cmd_export.cpp");
static_assert(sizeof(StepConfig) == 84, "StepConfig changed: update cmd_export.cpp");
static_assert(sizeof(TransitionConfig) == 4, "TransitionConfig changed: update cmd_export.cpp");
static_assert(sizeof(SafetyConfig) == 16, "SafetyConfig changed: update cmd_export.cpp");
static_assert(sizeof(MachineConfig) == 18872, "MachineConfig changed: update cmd_export.cpp");

// ---- value spelling -------------------------------------------------------

std::string spell(bool v) { return v ? "true" : "false"; }
std::string spell_uint(std::uint32_t v) { return fmt::format("{}u", v); }

// Decimal with 9 significant digits reads back to the same float (FLT_DECIMAL_DIG
// is 9, C++17 <cfloat>); verified per value, with a hex-float fallback.
std::string spell(float v) {
  if (std::isnan(v)) return "__builtin_nanf(\"\")";
  if (std::isinf(v)) return v > 0 ? "__builtin_inff()" : "-__builtin_inff()";
  std::string text = fmt::format("{:.9g}", v);
  if (text.find_first_of(".e") == std::string::npos) text += ".0";
  const float back = std::strtof(text.c_str(), nullptr);
  std::uint32_t a = 0;
  std::uint32_t b = 0;
  std::memcpy(&a, &v, sizeof a);
  std::memcpy(&b, &back, sizeof b);
  if (a != b) text = fmt::format("{:a}", v);
  return text + "f";
}

std::string spell(const Name& name) {
  const std::string_view text = machine_file::name_view(name);
  // Bytes after the text are zero in a loaded name; a name holding anything
  // else there is written out in full so the data stays identical.
  bool tail_zero = true;
  for (std::size_t i = text.size(); i < name.text.size(); ++i) tail_zero = tail_zero && name.text[i] == 0;
  const std::size_t count = tail_zero ? text.size() : name.text.size();
  if (count == 0) return "Name{}";
  std::string out = "Name{{{";
  for (std::size_t i = 0; i < count; ++i) {
    const char ch = name.text[i];
    if (i != 0) out += ", ";
    if (ch >= 0x20 && ch < 0x7F && ch != '\'' && ch != '\\') {
      out += fmt::format("'{}'", ch);
    } else {
      out += fmt::format("'\\x{:02x}'", static_cast<unsigned char>(ch));
    }
  }
  return out + "}}}";
}

template <typename E>
std::string spell_enum(E value, std::initializer_list<std::pair<E, const char*>> names, const char* type) {
  for (const auto& [v, n] : names) {
    if (v == value) return fmt::format("{}::{}", type, n);
  }
  return fmt::format("static_cast<{}>({})", type, static_cast<unsigned>(value));
}

std::string spell(StopCategory v) {
  return spell_enum(v, {{StopCategory::kCat0, "kCat0"}, {StopCategory::kCat1, "kCat1"}, {StopCategory::kCat2, "kCat2"}},
                    "StopCategory");
}
std::string spell(Direction v) {
  return spell_enum(v, {{Direction::kNone, "kNone"}, {Direction::kExtend, "kExtend"}, {Direction::kRetract, "kRetract"}},
                    "Direction");
}
std::string spell(ValveKind v) {
  return spell_enum(v,
                    {{ValveKind::kSolenoid43SpringCentred, "kSolenoid43SpringCentred"},
                     {ValveKind::kSolenoid42Detented, "kSolenoid42Detented"},
                     {ValveKind::kSolenoid42SpringReturn, "kSolenoid42SpringReturn"},
                     {ValveKind::kProportional43TwoSolenoid, "kProportional43TwoSolenoid"},
                     {ValveKind::kProportional43SignedCommand, "kProportional43SignedCommand"}},
                    "ValveKind");
}
std::string spell(ValveCentre v) {
  return spell_enum(v,
                    {{ValveCentre::kNotApplicable, "kNotApplicable"}, {ValveCentre::kClosed, "kClosed"},
                     {ValveCentre::kTandem, "kTandem"}, {ValveCentre::kFloat, "kFloat"},
                     {ValveCentre::kOpen, "kOpen"}, {ValveCentre::kBleed, "kBleed"},
                     {ValveCentre::kRegenerative, "kRegenerative"}},
                    "ValveCentre");
}
std::string spell(RampProfile v) {
  return spell_enum(v, {{RampProfile::kLinear, "kLinear"}, {RampProfile::kSCurve, "kSCurve"}}, "RampProfile");
}
std::string spell(ConditionOp v) {
  return spell_enum(v,
                    {{ConditionOp::kTrue, "kTrue"}, {ConditionOp::kFalse, "kFalse"},
                     {ConditionOp::kDigitalInput, "kDigitalInput"}, {ConditionOp::kAnalogAbove, "kAnalogAbove"},
                     {ConditionOp::kAnalogBelow, "kAnalogBelow"}, {ConditionOp::kFunctionState, "kFunctionState"},
                     {ConditionOp::kNodeRef, "kNodeRef"}, {ConditionOp::kStepActive, "kStepActive"},
                     {ConditionOp::kTwoHandHeld, "kTwoHandHeld"}, {ConditionOp::kModeIs, "kModeIs"},
                     {ConditionOp::kPowerUnitReady, "kPowerUnitReady"}, {ConditionOp::kNot, "kNot"},
                     {ConditionOp::kAll, "kAll"}, {ConditionOp::kAny, "kAny"},
                     {ConditionOp::kOnDelay, "kOnDelay"}, {ConditionOp::kOffDelay, "kOffDelay"},
                     {ConditionOp::kDebounce, "kDebounce"}},
                    "ConditionOp");
}
std::string spell(InterlockKind v) {
  return spell_enum(v, {{InterlockKind::kPermissive, "kPermissive"}, {InterlockKind::kTrip, "kTrip"}},
                    "InterlockKind");
}
std::string spell(AnalogSignal v) {
  return spell_enum(v, {{AnalogSignal::kEngineering, "kEngineering"}, {AnalogSignal::kCurrent4To20, "kCurrent4To20"}},
                    "AnalogSignal");
}
std::string spell(PropUnit v) {
  return spell_enum(v, {{PropUnit::kMilliamp, "kMilliamp"}, {PropUnit::kPercent, "kPercent"}}, "PropUnit");
}

// ---- struct walkers -------------------------------------------------------
// One line per field: "  c.<path> = <value>;". A walker writes every field
// of its struct; a table row is written when it differs from a
// default-constructed row (rows past the count normally do not).

class Emitter {
 public:
  std::string text;

  void field(const std::string& path, const std::string& value, std::string_view comment = {}) {
    text += comment.empty() ? fmt::format("  c.{} = {};\n", path, value)
                            : fmt::format("  c.{} = {};  // {}\n", path, value, comment);
  }
  void field(const std::string& path, bool v) { field(path, spell(v)); }
  void field(const std::string& path, float v) { field(path, spell(v)); }
  void field(const std::string& path, std::uint8_t v) { field(path, spell_uint(v)); }
  void field(const std::string& path, std::uint16_t v) { field(path, spell_uint(v)); }
  void field(const std::string& path, std::uint32_t v) { field(path, spell_uint(v)); }
  void field(const std::string& path, const Name& v) {
    const std::string_view text_view = machine_file::name_view(v);
    field(path, spell(v), text_view.empty() ? std::string() : fmt::format("\"{}\"", text_view));
  }
  template <typename E, typename = std::enable_if_t<std::is_enum_v<E>>>
  void field(const std::string& path, E v) {
    field(path, spell(v));
  }
};

void walk(Emitter& e, const std::string& p, const RampConfig& r) {
  e.field(p + ".name", r.name);
  e.field(p + ".profile", r.profile);
  e.field(p + ".extend_accel_us", r.extend_accel_us);
  e.field(p + ".extend_decel_us", r.extend_decel_us);
  e.field(p + ".retract_accel_us", r.retract_accel_us);
  e.field(p + ".retract_decel_us", r.retract_decel_us);
  e.field(p + ".jerk_us", r.jerk_us);
}

void walk(Emitter& e, const std::string& p, const Name& n) { e.field(p, n); }

void walk(Emitter& e, const std::string& p, const AnalogInputConfig& a) {
  e.field(p + ".name", a.name);
  e.field(p + ".unit", a.unit);
  e.field(p + ".signal", a.signal);
  e.field(p + ".range_min", a.range_min);
  e.field(p + ".range_max", a.range_max);
  e.field(p + ".max_age_us", a.max_age_us);
}

void walk(Emitter& e, const std::string& p, const PropOutputConfig& o) {
  e.field(p + ".name", o.name);
  e.field(p + ".unit", o.unit);
}

template <typename T, std::size_t N>
void walk_table(Emitter& e, const std::string& p, const std::array<T, N>& table);

void walk(Emitter& e, const std::string& p, const FunctionConfig& f) {
  e.field(p + ".name", f.name);
  e.field(p + ".valve", f.valve);
  e.field(p + ".centre", f.centre);
  e.field(p + ".coil_extend", f.coil_extend);
  e.field(p + ".coil_retract", f.coil_retract);
  e.field(p + ".prop_extend", f.prop_extend);
  e.field(p + ".prop_retract", f.prop_retract);
  e.field(p + ".enable_coil", f.enable_coil);
  e.field(p + ".current_extend.crack_ma", f.current_extend.crack_ma);
  e.field(p + ".current_extend.max_ma", f.current_extend.max_ma);
  e.field(p + ".current_retract.crack_ma", f.current_retract.crack_ma);
  e.field(p + ".current_retract.max_ma", f.current_retract.max_ma);
  e.field(p + ".deadband_jump_percent", f.deadband_jump_percent);
  e.field(p + ".dither_amplitude_ma", f.dither_amplitude_ma);
  e.field(p + ".dither_frequency_hz", f.dither_frequency_hz);
  e.field(p + ".extended_end_input", f.extended_end_input);
  e.field(p + ".retracted_end_input", f.retracted_end_input);
  e.field(p + ".position_input", f.position_input);
  e.field(p + ".extend_limit", f.extend_limit);
  e.field(p + ".retract_limit", f.retract_limit);
  e.field(p + ".reversal_dwell_us", f.reversal_dwell_us);
  e.field(p + ".detent_pulse_us", f.detent_pulse_us);
  e.field(p + ".quick_stop_us", f.quick_stop_us);
  e.field(p + ".jog_speed_percent", f.jog_speed_percent);
  e.field(p + ".jog_extend", f.jog_extend);
  e.field(p + ".jog_retract", f.jog_retract);
  walk_table(e, p + ".ramps", f.ramps);
  e.field(p + ".ramp_count", f.ramp_count);
}

void walk(Emitter& e, const std::string& p, const ConditionNode& n) {
  e.field(p + ".op", n.op);
  e.field(p + ".a", n.a);
  e.field(p + ".b", n.b);
  e.field(p + ".threshold", n.threshold);
  e.field(p + ".hysteresis", n.hysteresis);
  e.field(p + ".time_us", n.time_us);
  e.field(p + ".label", n.label);
}

void walk(Emitter& e, const std::string& p, std::uint16_t v) { e.field(p, v); }

void walk(Emitter& e, const std::string& p, const InterlockConfig& il) {
  e.field(p + ".name", il.name);
  e.field(p + ".kind", il.kind);
  e.field(p + ".stop_category", il.stop_category);
  e.field(p + ".condition", il.condition);
  e.field(p + ".guards", fmt::format("0x{:08x}u", il.guards));
}

void walk(Emitter& e, const std::string& p, const TwoHandConfig& t) {
  e.field(p + ".name", t.name);
  e.field(p + ".left_input", t.left_input);
  e.field(p + ".right_input", t.right_input);
  e.field(p + ".max_sync_us", t.max_sync_us);
  e.field(p + ".release_holds", fmt::format("0x{:08x}u", t.release_holds));
}

void walk(Emitter& e, const std::string& p, const StepAction& a) {
  e.field(p + ".function", a.function);
  e.field(p + ".direction", a.direction);
  e.field(p + ".speed_percent", a.speed_percent);
  e.field(p + ".ramp", a.ramp);
}

void walk(Emitter& e, const std::string& p, const StepConfig& s) {
  e.field(p + ".name", s.name);
  walk_table(e, p + ".actions", s.actions);
  e.field(p + ".action_count", s.action_count);
  e.field(p + ".min_time_us", s.min_time_us);
  e.field(p + ".supervision_us", s.supervision_us);
}

void walk(Emitter& e, const std::string& p, const TransitionConfig& t) {
  e.field(p + ".from_step", t.from_step);
  e.field(p + ".to_step", t.to_step);
  e.field(p + ".condition", t.condition);
}

template <typename T, std::size_t N>
void walk_table(Emitter& e, const std::string& p, const std::array<T, N>& table) {
  Emitter blank;
  walk(blank, "", T{});
  for (std::size_t i = 0; i < N; ++i) {
    Emitter row;
    walk(row, "", table[i]);
    if (row.text == blank.text) continue;
    walk(e, fmt::format("{}[{}]", p, i), table[i]);
  }
}

std::string emit_body(const MachineConfig& c) {
  Emitter e;
  e.field("name", c.name);
  e.field("safety.scan_period_us", c.safety.scan_period_us);
  e.field("safety.watchdog_us", c.safety.watchdog_us);
  e.field("safety.max_digital_age_us", c.safety.max_digital_age_us);
  e.field("safety.input_fault_category", c.safety.input_fault_category);
  e.field("safety.supervision_category", c.safety.supervision_category);
  walk_table(e, "digital_inputs", c.digital_inputs);
  e.field("digital_input_count", c.digital_input_count);
  walk_table(e, "analog_inputs", c.analog_inputs);
  e.field("analog_input_count", c.analog_input_count);
  walk_table(e, "coils", c.coils);
  e.field("coil_count", c.coil_count);
  walk_table(e, "prop_outputs", c.prop_outputs);
  e.field("prop_output_count", c.prop_output_count);
  walk_table(e, "functions", c.functions);
  e.field("function_count", c.function_count);
  const PowerUnitConfig& pu = c.power_unit;
  e.field("power_unit.present", pu.present);
  e.field("power_unit.motor_coil", pu.motor_coil);
  e.field("power_unit.dump_coil", pu.dump_coil);
  e.field("power_unit.unloaded_start_us", pu.unloaded_start_us);
  e.field("power_unit.pressure_ready", pu.pressure_ready);
  e.field("power_unit.pressure_ready_timeout_us", pu.pressure_ready_timeout_us);
  e.field("power_unit.start", pu.start);
  e.field("power_unit.stop", pu.stop);
  const OperatorConfig& op = c.operator_panel;
  e.field("operator_panel.estop_input", op.estop_input);
  e.field("operator_panel.estop_category", op.estop_category);
  e.field("operator_panel.reset", op.reset);
  e.field("operator_panel.cycle_start", op.cycle_start);
  e.field("operator_panel.cycle_stop", op.cycle_stop);
  e.field("operator_panel.auto_mode", op.auto_mode);
  e.field("operator_panel.continuous", op.continuous);
  e.field("operator_panel.stop", op.stop);
  e.field("operator_panel.soft_commands", op.soft_commands);
  walk_table(e, "two_hand", c.two_hand);
  e.field("two_hand_count", c.two_hand_count);
  walk_table(e, "nodes", c.nodes);
  e.field("node_count", c.node_count);
  walk_table(e, "child_slots", c.child_slots);
  e.field("child_slot_count", c.child_slot_count);
  walk_table(e, "interlocks", c.interlocks);
  e.field("interlock_count", c.interlock_count);
  walk_table(e, "steps", c.steps);
  e.field("step_count", c.step_count);
  walk_table(e, "transitions", c.transitions);
  e.field("transition_count", c.transition_count);
  return e.text;
}

bool is_identifier(std::string_view s) {
  if (s.empty() || !(std::isalpha(static_cast<unsigned char>(s[0])) || s[0] == '_')) return false;
  for (char ch : s) {
    if (!(std::isalnum(static_cast<unsigned char>(ch)) || ch == '_')) return false;
  }
  // C++17 keywords and alternative tokens cannot name anything.
  static const char* const kKeywords[] = {
      "alignas", "alignof", "and", "and_eq", "asm", "auto", "bitand", "bitor", "bool", "break", "case", "catch",
      "char", "char16_t", "char32_t", "class", "compl", "const", "constexpr", "const_cast", "continue",
      "decltype", "default", "delete", "do", "double", "dynamic_cast", "else", "enum", "explicit", "export",
      "extern", "false", "float", "for", "friend", "goto", "if", "inline", "int", "long", "mutable",
      "namespace", "new", "noexcept", "not", "not_eq", "nullptr", "operator", "or", "or_eq", "private",
      "protected", "public", "register", "reinterpret_cast", "return", "short", "signed", "sizeof", "static",
      "static_assert", "static_cast", "struct", "switch", "template", "this", "thread_local", "throw", "true",
      "try", "typedef", "typeid", "typename", "union", "unsigned", "using", "virtual", "void", "volatile",
      "wchar_t", "while", "xor", "xor_eq"};
  for (const char* keyword : kKeywords) {
    if (s == keyword) return false;
  }
  return true;
}

bool is_namespace(std::string_view s) {
  while (true) {
    const std::size_t sep = s.find("::");
    if (!is_identifier(s.substr(0, sep))) return false;
    if (sep == std::string_view::npos) return true;
    s.remove_prefix(sep + 2);
  }
}

struct ExportOptions {
  std::string machine_file;
  std::string output;  // empty: stdout
  std::string name_space = "spoolstep::exported";
  std::string symbol = "kMachine";
};

std::string render_header(const ExportOptions& options, const MachineConfig& c) {
  const std::string file_name = std::filesystem::path(options.machine_file).filename().string();
  const std::string machine_name(machine_file::name_view(c.name));
  std::string out;
  out += fmt::format(
      "// Generated by `spoolstep export {}`: machine \"{}\" as constant data.\n"
      "// Do not edit; regenerate from the machine file. Firmware builds include this\n"
      "// instead of parsing JSON on the target. Every field of every used table row\n"
      "// is written; floats read back to the same bits as the host loader's values.\n"
      "#pragma once\n"
      "#include \"spoolstep/core/config.hpp\"\n\n"
      "namespace {} {{\n\n"
      "/// Builds the configuration of machine \"{}\" at compile time.\n"
      "constexpr spoolstep::core::MachineConfig build_{}() {{\n"
      "  using namespace spoolstep::core;\n"
      "  MachineConfig c{{}};\n",
      file_name, machine_name, options.name_space, machine_name, options.symbol);
  out += emit_body(c);
  out += fmt::format(
      "  return c;\n}}\n\n"
      "/// The configuration of machine \"{}\", field by field as the host loader built it.\n"
      "inline constexpr spoolstep::core::MachineConfig {} = build_{}();\n\n"
      "}}  // namespace {}\n",
      machine_name, options.symbol, options.symbol, options.name_space);
  return out;
}

// Writes `text` to `path` through a temporary file in the same directory and
// a rename, so readers see the old file or the new one, never a partial one.
// Returns an empty string on success, else the reason.
std::string write_atomically(const std::string& path, const std::string& text) {
  namespace fs = std::filesystem;
  const fs::path target(path);
  const fs::path dir = target.has_parent_path() ? target.parent_path() : fs::path(".");
  const fs::path temp = dir / fmt::format(".{}.tmp{}", target.filename().string(), static_cast<long>(::getpid()));
  std::error_code ec;
  {
    std::FILE* f = std::fopen(temp.c_str(), "wb");
    if (f == nullptr) return fmt::format("cannot create {}: {}", temp.string(), std::strerror(errno));
    const bool written = std::fwrite(text.data(), 1, text.size(), f) == text.size();
    const int write_errno = errno;
    const bool closed = std::fclose(f) == 0;
    if (!written || !closed) {
      fs::remove(temp, ec);
      return fmt::format("cannot write {}: {}", temp.string(), std::strerror(written ? errno : write_errno));
    }
  }
  fs::rename(temp, target, ec);
  if (ec) {
    std::error_code ignored;
    fs::remove(temp, ignored);
    return fmt::format("cannot rename {} to {}: {}", temp.string(), path, ec.message());
  }
  return {};
}

int run_export(const ExportOptions& options) {
  if (!is_namespace(options.name_space)) {
    std::cerr << fmt::format("spoolstep export: --namespace '{}' is not a C++ namespace name\n", options.name_space);
    return kExitBadInput;
  }
  if (!is_identifier(options.symbol)) {
    std::cerr << fmt::format("spoolstep export: --symbol '{}' is not a C++ identifier\n", options.symbol);
    return kExitBadInput;
  }
  const auto result = machine_file::load_machine_file(options.machine_file);
  if (!result.ok()) {
    for (const auto& error : result.errors) std::cerr << error.to_string() << "\n";
    std::cerr << fmt::format("{}: {} error{}; nothing written\n", options.machine_file, result.errors.size(),
                             result.errors.size() == 1 ? "" : "s");
    return kExitBadInput;
  }
  const MachineConfig& config = result.machine->config;
  const Status status = validate_config(config);
  if (!status.is_ok()) {
    std::cerr << fmt::format("{}: the core rejects this configuration: {} in {}[{}]; nothing written\n",
                             options.machine_file, to_string(status.code()), status.where(), status.index());
    return kExitBadInput;
  }
  const std::string header = render_header(options, config);
  std::error_code same_ec;
  if (!options.output.empty() && std::filesystem::exists(options.output, same_ec) &&
      std::filesystem::equivalent(options.output, options.machine_file, same_ec)) {
    std::cerr << "spoolstep export: -o " << options.output << " is the machine file itself; choose another name\n";
    return kExitBadInput;
  }
  if (options.output.empty()) {
    std::cout << header;
    return std::cout ? kExitOk : kExitInternal;
  }
  const std::string failure = write_atomically(options.output, header);
  if (!failure.empty()) {
    std::cerr << "spoolstep export: " << failure << "; nothing written\n";
    return kExitInternal;
  }
  return kExitOk;
}

const bool kRegistered = register_command(Command{
    "export",
    [](CLI::App& sub) {
      auto options = std::make_shared<ExportOptions>();
      sub.add_option("MACHINE", options->machine_file, "Machine file (.json) to export")->required();
      sub.add_option("-o,--output", options->output, "Header file to write (default: standard output)");
      sub.add_option("--namespace", options->name_space, "C++ namespace of the constant")
          ->capture_default_str();
      sub.add_option("--symbol", options->symbol, "Name of the constexpr MachineConfig")->capture_default_str();
      sub.footer(
          "Writes a C++ header with a constexpr spoolstep::core::MachineConfig for a firmware build.\n"
          "Exit codes: 0 written, 2 the machine file or an option is invalid, 3 the file could not be\n"
          "written. The output is replaced atomically; on any error nothing is written.");
      return [options] { return run_export(*options); };
    },
    "Write a machine's configuration as a C++ header of constant data for firmware"});

}  // namespace
}  // namespace spoolstep::cli
