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
#include "run_common.hpp"
#include "spoolstep/core/config_fields.hpp"
#include "spoolstep/core/controller.hpp"
#include "spoolstep/machine_file/machine_file.hpp"

namespace spoolstep::cli {
namespace {

using namespace spoolstep::core;

// Every field of every struct is written by walking its field list in
// core/config_fields.hpp, which the build checks against the struct itself:
// a field cannot be dropped from the firmware image.

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
  const core::ValveKindRow* row = core::valve_kind_row(v);
  if (row == nullptr) return fmt::format("static_cast<ValveKind>({})", static_cast<unsigned>(v));
  return std::string("ValveKind::") + row->symbol;
}
std::string spell(ValveCentre v) {
  const core::CentreRow* row = core::centre_row(v);
  if (row == nullptr) return fmt::format("static_cast<ValveCentre>({})", static_cast<unsigned>(v));
  return std::string("ValveCentre::") + row->symbol;
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

template <typename T>
struct is_std_array : std::false_type {};
template <typename T, std::size_t N>
struct is_std_array<std::array<T, N>> : std::true_type {};

std::string join_path(const std::string& p, const char* name) { return p.empty() ? std::string(name) : p + "." + name; }

template <typename T, std::size_t N>
void walk_table(Emitter& e, const std::string& p, const std::array<T, N>& table);

/// Writes `value` at `p`: a leaf as one line, a struct field by field from
/// its list in core/config_fields.hpp, a table row by row.
template <typename T>
void walk(Emitter& e, const std::string& p, const T& value) {
  if constexpr (is_std_array<T>::value) {
    walk_table(e, p, value);
  } else if constexpr (std::is_same_v<T, Name> || !fields::has_fields<T>::value) {
    e.field(p, value);
  } else {
    fields::each(
        [&](const char* name, auto member) {
          const auto& field = value.*member;
          if constexpr (std::is_same_v<std::decay_t<decltype(field)>, std::uint32_t>) {
            // Motion masks read best in hex: one bit per motion.
            if (std::string_view(name) == "guards" || std::string_view(name) == "release_holds") {
              e.field(join_path(p, name), fmt::format("0x{:08x}u", field));
              return;
            }
          }
          walk(e, join_path(p, name), field);
        },
        fields::Of<T>{});
  }
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
  walk(e, "", c);
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
  // The plant section is checked as 'check' checks it: a file export accepts
  // is a file check accepts, so a bench run of the same file cannot fail on it.
  if (!plant_section_ok_or_report(*result.machine, options.machine_file, "", "nothing written")) return kExitBadInput;
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
