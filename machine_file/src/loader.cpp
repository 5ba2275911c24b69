// Machine-file loader: JSON text -> core::MachineConfig, or a list of errors.
//
// The loader walks the document with a JSON pointer path, checks every field
// against the parameter table (parameters.cpp), resolves names to indices,
// compiles conditions into the core's node array and collects every problem
// it finds instead of stopping at the first. Exceptions from nlohmann_json
// stop at this file's boundary and become LoadErrors.
#include <algorithm>
#include <cmath>
#include <cctype>
#include <cerrno>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <functional>
#include <map>
#include <set>
#include <sstream>
#include <stdexcept>
#include <string>
#include <vector>

#include <fmt/format.h>

#include "spoolstep/core/controller.hpp"
#include "spoolstep/core/soft_command.hpp"
#include "spoolstep/jsondoc/reader.hpp"
#include "spoolstep/runtime/scan_loop.hpp"
#include "spoolstep/machine_file/machine_file.hpp"
#include "spoolstep/machine_file/parameters.hpp"

namespace spoolstep::machine_file {
namespace {

using json = nlohmann::json;
using jsondoc::closest;
using jsondoc::escape_token;
using jsondoc::printable;

constexpr const char* kCapacityHeader = "firmware_core/include/spoolstep/core/capacity.hpp";

// ---------------------------------------------------------------- helpers --


std::string child(const std::string& path, std::string_view key) { return path + "/" + escape_token(key); }
std::string child(const std::string& path, std::size_t index) { return path + "/" + std::to_string(index); }

/// "/functions/1/ramps/0/extend_accel_ms" -> "/functions/*/ramps/*/extend_accel_ms".
std::string pattern_of(const std::string& path) {
  std::string out;
  std::size_t pos = 0;
  while (pos < path.size()) {
    const std::size_t next = path.find('/', pos + 1);
    const std::string token = path.substr(pos + 1, next == std::string::npos ? std::string::npos : next - pos - 1);
    const bool numeric = !token.empty() && std::all_of(token.begin(), token.end(), [](char c) { return c >= '0' && c <= '9'; });
    out += "/";
    out += numeric ? "*" : token;
    if (next == std::string::npos) break;
    pos = next;
  }
  return out;
}

std::string join(const std::vector<std::string>& items, std::string_view separator) {
  std::string out;
  for (std::size_t i = 0; i < items.size(); ++i) {
    if (i > 0) out += separator;
    out += items[i];
  }
  return out;
}

std::vector<std::string> split_choices(std::string_view choices) {
  std::vector<std::string> out;
  std::size_t pos = 0;
  while (pos <= choices.size()) {
    const std::size_t bar = choices.find('|', pos);
    out.emplace_back(choices.substr(pos, bar == std::string_view::npos ? std::string_view::npos : bar - pos));
    if (bar == std::string_view::npos) break;
    pos = bar + 1;
  }
  return out;
}

std::string number_text(double value) { return fmt::format("{:g}", value); }

/// Short rendering of a JSON value for "(got ...)" in messages.
std::string got(const json& value) {
  // Containers by their size only: printing a deeply nested one would recurse without bound.
  if (value.is_array()) return fmt::format("a list of {} items", value.size());
  if (value.is_object()) return fmt::format("an object with {} keys", value.size());
  return printable(value.dump(), 40);
}

/// The value with its JSON type, for type errors: `string "200"`, `null`.
std::string got_typed(const json& value) {
  if (value.is_null()) return "null";
  if (value.is_array() || value.is_object()) return got(value);
  return std::string(value.type_name()) + " " + got(value);
}

void set_name(core::Name& name, std::string_view text) {
  name.text.fill('\0');
  const std::size_t n = std::min(text.size(), core::kMaxNameLength);
  std::copy_n(text.begin(), n, name.text.begin());
}

/// Fits a label into a core::Name, marking a cut with "..".
std::string fit_label(const std::string& text) {
  if (text.size() <= core::kMaxNameLength) return text;
  return text.substr(0, core::kMaxNameLength - 2) + "..";
}

enum class RefKind { kDigital, kAnalog, kCoil, kProp, kFunction, kStep, kInterlock, kTwoHand };

const char* ref_noun(RefKind kind) {
  switch (kind) {
    case RefKind::kDigital: return "digital input";
    case RefKind::kAnalog: return "analog input";
    case RefKind::kCoil: return "coil";
    case RefKind::kProp: return "proportional output";
    case RefKind::kFunction: return "function";
    case RefKind::kStep: return "step";
    case RefKind::kInterlock: return "interlock";
    case RefKind::kTwoHand: return "two-hand device";
  }
  return "?";
}

const char* ref_home(RefKind kind) {
  switch (kind) {
    case RefKind::kDigital: return "/inputs/digital";
    case RefKind::kAnalog: return "/inputs/analog";
    case RefKind::kCoil: return "/outputs/coils";
    case RefKind::kProp: return "/outputs/proportional";
    case RefKind::kFunction: return "/functions";
    case RefKind::kStep: return "/sequence/steps";
    case RefKind::kInterlock: return "/interlocks";
    case RefKind::kTwoHand: return "/two_hand";
  }
  return "?";
}

std::optional<RefKind> ref_kind_of(ParamType type) {
  switch (type) {
    case ParamType::kDigitalInput: return RefKind::kDigital;
    case ParamType::kAnalogInput: return RefKind::kAnalog;
    case ParamType::kCoil: return RefKind::kCoil;
    case ParamType::kPropOutput: return RefKind::kProp;
    case ParamType::kFunction: return RefKind::kFunction;
    case ParamType::kStep: return RefKind::kStep;
    case ParamType::kInterlock: return RefKind::kInterlock;
    case ParamType::kTwoHand: return RefKind::kTwoHand;
    default: return std::nullopt;
  }
}

// The valve keys a kind takes, from its row in core::kValveKinds (in the
// order the reference documents them).

const core::ValveKindRow* valve_kind_named(const std::string& key) {
  for (const core::ValveKindRow& row : core::kValveKinds) {
    if (key == row.key) return &row;
  }
  return nullptr;
}

const std::vector<std::string_view> kValveCommonKeys = {"kind", "description", "enable"};
const std::vector<std::string_view> kValveAllKeys = {
    "kind", "description", "enable", "centre", "coil_extend", "coil_retract", "channel_extend",
    "channel_retract", "channel", "current_extend_ma", "current_retract_ma", "deadband_jump_percent",
    "dither", "detent_pulse_ms"};

// The parameter table has already refused a name outside core::kCentres.
core::ValveCentre centre_of(const std::string& text) {
  for (const core::CentreRow& row : core::kCentres) {
    if (text == row.key) return row.centre;
  }
  return core::ValveCentre::kNotApplicable;
}

// The keys that select a condition form, in the order they are documented.
const std::vector<std::string_view> kConditionForms = {
    "input", "not", "all", "any", "analog", "on_delay_ms", "off_delay_ms", "debounce_ms",
    "function", "interlock", "step", "two_hand", "mode", "power_unit"};

// ----------------------------------------------------------------- loader --

class Loader {
 public:
  Loader(std::string file, core::MachineConfig& config) : file_(std::move(file)), cfg_(config) {}

  void load(const json& doc);

  std::vector<LoadError> errors;
  json plant;

 private:
  using NameIndex = std::map<std::string, std::uint8_t>;

  // -- reporting
  void fail(const std::string& path, std::string reason, std::string hint) {
    errors.push_back(LoadError{file_, path, std::move(reason), std::move(hint)});
  }

  const Parameter& spec(const std::string& path, std::string_view spec_key) const {
    const std::string key = spec_key.empty() ? pattern_of(path) : std::string(spec_key);
    const Parameter* p = find_parameter(key);
    if (p == nullptr) throw std::logic_error("parameter table has no row for " + key);
    return *p;
  }

  // -- structure
  bool expect_object(const json& j, const std::string& path) {
    if (j.is_object()) return true;
    fail(path, fmt::format("must be an object {{...}} (got {})", got_typed(j)),
         "Write this part as a JSON object with named fields.");
    return false;
  }

  bool expect_array(const json& j, const std::string& path) {
    if (j.is_array()) return true;
    fail(path, fmt::format("must be a list [...] (got {})", got_typed(j)),
         "Write this part as a JSON list.");
    return false;
  }

  void check_keys(const json& obj, const std::string& path, const std::vector<std::string_view>& allowed) {
    std::vector<std::string> known(allowed.begin(), allowed.end());
    for (const auto& item : obj.items()) {
      if (std::find(allowed.begin(), allowed.end(), item.key()) != allowed.end()) continue;
      unknown_key(path, item.key(), known);
    }
  }

  void unknown_key(const std::string& path, const std::string& key, const std::vector<std::string>& known) {
    const auto suggestion = closest(key, known);
    fail(child(path, key), fmt::format("unknown field '{}'", printable(key)),
         suggestion ? fmt::format("Did you mean '{}'?", *suggestion)
                    : fmt::format("Remove it; fields allowed here: {}.", join(known, ", ")));
  }

  const json* member(const json& obj, const std::string& /*path*/, std::string_view key) const {
    const auto it = obj.find(std::string(key));
    return it == obj.end() ? nullptr : &*it;
  }

  void missing(const std::string& path, std::string_view key, std::string_view what) {
    fail(child(path, key), fmt::format("missing required field '{}'", key), fmt::format("Add it: {}", what));
  }

  /// Checks a count against a capacity; returns how many items to process.
  std::size_t capped(std::size_t count, std::size_t capacity, const char* capacity_name,
                     const std::string& array_path, const char* what) {
    if (count <= capacity) return count;
    fail(child(array_path, capacity),
         fmt::format("too many {}: {} given, capacity {} = {}", what, count, capacity_name, capacity),
         fmt::format("Remove some, or raise {} in {} and rebuild.", capacity_name, kCapacityHeader));
    return capacity;
  }

  // -- scalar readers, all driven by the parameter table
  std::optional<double> read_number(const json& obj, const std::string& path, std::string_view key,
                                    std::string_view spec_key = {}) {
    const std::string field = child(path, key);
    const Parameter& p = spec(field, spec_key);
    const json* j = member(obj, path, key);
    if (j == nullptr) {
      if (p.presence.required_in_object()) {
        missing(path, key, fmt::format("{} ({}{}{}, {} to {}).", p.description, to_string(p.type),
                                       p.unit.empty() ? "" : " in ", p.unit, number_text(p.min), number_text(p.max)));
        return std::nullopt;
      }
      if (p.default_value.empty()) return std::nullopt;
      return std::stod(std::string(p.default_value));
    }
    if (!j->is_number()) {
      fail(field, fmt::format("must be a number (got {})", got_typed(*j)),
           fmt::format("Write a number{}{} without quotes.", p.unit.empty() ? "" : " in ", p.unit));
      return std::nullopt;
    }
    const double value = j->get<double>();
    // 20.0 and 2e1 are whole numbers too (JSON has one number type); a value
    // too large for any integer type is reported against the range below.
    if (p.type == ParamType::kInteger && std::isfinite(value) && std::abs(value) < 9.0e15 &&
        value != std::floor(value)) {
      fail(field, fmt::format("must be a whole number (got {})", got(*j)),
           fmt::format("Write a whole number{}{}.", p.unit.empty() ? "" : " of ", p.unit));
      return std::nullopt;
    }
    if (value < p.min || value > p.max) {
      fail(field, fmt::format("must be between {} and {} (got {})", number_text(p.min), number_text(p.max), got(*j)),
           p.limit_note.empty() ? std::string("Fix the value.") : std::string(p.limit_note));
      return std::nullopt;
    }
    return value;
  }

  std::uint32_t read_ms_as_us(const json& obj, const std::string& path, std::string_view key,
                              std::string_view spec_key = {}) {
    const auto ms = read_number(obj, path, key, spec_key);
    return ms ? static_cast<std::uint32_t>(*ms * 1000.0) : 0u;
  }

  std::optional<std::string> read_string(const json& obj, const std::string& path, std::string_view key,
                                         std::string_view spec_key = {}) {
    const std::string field = child(path, key);
    const Parameter& p = spec(field, spec_key);
    const json* j = member(obj, path, key);
    if (j == nullptr) {
      if (p.presence.required_in_object()) missing(path, key, std::string(p.description));
      if (p.default_value.empty()) return std::nullopt;
      return std::string(p.default_value);
    }
    if (!j->is_string()) {
      fail(field, fmt::format("must be a string (got {})", got_typed(*j)),
           "Write the value in double quotes.");
      return std::nullopt;
    }
    std::string value = j->get<std::string>();
    if (p.type == ParamType::kChoice) {
      const auto choices = split_choices(p.choices);
      if (std::find(choices.begin(), choices.end(), value) == choices.end()) {
        if (field == "/format") {
          fail(field, fmt::format("unsupported format \"{}\"", printable(value)),
               fmt::format("This program reads \"{}\" files.", kFormatTag));
          return std::nullopt;
        }
        const auto suggestion = closest(value, choices);
        fail(field, fmt::format("unknown value \"{}\"; must be one of: {}", printable(value), join(choices, ", ")),
             suggestion ? fmt::format("Did you mean \"{}\"?", *suggestion) : std::string("Use one of the listed values."));
        return std::nullopt;
      }
    }
    return value;
  }

  /// Reads a new name and checks its form; "" when missing or malformed.
  std::string read_name(const json& obj, const std::string& path, std::string_view key = "name") {
    const auto value = read_string(obj, path, key);
    if (!value) return "";
    const std::string field = child(path, key);
    if (value->empty()) {
      fail(field, "name is empty", "Give it a name.");
      return "";
    }
    if (value->size() > core::kMaxNameLength) {
      fail(field, fmt::format("name '{}' is {} characters long; at most {} fit (kMaxNameLength)", printable(*value),
                              value->size(), core::kMaxNameLength),
           "Shorten the name.");
      return "";
    }
    const bool starts_ok = std::isalpha(static_cast<unsigned char>((*value)[0])) != 0;
    const bool chars_ok = std::all_of(value->begin(), value->end(), [](char c) {
      return std::isalnum(static_cast<unsigned char>(c)) != 0 || c == '_';
    });
    if (!starts_ok || !chars_ok) {
      fail(field, fmt::format("name '{}' has characters other than letters, digits and '_', or does not start with a letter", printable(*value)),
           "Use names like press_pressure or guard_closed.");
      return "";
    }
    return *value;
  }

  /// Registers a name in a namespace; reports a duplicate.
  bool claim_name(std::map<std::string, std::string>& names, const std::string& name, const std::string& path,
                  std::string_view what) {
    if (name.empty()) return false;
    const auto [it, inserted] = names.emplace(name, path);
    if (!inserted) {
      fail(child(path, "name"), fmt::format("duplicate {} name '{}' (first defined at {})", what, name, it->second),
           "Give each one its own name.");
      return false;
    }
    return true;
  }

  const NameIndex& index_of(RefKind kind) const {
    switch (kind) {
      case RefKind::kDigital: return digital_;
      case RefKind::kAnalog: return analog_;
      case RefKind::kCoil: return coils_;
      case RefKind::kProp: return props_;
      case RefKind::kFunction: return functions_;
      case RefKind::kStep: return steps_;
      case RefKind::kInterlock: return interlocks_;
      case RefKind::kTwoHand: return two_hands_;
    }
    return digital_;
  }

  /// Resolves a name of the given kind; reports an unknown one at `field`.
  std::uint8_t resolve(RefKind kind, const std::string& name, const std::string& field) {
    const NameIndex& index = index_of(kind);
    const auto it = index.find(name);
    if (it != index.end()) return it->second;
    for (const RefKind other : {RefKind::kDigital, RefKind::kAnalog, RefKind::kCoil, RefKind::kProp, RefKind::kFunction,
                                RefKind::kStep, RefKind::kInterlock, RefKind::kTwoHand}) {
      if (other != kind && index_of(other).count(name) > 0) {
        fail(field, fmt::format("'{}' is a {}, not a {}", name, ref_noun(other), ref_noun(kind)),
             fmt::format("Name a {} declared under {}.", ref_noun(kind), ref_home(kind)));
        return core::kNoIndex8;
      }
    }
    std::vector<std::string> names;
    for (const auto& entry : index) names.push_back(entry.first);
    const auto suggestion = closest(name, names);
    fail(field, fmt::format("unknown {} '{}'", ref_noun(kind), printable(name)),
         suggestion ? fmt::format("Did you mean '{}'?", *suggestion)
                    : fmt::format("Declare it under {} or fix the name.", ref_home(kind)));
    return core::kNoIndex8;
  }

  std::uint8_t read_ref(const json& obj, const std::string& path, std::string_view key,
                        std::string_view spec_key = {}) {
    const std::string field = child(path, key);
    const Parameter& p = spec(field, spec_key);
    const auto kind = ref_kind_of(p.type);
    if (!kind) throw std::logic_error("parameter " + std::string(p.key) + " is not a reference");
    const auto name = read_string(obj, path, key, spec_key);
    if (!name) return core::kNoIndex8;
    return resolve(*kind, *name, field);
  }

  std::uint16_t read_condition(const json& obj, const std::string& path, std::string_view key,
                               std::string_view spec_key = {}) {
    const std::string field = child(path, key);
    const Parameter& p = spec(field, spec_key);
    const json* j = member(obj, path, key);
    if (j == nullptr) {
      if (p.presence.required_in_object()) missing(path, key, std::string(p.description) + " (a condition).");
      return core::kNoCondition;
    }
    return compile(*j, field);
  }

  /// Gives an output channel its one owner; reports a second owner.
  void claim_output(std::map<std::uint8_t, std::string>& owners, std::uint8_t index, RefKind kind,
                    const std::string& field, const std::string& owner) {
    if (index == core::kNoIndex8) return;
    const auto [it, inserted] = owners.emplace(index, owner + " (" + field + ")");
    if (!inserted) {
      const std::string name = kind == RefKind::kCoil ? std::string(name_view(cfg_.coils[index]))
                                                      : std::string(name_view(cfg_.prop_outputs[index].name));
      fail(field, fmt::format("{} '{}' already has an owner: {}", ref_noun(kind), name, it->second),
           "Every output channel has exactly one owner; give this one its own output.");
    }
  }

  // -- conditions
  std::uint16_t add_node(core::ConditionNode node, const std::string& label, const std::string& path);
  std::uint16_t compile(const json& c, const std::string& path);
  int compile_depth_ = 0;
  std::uint16_t compile_interlock(std::uint8_t index, const std::string& ref_path);

  // -- sections
  void load_timing(const json& doc);
  void load_inputs(const json& doc);
  std::uint8_t load_point_names(const json& section, const std::string& section_path, const char* key,
                                std::size_t capacity, const char* capacity_name, const char* what, core::Name* names,
                                NameIndex& index);
  void load_outputs(const json& doc);
  void load_two_hand(const json& doc);
  void prepass_names(const json& doc);
  void load_function(const json& f, const std::string& path, std::uint8_t index);
  void load_valve(const json& v, const std::string& path, core::FunctionConfig& fc, const std::string& fname);
  void load_power_unit(const json& doc);
  void load_operator(const json& doc);
  void load_interlocks(const json& doc);
  void load_sequence(const json& doc);
  std::uint32_t read_guards(const json& obj, const std::string& path);
  std::uint32_t read_motion_list(const json& list, const std::string& path, bool pump_allowed);
  void load_two_hand_holds(const json& doc);
  void read_soft_commands(const json& op, const std::string& path);

  std::string file_;
  core::MachineConfig& cfg_;

  std::map<std::string, std::string> io_names_;  // all I/O points share one namespace
  NameIndex digital_, analog_, coils_, props_, functions_, steps_, interlocks_, two_hands_;
  std::map<std::uint8_t, std::string> coil_owner_, prop_owner_;
  std::vector<std::map<std::string, std::uint8_t>> ramp_names_;  // per function
  std::vector<bool> kind_known_;  // per function: valve kind read, so kind-specific checks apply

  // Interlocks compile on first use so that a reference finds its target's
  // root node already compiled (children before parents).
  enum class Mark { kTodo, kBusy, kDone };
  std::vector<const json*> interlock_json_;
  std::vector<std::string> interlock_path_;
  std::vector<Mark> interlock_mark_;
  std::vector<std::string> interlock_stack_;

  bool nodes_exhausted_ = false;
  bool slots_exhausted_ = false;
  const json* steps_json_ = nullptr;
  std::vector<std::function<void()>> deferred_;  // checks that need every section loaded
};

// ------------------------------------------------------------- conditions --

std::uint16_t Loader::add_node(core::ConditionNode node, const std::string& label, const std::string& path) {
  if (cfg_.node_count >= core::kMaxConditionNodes) {
    if (!nodes_exhausted_) {
      fail(path,
           fmt::format("too many condition nodes: the conditions need more than kMaxConditionNodes = {}",
                       core::kMaxConditionNodes),
           fmt::format("Simplify conditions (name shared parts as interlocks), or raise kMaxConditionNodes in {} and rebuild.",
                       kCapacityHeader));
      nodes_exhausted_ = true;
    }
    return core::kNoCondition;
  }
  set_name(node.label, fit_label(label));
  cfg_.nodes[cfg_.node_count] = node;
  return cfg_.node_count++;
}

std::uint16_t Loader::compile(const json& c, const std::string& path) {
  // Nesting deeper than this cannot fit the node table anyway, and the
  // recursion must stay bounded whatever the file holds.
  constexpr int kMaxConditionDepth = 32;
  struct DepthGuard {
    int& depth;
    explicit DepthGuard(int& d) : depth(++d) {}
    ~DepthGuard() { --depth; }
  } guard(compile_depth_);
  if (compile_depth_ > kMaxConditionDepth) {
    fail(path, fmt::format("conditions nested deeper than {} levels", kMaxConditionDepth),
         "Name parts of the condition as interlocks and refer to them with {\"interlock\": ...}.");
    return core::kNoCondition;
  }
  core::ConditionNode node;
  if (c.is_boolean()) {
    node.op = c.get<bool>() ? core::ConditionOp::kTrue : core::ConditionOp::kFalse;
    return add_node(node, c.get<bool>() ? "true" : "false", path);
  }
  if (c.is_string()) {
    const std::string name = c.get<std::string>();
    const std::uint8_t input = resolve(RefKind::kDigital, name, path);
    if (input == core::kNoIndex8) return core::kNoCondition;
    node.op = core::ConditionOp::kDigitalInput;
    node.a = input;
    return add_node(node, name, path);
  }
  if (!c.is_object()) {
    fail(path, fmt::format("a condition must be true, false, a digital input name or an object (got {})", got_typed(c)),
         "See the condition forms in config/README.md.");
    return core::kNoCondition;
  }
  std::vector<std::string> forms;
  for (const auto& form : kConditionForms) {
    if (c.contains(std::string(form))) forms.emplace_back(form);
  }
  if (forms.empty()) {
    if (c.empty()) {
      fail(path, "empty condition {}", "Write a condition, e.g. \"guard_closed\" or {\"all\": [...]}.");
    } else {
      std::vector<std::string> known(kConditionForms.begin(), kConditionForms.end());
      for (const auto& item : c.items()) unknown_key(path, item.key(), known);
    }
    return core::kNoCondition;
  }
  if (forms.size() > 1) {
    fail(path, fmt::format("a condition object takes exactly one of its forms; found '{}'", join(forms, "' and '")),
         "Combine conditions with {\"all\": [...]} or {\"any\": [...]}.");
    return core::kNoCondition;
  }
  const std::string form = forms.front();
  const std::string spec_prefix = "<condition>/";
  auto sk = [&](const char* key) { return spec_prefix + key; };

  if (form == "input") {
    check_keys(c, path, {"input"});
    const std::uint8_t input = read_ref(c, path, "input", sk("input"));
    if (input == core::kNoIndex8) return core::kNoCondition;
    node.op = core::ConditionOp::kDigitalInput;
    node.a = input;
    return add_node(node, std::string(name_view(cfg_.digital_inputs[input])), path);
  }
  if (form == "not") {
    check_keys(c, path, {"not"});
    const std::uint16_t inner = compile(c.at("not"), child(path, "not"));
    if (inner == core::kNoCondition) return core::kNoCondition;
    node.op = core::ConditionOp::kNot;
    node.a = inner;
    return add_node(node, "not " + std::string(name_view(cfg_.nodes[inner].label)), path);
  }
  if (form == "all" || form == "any") {
    check_keys(c, path, {form});
    const json& list = c.at(form);
    const std::string list_path = child(path, form);
    if (!expect_array(list, list_path)) return core::kNoCondition;
    if (list.empty()) {
      fail(list_path, fmt::format("'{}' needs at least one condition", form), "Add conditions to the list.");
      return core::kNoCondition;
    }
    std::vector<std::uint16_t> children;
    bool ok = true;
    for (std::size_t i = 0; i < list.size(); ++i) {
      const std::uint16_t k = compile(list[i], child(list_path, i));
      ok = ok && k != core::kNoCondition;
      children.push_back(k);
    }
    if (!ok) return core::kNoCondition;
    if (cfg_.child_slot_count + children.size() > core::kMaxConditionChildren) {
      if (!slots_exhausted_) {
        fail(list_path,
             fmt::format("too many condition children: all/any lists need more than kMaxConditionChildren = {} slots",
                         core::kMaxConditionChildren),
             fmt::format("Simplify conditions, or raise kMaxConditionChildren in {} and rebuild.", kCapacityHeader));
        slots_exhausted_ = true;
      }
      return core::kNoCondition;
    }
    node.op = form == "all" ? core::ConditionOp::kAll : core::ConditionOp::kAny;
    node.a = cfg_.child_slot_count;
    node.b = static_cast<std::uint16_t>(children.size());
    std::vector<std::string> labels;
    for (const std::uint16_t k : children) {
      cfg_.child_slots[cfg_.child_slot_count++] = k;
      labels.emplace_back(name_view(cfg_.nodes[k].label));
    }
    return add_node(node, join(labels, form == "all" ? " and " : " or "), path);
  }
  if (form == "analog") {
    check_keys(c, path, {"analog", "above", "below", "hysteresis"});
    const std::uint8_t input = read_ref(c, path, "analog", sk("analog"));
    const bool above = c.contains("above");
    const bool below = c.contains("below");
    if (above == below) {
      fail(path, above ? "give either 'above' or 'below', not both" : "missing 'above' or 'below'",
           "Write {\"analog\": \"name\", \"above\": value} or {\"analog\": \"name\", \"below\": value}.");
      return core::kNoCondition;
    }
    const char* key = above ? "above" : "below";
    const auto threshold = read_number(c, path, key, sk(key));
    const auto hysteresis = read_number(c, path, "hysteresis", sk("hysteresis"));
    if (input == core::kNoIndex8 || !threshold || !hysteresis) return core::kNoCondition;
    const auto& ai = cfg_.analog_inputs[input];
    const float low = std::min(ai.range_min, ai.range_max);
    const float high = std::max(ai.range_min, ai.range_max);
    const std::string unit(name_view(ai.unit));
    if (*threshold < low || *threshold > high) {
      fail(child(path, key),
           fmt::format("threshold {} {} is outside the range of '{}' ({} to {} {})", number_text(*threshold), unit,
                       name_view(ai.name), number_text(low), number_text(high), unit),
           "The input can never cross it; fix the threshold or the input's range.");
      return core::kNoCondition;
    }
    if (*hysteresis >= high - low) {
      fail(child(path, "hysteresis"),
           fmt::format("hysteresis {} {} is not smaller than the input's span ({} {})", number_text(*hysteresis), unit,
                       number_text(high - low), unit),
           "Use a hysteresis of a few percent of the span.");
      return core::kNoCondition;
    }
    node.op = above ? core::ConditionOp::kAnalogAbove : core::ConditionOp::kAnalogBelow;
    node.a = input;
    node.threshold = static_cast<float>(*threshold);
    node.hysteresis = static_cast<float>(*hysteresis);
    std::string label = fmt::format("{} {} {} {}", name_view(ai.name), above ? ">" : "<", number_text(*threshold), unit);
    if (label.size() > core::kMaxNameLength) {
      label = fmt::format("{} {} {}", name_view(ai.name), above ? ">" : "<", number_text(*threshold));
    }
    return add_node(node, label, path);
  }
  if (form == "on_delay_ms" || form == "off_delay_ms" || form == "debounce_ms") {
    check_keys(c, path, {form, "of"});
    const auto ms = read_number(c, path, form, spec_prefix + form);
    std::uint16_t inner = core::kNoCondition;
    if (!c.contains("of")) {
      missing(path, "of", "the condition the delay acts on.");
    } else {
      inner = compile(c.at("of"), child(path, "of"));
    }
    if (!ms || inner == core::kNoCondition) return core::kNoCondition;
    node.op = form == "on_delay_ms"    ? core::ConditionOp::kOnDelay
              : form == "off_delay_ms" ? core::ConditionOp::kOffDelay
                                       : core::ConditionOp::kDebounce;
    node.a = inner;
    node.time_us = static_cast<std::uint32_t>(*ms * 1000.0);
    const char* what = form == "on_delay_ms" ? "on" : form == "off_delay_ms" ? "off" : "db";
    return add_node(node, fmt::format("{} {} {}ms", name_view(cfg_.nodes[inner].label), what, number_text(*ms)), path);
  }
  if (form == "function") {
    check_keys(c, path, {"function", "is"});
    const std::uint8_t function = read_ref(c, path, "function", sk("function"));
    const auto state = read_string(c, path, "is", sk("is"));
    if (function == core::kNoIndex8 || !state) return core::kNoCondition;
    const auto states = split_choices(find_parameter("<condition>/is")->choices);
    const auto position = std::find(states.begin(), states.end(), *state) - states.begin();
    node.op = core::ConditionOp::kFunctionState;
    node.a = function;
    node.b = static_cast<std::uint16_t>(position);
    const auto condition = static_cast<core::FunctionCondition>(position);
    if (condition == core::FunctionCondition::kAtExtendedEnd || condition == core::FunctionCondition::kAtRetractedEnd) {
      const bool extended = condition == core::FunctionCondition::kAtExtendedEnd;
      const std::string field = child(path, "is");
      deferred_.push_back([this, function, extended, field] {
        const auto& fc = cfg_.functions[function];
        const std::uint8_t end = extended ? fc.extended_end_input : fc.retracted_end_input;
        // The core reads only the end-of-travel input for this state, not the
        // position window, so without the input the condition never holds.
        if (end == core::kNoIndex8) {
          fail(field,
               fmt::format("function '{}' has no {} input, so this condition could never be true",
                           name_view(fc.name), extended ? "extended_end" : "retracted_end"),
               fmt::format("Add \"{}\" to the function, or test its position input with {{\"analog\": ...}}.",
                           extended ? "extended_end" : "retracted_end"));
        }
      });
    }
    std::string text = *state;
    std::replace(text.begin(), text.end(), '_', ' ');
    return add_node(node, fmt::format("{} {}", name_view(cfg_.functions[function].name), text), path);
  }
  if (form == "interlock") {
    check_keys(c, path, {"interlock"});
    const std::uint8_t interlock = read_ref(c, path, "interlock", sk("interlock"));
    if (interlock == core::kNoIndex8) return core::kNoCondition;
    const std::uint16_t target = compile_interlock(interlock, child(path, "interlock"));
    if (target == core::kNoCondition) return core::kNoCondition;
    node.op = core::ConditionOp::kNodeRef;
    node.a = target;
    return add_node(node, std::string(name_view(cfg_.interlocks[interlock].name)), path);
  }
  if (form == "step") {
    check_keys(c, path, {"step"});
    const std::uint8_t step = read_ref(c, path, "step", sk("step"));
    if (step == core::kNoIndex8) return core::kNoCondition;
    node.op = core::ConditionOp::kStepActive;
    node.a = step;
    return add_node(node, fmt::format("step {}", c.at("step").get<std::string>()), path);
  }
  if (form == "two_hand") {
    check_keys(c, path, {"two_hand"});
    const std::uint8_t device = read_ref(c, path, "two_hand", sk("two_hand"));
    if (device == core::kNoIndex8) return core::kNoCondition;
    node.op = core::ConditionOp::kTwoHandHeld;
    node.a = device;
    return add_node(node, fmt::format("two_hand {}", name_view(cfg_.two_hand[device].name)), path);
  }
  if (form == "mode") {
    check_keys(c, path, {"mode"});
    const auto mode = read_string(c, path, "mode", sk("mode"));
    if (!mode) return core::kNoCondition;
    node.op = core::ConditionOp::kModeIs;
    node.b = *mode == "automatic" ? 1 : 0;
    return add_node(node, "mode " + *mode, path);
  }
  // power_unit
  check_keys(c, path, {"power_unit"});
  const auto state = read_string(c, path, "power_unit", sk("power_unit"));
  if (!state) return core::kNoCondition;
  if (!cfg_.power_unit.present) {
    fail(child(path, "power_unit"), "the machine file has no power_unit section",
         "Add a power_unit section or remove this condition.");
    return core::kNoCondition;
  }
  node.op = core::ConditionOp::kPowerUnitReady;
  return add_node(node, "power unit ready", path);
}

std::uint16_t Loader::compile_interlock(std::uint8_t index, const std::string& ref_path) {
  auto& row = cfg_.interlocks[index];
  switch (interlock_mark_[index]) {
    case Mark::kDone:
      return row.condition;
    case Mark::kBusy: {
      std::vector<std::string> cycle;
      const std::string name(name_view(row.name));
      auto start = std::find(interlock_stack_.begin(), interlock_stack_.end(), name);
      cycle.assign(start, interlock_stack_.end());
      cycle.push_back(name);
      fail(ref_path, fmt::format("interlock reference cycle: {}", join(cycle, " -> ")),
           "An interlock's condition cannot depend on itself; break the cycle.");
      return core::kNoCondition;
    }
    case Mark::kTodo:
      break;
  }
  interlock_mark_[index] = Mark::kBusy;
  interlock_stack_.emplace_back(name_view(row.name));
  row.condition = read_condition(*interlock_json_[index], interlock_path_[index], "condition");
  interlock_stack_.pop_back();
  interlock_mark_[index] = Mark::kDone;
  return row.condition;
}

// --------------------------------------------------------------- sections --

void Loader::load_timing(const json& doc) {
  static const json kEmpty = json::object();
  const json* t = member(doc, "", "timing");
  if (t != nullptr && !expect_object(*t, "/timing")) return;
  const json& timing = t != nullptr ? *t : kEmpty;
  const std::string path = "/timing";
  check_keys(timing, path, {"scan_period_us", "watchdog_ms", "max_digital_age_ms", "input_fault_stop_category",
                            "supervision_stop_category"});
  auto& s = cfg_.safety;
  const auto scan = read_number(timing, path, "scan_period_us");
  s.scan_period_us = scan ? static_cast<std::uint32_t>(*scan) : 1000u;
  s.watchdog_us = read_ms_as_us(timing, path, "watchdog_ms");
  s.max_digital_age_us = read_ms_as_us(timing, path, "max_digital_age_ms");
  if (const auto cat = read_number(timing, path, "input_fault_stop_category")) {
    s.input_fault_category = static_cast<core::StopCategory>(static_cast<int>(*cat));
  }
  if (const auto cat = read_number(timing, path, "supervision_stop_category")) {
    s.supervision_category = static_cast<core::StopCategory>(static_cast<int>(*cat));
  }
  if (scan && s.watchdog_us != 0 && s.watchdog_us < 2u * s.scan_period_us) {
    fail(path + "/watchdog_ms",
         fmt::format("watchdog ({} ms) must be at least two scan periods ({} us each)", s.watchdog_us / 1000,
                     s.scan_period_us),
         "Raise watchdog_ms or shorten scan_period_us.");
  }
}

// A list of plain named I/O points ({"name", "description"}): names into
// `names`, indices into `index`; returns the count (capped at `capacity`).
std::uint8_t Loader::load_point_names(const json& section, const std::string& section_path, const char* key,
                                      std::size_t capacity, const char* capacity_name, const char* what,
                                      core::Name* names, NameIndex& index) {
  const json* list = member(section, section_path, key);
  const std::string path = section_path + "/" + key;
  if (list == nullptr || !expect_array(*list, path)) return 0;
  const std::size_t n = capped(list->size(), capacity, capacity_name, path, what);
  for (std::size_t i = 0; i < n; ++i) {
    const std::string p = child(path, i);
    const json& item = (*list)[i];
    if (!expect_object(item, p)) continue;
    check_keys(item, p, {"name", "description"});
    read_string(item, p, "description");
    const std::string name = read_name(item, p);
    set_name(names[i], name);
    if (claim_name(io_names_, name, p, "I/O point")) index[name] = static_cast<std::uint8_t>(i);
  }
  return static_cast<std::uint8_t>(n);
}

void Loader::load_inputs(const json& doc) {
  const json* in = member(doc, "", "inputs");
  if (in == nullptr) {
    missing("", "inputs", "the digital and analog inputs.");
    return;
  }
  if (!expect_object(*in, "/inputs")) return;
  check_keys(*in, "/inputs", {"digital", "analog"});
  cfg_.digital_input_count = load_point_names(*in, "/inputs", "digital", core::kMaxDigitalInputs,
                                              "kMaxDigitalInputs", "digital inputs", cfg_.digital_inputs.data(),
                                              digital_);
  if (const json* list = member(*in, "/inputs", "analog"); list != nullptr && expect_array(*list, "/inputs/analog")) {
    const std::string path = "/inputs/analog";
    const std::size_t n = capped(list->size(), core::kMaxAnalogInputs, "kMaxAnalogInputs", path, "analog inputs");
    for (std::size_t i = 0; i < n; ++i) {
      const std::string p = child(path, i);
      const json& item = (*list)[i];
      if (!expect_object(item, p)) continue;
      auto& ai = cfg_.analog_inputs[i];
      check_keys(item, p, {"name", "description", "unit", "signal", "range", "max_age_ms"});
      read_string(item, p, "description");
      const std::string name = read_name(item, p);
      set_name(ai.name, name);
      if (claim_name(io_names_, name, p, "I/O point")) analog_[name] = static_cast<std::uint8_t>(i);
      if (const auto unit = read_string(item, p, "unit")) {
        if (unit->size() > core::kMaxNameLength) {
          fail(child(p, "unit"), fmt::format("unit '{}' is longer than {} characters", printable(*unit), core::kMaxNameLength),
               "Shorten the unit.");
        }
        set_name(ai.unit, *unit);
      }
      if (const auto signal = read_string(item, p, "signal")) {
        ai.signal = *signal == "4-20mA" ? core::AnalogSignal::kCurrent4To20 : core::AnalogSignal::kEngineering;
      }
      ai.max_age_us = read_ms_as_us(item, p, "max_age_ms");
      const json* range = member(item, p, "range");
      const std::string rp = child(p, "range");
      if (range == nullptr) {
        missing(p, "range", "[value at 4 mA, value at 20 mA] in the input's unit.");
      } else if (!range->is_array() || range->size() != 2 || !(*range)[0].is_number() || !(*range)[1].is_number()) {
        fail(rp, fmt::format("must be a list of two numbers [low, high] (got {})", got(*range)),
             "Write e.g. [0, 250].");
      } else {
        const double low = (*range)[0].get<double>();
        const double high = (*range)[1].get<double>();
        // Scaled in single precision on the target: keep far from overflow.
        constexpr double kRangeLimit = 1e9;
        if (!(std::fabs(low) <= kRangeLimit && std::fabs(high) <= kRangeLimit)) {
          fail(rp, fmt::format("range ends must lie within +-{} (got {} to {})", number_text(kRangeLimit),
                               number_text(low), number_text(high)),
               "Use a unit that keeps the numbers moderate (e.g. bar instead of Pa).");
        } else if (low == high) {
          fail(rp, fmt::format("range is empty ({} to {})", number_text(low), number_text(high)),
               "The two ends must differ.");
        }
        ai.range_min = static_cast<float>(low);
        ai.range_max = static_cast<float>(high);
      }
    }
    cfg_.analog_input_count = static_cast<std::uint8_t>(n);
  }
}

void Loader::load_outputs(const json& doc) {
  const json* out = member(doc, "", "outputs");
  if (out == nullptr) {
    missing("", "outputs", "the coil and proportional outputs.");
    return;
  }
  if (!expect_object(*out, "/outputs")) return;
  check_keys(*out, "/outputs", {"coils", "proportional"});
  cfg_.coil_count = load_point_names(*out, "/outputs", "coils", core::kMaxCoils, "kMaxCoils", "coils",
                                     cfg_.coils.data(), coils_);
  if (const json* list = member(*out, "/outputs", "proportional");
      list != nullptr && expect_array(*list, "/outputs/proportional")) {
    const std::string path = "/outputs/proportional";
    const std::size_t n = capped(list->size(), core::kMaxPropOutputs, "kMaxPropOutputs", path, "proportional outputs");
    for (std::size_t i = 0; i < n; ++i) {
      const std::string p = child(path, i);
      const json& item = (*list)[i];
      if (!expect_object(item, p)) continue;
      check_keys(item, p, {"name", "description", "unit"});
      read_string(item, p, "description");
      const std::string name = read_name(item, p);
      set_name(cfg_.prop_outputs[i].name, name);
      if (claim_name(io_names_, name, p, "I/O point")) props_[name] = static_cast<std::uint8_t>(i);
      if (const auto unit = read_string(item, p, "unit")) {
        cfg_.prop_outputs[i].unit = *unit == "mA" ? core::PropUnit::kMilliamp : core::PropUnit::kPercent;
      }
    }
    cfg_.prop_output_count = static_cast<std::uint8_t>(n);
  }
}

void Loader::load_two_hand(const json& doc) {
  const json* list = member(doc, "", "two_hand");
  if (list == nullptr || !expect_array(*list, "/two_hand")) return;
  const std::string path = "/two_hand";
  const std::size_t n = capped(list->size(), core::kMaxTwoHandDevices, "kMaxTwoHandDevices", path, "two-hand devices");
  std::map<std::string, std::string> names;
  for (std::size_t i = 0; i < n; ++i) {
    const std::string p = child(path, i);
    const json& item = (*list)[i];
    if (!expect_object(item, p)) continue;
    auto& th = cfg_.two_hand[i];
    check_keys(item, p, {"name", "description", "left", "right", "max_sync_ms", "release_holds"});
    read_string(item, p, "description");
    const std::string name = read_name(item, p);
    set_name(th.name, name);
    if (claim_name(names, name, p, "two-hand device")) two_hands_[name] = static_cast<std::uint8_t>(i);
    th.left_input = read_ref(item, p, "left");
    th.right_input = read_ref(item, p, "right");
    th.max_sync_us = read_ms_as_us(item, p, "max_sync_ms");
    if (th.left_input != core::kNoIndex8 && th.left_input == th.right_input) {
      fail(child(p, "right"), "left and right are the same input",
           "A two-hand device needs two separate buttons on two inputs.");
    }
  }
  cfg_.two_hand_count = static_cast<std::uint8_t>(n);
}

void Loader::prepass_names(const json& doc) {
  // Functions, steps and interlocks can be named in conditions before their
  // own section is loaded, so their names are collected first.
  if (const json* list = member(doc, "", "functions"); list != nullptr && list->is_array()) {
    const std::size_t n = std::min(list->size(), core::kMaxFunctions);
    std::map<std::string, std::string> names;
    for (std::size_t i = 0; i < n; ++i) {
      const std::string p = child("/functions", i);
      const json& item = (*list)[i];
      if (!item.is_object()) continue;
      const std::string name = read_name(item, p);
      if (name == "all" || name == "pump") {
        fail(child(p, "name"), fmt::format("'{}' is reserved for interlock guards", name), "Choose another name.");
        continue;
      }
      set_name(cfg_.functions[i].name, name);
      if (claim_name(names, name, p, "function")) functions_[name] = static_cast<std::uint8_t>(i);
    }
  }
  if (const json* seq = member(doc, "", "sequence"); seq != nullptr && seq->is_object()) {
    if (const json* list = member(*seq, "/sequence", "steps"); list != nullptr && list->is_array()) {
      steps_json_ = list;
      const std::size_t n = std::min(list->size(), core::kMaxSteps);
      std::map<std::string, std::string> names;
      for (std::size_t i = 0; i < n; ++i) {
        const std::string p = child("/sequence/steps", i);
        const json& item = (*list)[i];
        if (!item.is_object()) continue;
        const std::string name = read_name(item, p);
        set_name(cfg_.steps[i].name, name);
        if (claim_name(names, name, p, "step")) steps_[name] = static_cast<std::uint8_t>(i);
      }
    }
  }
  if (const json* list = member(doc, "", "interlocks"); list != nullptr && list->is_array()) {
    const std::size_t n = std::min(list->size(), core::kMaxInterlocks);
    std::map<std::string, std::string> names;
    for (std::size_t i = 0; i < n; ++i) {
      const std::string p = child("/interlocks", i);
      const json& item = (*list)[i];
      interlock_json_.push_back(&item);
      interlock_path_.push_back(p);
      // An interlock whose object is malformed is marked done so that a
      // reference to it does not compile garbage; its own pass reports it.
      interlock_mark_.push_back(item.is_object() ? Mark::kTodo : Mark::kDone);
      if (!item.is_object()) continue;
      const std::string name = read_name(item, p);
      set_name(cfg_.interlocks[i].name, name);
      if (claim_name(names, name, p, "interlock")) interlocks_[name] = static_cast<std::uint8_t>(i);
    }
  }
}

void Loader::load_valve(const json& v, const std::string& path, core::FunctionConfig& fc, const std::string& fname) {
  const auto kind_text = read_string(v, path, "kind");
  const core::ValveKindRow* info = kind_text ? valve_kind_named(*kind_text) : nullptr;
  if (info == nullptr) {
    check_keys(v, path, kValveAllKeys);
    return;
  }
  fc.valve = info->kind;
  const bool proportional = info->meters;
  const std::vector<std::string_view> own_keys = valve_keys_of(*info);
  // Fields: common ones, the kind's own, and a clear word for the others.
  std::vector<std::string> known(kValveAllKeys.begin(), kValveAllKeys.end());
  for (const auto& item : v.items()) {
    const std::string& key = item.key();
    const bool common = std::find(kValveCommonKeys.begin(), kValveCommonKeys.end(), key) != kValveCommonKeys.end();
    const bool own = std::find(own_keys.begin(), own_keys.end(), key) != own_keys.end();
    if (common || own) continue;
    const bool elsewhere = std::find(kValveAllKeys.begin(), kValveAllKeys.end(), key) != kValveAllKeys.end();
    if (!elsewhere) {
      unknown_key(path, key, known);
    } else if (key == "centre") {
      fail(child(path, key), fmt::format("a 4/2 valve has no centre position ('{}' is {})", fname, info->key),
           "Remove 'centre'; only 4/3 valves have one.");
    } else if (key == "coil_retract") {
      fail(child(path, key), "a 4/2 spring-return valve has one solenoid; the spring gives the retract position",
           "Remove 'coil_retract', or use solenoid_4_2_detented for a double-solenoid 4/2 valve.");
    } else {
      fail(child(path, key), fmt::format("'{}' does not apply to valve kind {}", key, info->key),
           fmt::format("Remove it; a {} valve takes: {}.", info->key,
                       join(std::vector<std::string>(own_keys.begin(), own_keys.end()), ", ")));
    }
  }
  read_string(v, path, "description");
  const std::string owner = fmt::format("function '{}'", fname);

  if (info->has_centre) {
    if (const auto centre = read_string(v, path, "centre")) {
      fc.centre = centre_of(*centre);
    } else if (!v.contains("centre")) {
      std::string centres;
      for (std::size_t i = 1; i < core::kCentreCount; ++i) {
        centres += std::string(i == 1 ? "" : i + 1 == core::kCentreCount ? " or " : ", ") + core::kCentres[i].key;
      }
      missing(path, "centre", "the flow paths of the 4/3 spool in its centre position (" + centres + ").");
    }
  } else {
    fc.centre = core::ValveCentre::kNotApplicable;
  }

  auto need = [&](const char* key, const char* what) {
    if (!v.contains(key)) missing(path, key, fmt::format("a {} valve needs {}.", info->key, what));
  };
  auto coil = [&](const char* key) {
    const std::uint8_t index = read_ref(v, path, key);
    claim_output(coil_owner_, index, RefKind::kCoil, child(path, key), owner);
    return index;
  };
  auto channel = [&](const char* key, core::PropUnit unit) {
    const std::uint8_t index = read_ref(v, path, key);
    if (index != core::kNoIndex8 && cfg_.prop_outputs[index].unit != unit) {
      fail(child(path, key),
           fmt::format("channel '{}' is declared in {}; a {} valve needs a {} channel",
                       name_view(cfg_.prop_outputs[index].name),
                       unit == core::PropUnit::kMilliamp ? "percent" : "mA", info->key,
                       unit == core::PropUnit::kMilliamp ? "mA" : "percent"),
           "Fix the channel's unit under /outputs/proportional or pick another channel.");
    }
    claim_output(prop_owner_, index, RefKind::kProp, child(path, key), owner);
    return index;
  };
  auto current = [&](const char* key, core::SolenoidCurrent& out) {
    const json* j = member(v, path, key);
    const std::string p = child(path, key);
    if (j == nullptr || !expect_object(*j, p)) return;
    check_keys(*j, p, {"crack", "max"});
    const auto crack = read_number(*j, p, "crack");
    const auto max = read_number(*j, p, "max");
    if (crack && max && *crack >= *max) {
      fail(child(p, "crack"),
           fmt::format("crack current ({} mA) must be below max current ({} mA)", number_text(*crack), number_text(*max)),
           "The spool opens between crack and max; take both from the valve data sheet.");
    }
    out.crack_ma = static_cast<float>(crack.value_or(0.0));
    out.max_ma = static_cast<float>(max.value_or(0.0));
  };

  const auto drives = [&](std::uint8_t bits) { return (info->outputs & bits) != 0; };
  if (drives(core::kDrivesCoilExtend)) need("coil_extend", "a coil_extend (P->A)");
  if (drives(core::kDrivesCoilRetract)) need("coil_retract", "a coil_retract (P->B)");
  if (drives(core::kDrivesCurrentExtend)) need("channel_extend", "a channel_extend (mA, P->A)");
  if (drives(core::kDrivesCurrentRetract)) need("channel_retract", "a channel_retract (mA, P->B)");
  if (drives(core::kDrivesCurrentExtend)) need("current_extend_ma", "current_extend_ma {\"crack\": ..., \"max\": ...}");
  if (drives(core::kDrivesCurrentRetract)) need("current_retract_ma", "current_retract_ma {\"crack\": ..., \"max\": ...}");
  if (drives(core::kDrivesSignedCommand)) need("channel", "a channel (percent, signed)");
  if (drives(core::kDrivesCoilExtend)) fc.coil_extend = coil("coil_extend");
  if (drives(core::kDrivesCoilRetract)) fc.coil_retract = coil("coil_retract");
  if (info->detented) fc.detent_pulse_us = read_ms_as_us(v, path, "detent_pulse_ms");
  if (drives(core::kDrivesCurrentExtend)) fc.prop_extend = channel("channel_extend", core::PropUnit::kMilliamp);
  if (drives(core::kDrivesCurrentRetract)) fc.prop_retract = channel("channel_retract", core::PropUnit::kMilliamp);
  if (drives(core::kDrivesCurrentExtend)) current("current_extend_ma", fc.current_extend);
  if (drives(core::kDrivesCurrentRetract)) current("current_retract_ma", fc.current_retract);
  if (drives(core::kDrivesSignedCommand)) {
    fc.prop_extend = channel("channel", core::PropUnit::kPercent);
    if (const auto jump = read_number(v, path, "deadband_jump_percent")) fc.deadband_jump_percent = static_cast<float>(*jump);
  }
  if (proportional) {
    if (const json* d = member(v, path, "dither"); d != nullptr && expect_object(*d, child(path, "dither"))) {
      const std::string p = child(path, "dither");
      check_keys(*d, p, {"amplitude_ma", "frequency_hz"});
      fc.dither_amplitude_ma = static_cast<float>(read_number(*d, p, "amplitude_ma").value_or(0.0));
      fc.dither_frequency_hz = static_cast<float>(read_number(*d, p, "frequency_hz").value_or(0.0));
    }
  }
  if (v.contains("enable")) {
    fc.enable_coil = coil("enable");
  }
}

void Loader::load_function(const json& f, const std::string& path, std::uint8_t index) {
  auto& fc = cfg_.functions[index];
  const std::string fname(name_view(fc.name));
  check_keys(f, path, {"name", "description", "valve", "extended_end", "retracted_end", "position", "slowdown",
                       "reversal_dwell_ms", "quick_stop_ms", "jog", "ramps"});
  read_string(f, path, "description");
  const json* v = member(f, path, "valve");
  bool known_kind = false;
  if (v == nullptr) {
    missing(path, "valve", "the directional valve: {\"kind\": ..., ...}.");
  } else if (expect_object(*v, child(path, "valve"))) {
    load_valve(*v, child(path, "valve"), fc, fname);
    known_kind = v->contains("kind") && v->at("kind").is_string() &&
                 valve_kind_named(v->at("kind").get<std::string>()) != nullptr;
  }
  const bool proportional = known_kind && core::is_proportional(fc.valve);
  kind_known_[index] = known_kind;

  fc.extended_end_input = member(f, path, "extended_end") ? read_ref(f, path, "extended_end") : core::kNoIndex8;
  fc.retracted_end_input = member(f, path, "retracted_end") ? read_ref(f, path, "retracted_end") : core::kNoIndex8;
  if (const json* pos = member(f, path, "position"); pos != nullptr && expect_object(*pos, child(path, "position"))) {
    const std::string p = child(path, "position");
    check_keys(*pos, p, {"input", "extend_limit", "retract_limit", "release_band"});
    fc.position_input = read_ref(*pos, p, "input");
    const auto extend = read_number(*pos, p, "extend_limit");
    const auto retract = read_number(*pos, p, "retract_limit");
    if (extend && retract) {
      fc.extend_limit = static_cast<float>(*extend);
      fc.retract_limit = static_cast<float>(*retract);
      if (*retract >= *extend) {
        fail(child(p, "retract_limit"),
             fmt::format("retract_limit ({}) must be below extend_limit ({})", number_text(*retract), number_text(*extend)),
             "Extending moves towards the extend limit, retracting towards the retract limit.");
      } else if (fc.position_input != core::kNoIndex8) {
        const auto& ai = cfg_.analog_inputs[fc.position_input];
        const double low = std::min(ai.range_min, ai.range_max);
        const double high = std::max(ai.range_min, ai.range_max);
        for (const auto& [key, value] : {std::pair{"extend_limit", *extend}, std::pair{"retract_limit", *retract}}) {
          if (value < low || value > high) {
            fail(child(p, key),
                 fmt::format("{} {} is outside the range of '{}' ({} to {} {})", key, number_text(value),
                             name_view(ai.name), number_text(low), number_text(high), name_view(ai.unit)),
                 "The position input can never reach it; fix the limit or the input's range.");
          }
        }
        // Default: 1 % of the input's range (see FunctionConfig::limit_release_band).
        const auto band = read_number(*pos, p, "release_band");
        fc.limit_release_band = static_cast<float>(band ? *band : 0.01 * (high - low));
        if (band && *band >= *extend - *retract) {
          fail(child(p, "release_band"),
               fmt::format("release_band ({}) must be less than the distance between the limits ({})", number_text(*band),
                           number_text(*extend - *retract)),
               "A limit is left once the position is back inside the window by the band.");
        }
      }
    }
  }
  if (const json* slow = member(f, path, "slowdown"); slow != nullptr && expect_object(*slow, child(path, "slowdown"))) {
    const std::string p = child(path, "slowdown");
    check_keys(*slow, p, {"description", "extend_zone", "retract_zone", "extend_input", "retract_input", "speed_percent"});
    read_string(*slow, p, "description");
    if (known_kind && !proportional) {
      fail(p, "applies to proportional valves only", "A solenoid valve shifts fully and cannot creep: remove 'slowdown'.");
    }
    fc.extend_slowdown = static_cast<float>(read_number(*slow, p, "extend_zone").value_or(0.0));
    fc.retract_slowdown = static_cast<float>(read_number(*slow, p, "retract_zone").value_or(0.0));
    if (member(*slow, p, "extend_input")) fc.extend_slowdown_input = read_ref(*slow, p, "extend_input");
    if (member(*slow, p, "retract_input")) fc.retract_slowdown_input = read_ref(*slow, p, "retract_input");
    fc.slowdown_speed_percent = static_cast<float>(read_number(*slow, p, "speed_percent").value_or(0.0));
    const double window = static_cast<double>(fc.extend_limit) - static_cast<double>(fc.retract_limit);
    for (const char* key : {"extend_zone", "retract_zone"}) {
      if (!slow->contains(key)) continue;
      if (fc.position_input == core::kNoIndex8) {
        fail(child(p, key), "a slow-down zone needs the function's position transmitter",
             "Add \"position\": {\"input\": ...}, or use a slow-down switch (extend_input, retract_input).");
      } else if (const auto zone = read_number(*slow, p, key); zone && window > 0.0 && *zone >= window) {
        fail(child(p, key), fmt::format("{} ({}) must be less than the distance between the limits ({})", key,
                                        number_text(*zone), number_text(window)),
             "The zone is measured from the limit the motion approaches.");
      }
    }
  }
  fc.reversal_dwell_us = read_ms_as_us(f, path, "reversal_dwell_ms");

  auto proportional_only = [&](const std::string& field) {
    fail(field, "applies to proportional valves only",
         "Solenoid valves shift fully: remove it, or use a proportional valve kind.");
  };
  if (proportional) {
    fc.quick_stop_us = read_ms_as_us(f, path, "quick_stop_ms");
  } else if (known_kind && f.contains("quick_stop_ms")) {
    proportional_only(child(path, "quick_stop_ms"));
  }

  if (const json* jog = member(f, path, "jog"); jog != nullptr && expect_object(*jog, child(path, "jog"))) {
    const std::string p = child(path, "jog");
    check_keys(*jog, p, {"extend", "retract", "speed_percent"});
    fc.jog_extend = read_condition(*jog, p, "extend");
    fc.jog_retract = read_condition(*jog, p, "retract");
    if (proportional) {
      fc.jog_speed_percent = static_cast<float>(read_number(*jog, p, "speed_percent").value_or(0.0));
    } else if (known_kind && jog->contains("speed_percent")) {
      proportional_only(child(p, "speed_percent"));
    }
  } else if (proportional) {
    fc.jog_speed_percent = static_cast<float>(std::stod(std::string(spec("", "/functions/*/jog/speed_percent").default_value)));
  }
  if (!proportional) fc.jog_speed_percent = 100.0f;

  const json* ramps = member(f, path, "ramps");
  const std::string rp = child(path, "ramps");
  if (known_kind && !proportional && ramps != nullptr) {
    fail(rp, "solenoid valves shift fully and cannot be ramped",
         "Remove 'ramps', or use a proportional valve kind for a metered motion.");
  } else if (proportional && (ramps == nullptr || (ramps->is_array() && ramps->empty()))) {
    fail(ramps == nullptr ? path : rp, "a proportional function needs at least one ramp (ramp 0 is the default)",
         "Add \"ramps\": [{\"name\": \"normal\", ...}].");
  } else if (proportional && expect_array(*ramps, rp)) {
    const std::size_t n = capped(ramps->size(), core::kMaxRampsPerFunction, "kMaxRampsPerFunction", rp, "ramps");
    std::map<std::string, std::string> names;
    for (std::size_t i = 0; i < n; ++i) {
      const std::string p = child(rp, i);
      const json& r = (*ramps)[i];
      if (!expect_object(r, p)) continue;
      auto& rc = fc.ramps[i];
      check_keys(r, p, {"name", "description", "profile", "extend_accel_ms", "extend_decel_ms", "retract_accel_ms",
                        "retract_decel_ms", "jerk_ms"});
      read_string(r, p, "description");
      const std::string name = read_name(r, p);
      set_name(rc.name, name);
      if (claim_name(names, name, p, "ramp")) ramp_names_[index][name] = static_cast<std::uint8_t>(i);
      const auto profile = read_string(r, p, "profile");
      rc.profile = profile && *profile == "s_curve" ? core::RampProfile::kSCurve : core::RampProfile::kLinear;
      rc.extend_accel_us = read_ms_as_us(r, p, "extend_accel_ms");
      rc.extend_decel_us = read_ms_as_us(r, p, "extend_decel_ms");
      rc.retract_accel_us = read_ms_as_us(r, p, "retract_accel_ms");
      rc.retract_decel_us = read_ms_as_us(r, p, "retract_decel_ms");
      if (rc.profile == core::RampProfile::kSCurve) {
        rc.jerk_us = read_ms_as_us(r, p, "jerk_ms");
      } else if (r.contains("jerk_ms")) {
        fail(child(p, "jerk_ms"), "jerk_ms applies to s_curve ramps only",
             "Remove it, or set \"profile\": \"s_curve\".");
      }
    }
    fc.ramp_count = static_cast<std::uint8_t>(n);
  }
}

std::uint32_t Loader::read_guards(const json& obj, const std::string& path) {
  const json* list = member(obj, path, "guards");
  const std::string gp = child(path, "guards");
  if (list == nullptr) {
    missing(path, "guards", std::string(spec(gp, "").description));
    return 0;
  }
  if (!expect_array(*list, gp)) return 0;
  if (list->empty()) {
    fail(gp, "an interlock must guard something", "List the motions it stops, e.g. [\"press.extend\"], or \"all\".");
    return 0;
  }
  return read_motion_list(*list, gp, true);
}

std::uint32_t Loader::read_motion_list(const json& list, const std::string& gp, bool pump_allowed) {
  std::uint32_t mask = 0;
  for (std::size_t i = 0; i < list.size(); ++i) {
    const json& g = list[i];
    const std::string p = child(gp, i);
    if (!g.is_string()) {
      fail(p, fmt::format("must be a string (got {})", got_typed(g)), "Write the motion in double quotes.");
      continue;
    }
    const std::string text = g.get<std::string>();
    if (text == "all") {
      for (std::uint8_t f = 0; f < cfg_.function_count; ++f) {
        mask |= core::motion_bit(f, core::Direction::kExtend) | core::motion_bit(f, core::Direction::kRetract);
      }
      if (pump_allowed && cfg_.power_unit.present) mask |= core::kPowerUnitGuardBit;
      continue;
    }
    if (text == "pump") {
      if (!pump_allowed) {
        fail(p, "'pump' is not a motion here", "List motions only: 'f.extend', 'f.retract', 'f' or 'all'.");
      } else if (!cfg_.power_unit.present) {
        fail(p, "guard 'pump' but the machine file has no power_unit", "Add a power_unit section or remove the guard.");
      }
      mask |= pump_allowed ? core::kPowerUnitGuardBit : 0u;
      continue;
    }
    const std::size_t dot = text.find('.');
    const std::string fname = text.substr(0, dot);
    const std::uint8_t f = resolve(RefKind::kFunction, fname, p);
    if (f == core::kNoIndex8) continue;
    if (dot == std::string::npos) {
      mask |= core::motion_bit(f, core::Direction::kExtend) | core::motion_bit(f, core::Direction::kRetract);
      continue;
    }
    const std::string motion = text.substr(dot + 1);
    if (motion == "extend") {
      mask |= core::motion_bit(f, core::Direction::kExtend);
    } else if (motion == "retract") {
      mask |= core::motion_bit(f, core::Direction::kRetract);
    } else {
      fail(p, fmt::format("unknown motion '{}' in '{}'", motion, text),
           fmt::format("Write '{0}.extend', '{0}.retract' or '{0}' for both.", fname));
    }
  }
  return mask;
}

void Loader::load_two_hand_holds(const json& doc) {
  const json* list = member(doc, "", "two_hand");
  if (list == nullptr || !list->is_array()) return;
  for (std::size_t i = 0; i < cfg_.two_hand_count; ++i) {
    const json& item = (*list)[i];
    if (!item.is_object() || !item.contains("release_holds")) continue;  // default: every motion
    const std::string p = child(child("/two_hand", i), "release_holds");
    const json& holds = item.at("release_holds");
    if (!expect_array(holds, p)) continue;
    cfg_.two_hand[i].release_holds = read_motion_list(holds, p, false);
  }
}

void Loader::load_power_unit(const json& doc) {
  const json* pu = member(doc, "", "power_unit");
  if (pu == nullptr || !expect_object(*pu, "/power_unit")) return;
  const std::string path = "/power_unit";
  check_keys(*pu, path, {"description", "motor", "dump_valve", "unloaded_start_ms", "pressure_ready",
                         "pressure_ready_timeout_ms", "start", "stop"});
  read_string(*pu, path, "description");
  auto& p = cfg_.power_unit;
  p.present = true;
  p.motor_coil = read_ref(*pu, path, "motor");
  claim_output(coil_owner_, p.motor_coil, RefKind::kCoil, path + "/motor", "the power unit");
  if (pu->contains("dump_valve")) {
    p.dump_coil = read_ref(*pu, path, "dump_valve");
    claim_output(coil_owner_, p.dump_coil, RefKind::kCoil, path + "/dump_valve", "the power unit");
  }
  p.unloaded_start_us = read_ms_as_us(*pu, path, "unloaded_start_ms");
  p.pressure_ready_timeout_us = read_ms_as_us(*pu, path, "pressure_ready_timeout_ms");
}

void Loader::load_operator(const json& doc) {
  const json* op = member(doc, "", "operator");
  if (op == nullptr) {
    missing("", "operator", "the operator controls, at least \"emergency_stop\".");
    return;
  }
  if (!expect_object(*op, "/operator")) return;
  const std::string path = "/operator";
  check_keys(*op, path, {"emergency_stop", "emergency_stop_category", "reset", "cycle_start", "cycle_stop",
                         "auto_mode", "continuous", "stop", "soft_commands"});
  auto& o = cfg_.operator_panel;
  o.estop_input = read_ref(*op, path, "emergency_stop");
  if (const auto cat = read_number(*op, path, "emergency_stop_category")) {
    o.estop_category = static_cast<core::StopCategory>(static_cast<int>(*cat));
  }
  o.reset = read_condition(*op, path, "reset");
  o.cycle_start = read_condition(*op, path, "cycle_start");
  o.cycle_stop = read_condition(*op, path, "cycle_stop");
  o.auto_mode = read_condition(*op, path, "auto_mode");
  o.continuous = read_condition(*op, path, "continuous");
  o.stop = read_condition(*op, path, "stop");
  read_soft_commands(*op, path);
}

void Loader::read_soft_commands(const json& op, const std::string& path) {
  if (!op.contains("soft_commands")) return;  // default: none
  const std::string sp = child(path, "soft_commands");
  const json& list = op.at("soft_commands");
  if (!expect_array(list, sp)) return;
  auto& o = cfg_.operator_panel;
  std::string names;
  for (const core::SoftCommandRow& row : core::kSoftCommandTable) names += (names.empty() ? "" : ", ") + std::string(row.name);
  for (std::size_t i = 0; i < list.size(); ++i) {
    const std::string p = child(sp, i);
    if (!list[i].is_string()) {
      fail(p, fmt::format("must be a string (got {})", got_typed(list[i])), "Write the command name in double quotes.");
      continue;
    }
    const std::string text = list[i].get<std::string>();
    const core::SoftCommandRow* found = nullptr;
    for (const core::SoftCommandRow& row : core::kSoftCommandTable) {
      if (text == row.name) found = &row;
    }
    if (found == nullptr) {
      fail(p, fmt::format("unknown soft command '{}'", text), fmt::format("Soft commands: {}.", names));
      continue;
    }
    // A soft command never replaces a control the file requires from a
    // physical device (validate_config refuses these too).
    if (found->command == core::SoftCommand::kCycleStart &&
        core::two_hand_devices_read_by(cfg_, o.cycle_start) != 0) {
      fail(p, "a soft cycle_start would replace the two-hand start that operator.cycle_start requires",
           "Remove it: a two-hand start must come from the hands on the device (ISO 13851).");
      continue;
    }
    if (found->command == core::SoftCommand::kSelectAuto && o.auto_mode != core::kNoCondition) {
      fail(p, "a soft select_auto would override the mode selector that operator.auto_mode names",
           "Remove it, or remove operator.auto_mode if the mode is chosen on the HMI only.");
      continue;
    }
    o.soft_commands = static_cast<std::uint16_t>(o.soft_commands | core::soft_command_bit(found->command));
  }
}

void Loader::load_interlocks(const json& doc) {
  const json* list = member(doc, "", "interlocks");
  if (list == nullptr || !expect_array(*list, "/interlocks")) return;
  const std::size_t n = capped(list->size(), core::kMaxInterlocks, "kMaxInterlocks", "/interlocks", "interlocks");
  cfg_.interlock_count = static_cast<std::uint8_t>(n);
  for (std::size_t i = 0; i < n; ++i) {
    const std::string p = child("/interlocks", i);
    const json& item = (*list)[i];
    if (!expect_object(item, p)) continue;
    auto& il = cfg_.interlocks[i];
    check_keys(item, p, {"name", "description", "kind", "stop_category", "condition", "guards"});
    read_string(item, p, "description");
    if (const auto kind = read_string(item, p, "kind")) {
      il.kind = *kind == "trip" ? core::InterlockKind::kTrip : core::InterlockKind::kPermissive;
    }
    if (const auto cat = read_number(item, p, "stop_category")) {
      il.stop_category = static_cast<core::StopCategory>(static_cast<int>(*cat));
    }
    il.guards = read_guards(item, p);
    compile_interlock(static_cast<std::uint8_t>(i), p);
  }
}

void Loader::load_sequence(const json& doc) {
  const json* seq = member(doc, "", "sequence");
  if (seq == nullptr || !expect_object(*seq, "/sequence")) return;
  const std::string path = "/sequence";
  check_keys(*seq, path, {"initial_step", "steps", "transitions"});
  const json* steps = member(*seq, path, "steps");
  const std::string sp = "/sequence/steps";
  if (steps == nullptr) {
    missing(path, "steps", "the list of steps; the first is the initial step.");
    return;
  }
  if (!expect_array(*steps, sp)) return;
  if (steps->empty()) {
    fail(sp, "a sequence needs at least one step", "Add steps, or remove the sequence section for a manual-only machine.");
    return;
  }
  const std::size_t n = capped(steps->size(), core::kMaxSteps, "kMaxSteps", sp, "steps");
  cfg_.step_count = static_cast<std::uint8_t>(n);
  if (seq->contains("initial_step")) {
    const std::uint8_t initial = read_ref(*seq, path, "initial_step");
    if (initial != core::kNoIndex8 && initial != 0) {
      fail(path + "/initial_step",
           fmt::format("the initial step must be the first step ('{}'), not '{}'", name_view(cfg_.steps[0].name),
                       name_view(cfg_.steps[initial].name)),
           "Move the initial step to the top of the step list.");
    }
  }
  for (std::size_t i = 0; i < n; ++i) {
    const std::string p = child(sp, i);
    const json& item = (*steps)[i];
    if (!expect_object(item, p)) continue;
    auto& st = cfg_.steps[i];
    check_keys(item, p, {"name", "description", "actions", "min_time_ms", "supervision_ms"});
    read_string(item, p, "description");
    st.min_time_us = read_ms_as_us(item, p, "min_time_ms");
    st.supervision_us = read_ms_as_us(item, p, "supervision_ms");
    if (st.supervision_us != 0 && st.min_time_us >= st.supervision_us) {
      fail(child(p, "supervision_ms"),
           fmt::format("supervision time ({} ms) must be longer than min_time_ms ({} ms)", st.supervision_us / 1000,
                       st.min_time_us / 1000),
           "Otherwise the step always faults before it may leave.");
    }
    const json* actions = member(item, p, "actions");
    if (actions == nullptr || !expect_array(*actions, child(p, "actions"))) continue;
    const std::string ap = child(p, "actions");
    const std::size_t na = capped(actions->size(), core::kMaxActionsPerStep, "kMaxActionsPerStep", ap, "actions in one step");
    std::set<std::uint8_t> moved;
    for (std::size_t k = 0; k < na; ++k) {
      const std::string q = child(ap, k);
      const json& a = (*actions)[k];
      if (!expect_object(a, q)) continue;
      auto& act = st.actions[k];
      check_keys(a, q, {"function", "direction", "speed_percent", "ramp"});
      const std::uint8_t f = read_ref(a, q, "function");
      if (const auto dir = read_string(a, q, "direction")) {
        act.direction = *dir == "extend" ? core::Direction::kExtend : core::Direction::kRetract;
      }
      if (f == core::kNoIndex8) continue;
      act.function = f;
      if (!moved.insert(f).second) {
        fail(child(q, "function"), fmt::format("function '{}' already has an action in this step", name_view(cfg_.functions[f].name)),
             "One action per function and step.");
      }
      const auto& fc = cfg_.functions[f];
      if (f >= kind_known_.size() || !kind_known_[f]) continue;  // the valve's own error says enough
      if (!core::is_proportional(fc.valve)) {
        if (a.contains("ramp")) {
          fail(child(q, "ramp"), fmt::format("'{}' has a solenoid valve: solenoid valves shift fully and cannot be ramped", name_view(fc.name)),
               "Remove 'ramp' from this action.");
        }
        const auto speed = read_number(a, q, "speed_percent");
        if (speed && *speed != 100.0) {
          fail(child(q, "speed_percent"),
               fmt::format("'{}' has a solenoid valve: solenoid valves shift fully, speed_percent must be 100 (got {})",
                           name_view(fc.name), number_text(*speed)),
               "Remove 'speed_percent' or set it to 100.");
        }
        act.speed_percent = 100.0f;
        act.ramp = 0;
        continue;
      }
      if (!a.contains("speed_percent")) {
        missing(q, "speed_percent", fmt::format("'{}' is proportional; give the speed in percent of full valve opening.", name_view(fc.name)));
      }
      act.speed_percent = static_cast<float>(read_number(a, q, "speed_percent").value_or(0.0));
      act.ramp = 0;
      if (a.contains("ramp")) {
        const auto ramp = read_string(a, q, "ramp");
        if (ramp && fc.ramp_count > 0) {  // no ramps at all is reported at the function
          const auto& names = ramp_names_[f];
          const auto it = names.find(*ramp);
          if (it != names.end()) {
            act.ramp = it->second;
          } else {
            std::vector<std::string> known;
            for (const auto& entry : names) known.push_back(entry.first);
            const auto suggestion = closest(*ramp, known);
            fail(child(q, "ramp"), fmt::format("function '{}' has no ramp '{}'", name_view(fc.name), printable(*ramp)),
                 suggestion ? fmt::format("Did you mean '{}'?", *suggestion)
                            : fmt::format("Its ramps are: {}.", known.empty() ? std::string("none") : join(known, ", ")));
          }
        }
      }
    }
    st.action_count = static_cast<std::uint8_t>(na);
    // A step that moves something and is never timed out can hang with the
    // valves open (a lost end switch, a stalled cylinder): insist on a limit.
    if (na > 0 && !item.contains("supervision_ms")) {
      missing(p, "supervision_ms", "a step with actions moves something; give the longest time it may take (ms).");
    } else if (na > 0 && st.supervision_us == 0 && item.at("supervision_ms").is_number_integer() &&
               item.at("supervision_ms").get<double>() == 0.0) {
      fail(child(p, "supervision_ms"), "a step with actions must be supervised (0 turns supervision off)",
           "Give the longest time the step's motions may take.");
    }
  }

  const json* transitions = member(*seq, path, "transitions");
  const std::string tp = "/sequence/transitions";
  if (transitions == nullptr) {
    missing(path, "transitions", "the transitions between steps.");
    return;
  }
  if (!expect_array(*transitions, tp)) return;
  const std::size_t nt = capped(transitions->size(), core::kMaxTransitions, "kMaxTransitions", tp, "transitions");
  std::vector<bool> has_exit(n, false);
  for (std::size_t i = 0; i < nt; ++i) {
    const std::string p = child(tp, i);
    const json& item = (*transitions)[i];
    if (!expect_object(item, p)) continue;
    auto& tr = cfg_.transitions[i];
    check_keys(item, p, {"from", "to", "condition", "description"});
    read_string(item, p, "description");
    const std::uint8_t from = read_ref(item, p, "from");
    const std::uint8_t to = read_ref(item, p, "to");
    tr.condition = read_condition(item, p, "condition");
    if (from != core::kNoIndex8 && from == to) {
      fail(child(p, "to"), fmt::format("transition from '{}' to itself", name_view(cfg_.steps[from].name)),
           "A transition leads to another step.");
    }
    if (from != core::kNoIndex8) {
      tr.from_step = from;
      has_exit[from] = true;
    }
    if (to != core::kNoIndex8) tr.to_step = to;
  }
  cfg_.transition_count = static_cast<std::uint8_t>(nt);
  for (std::size_t i = 0; i < n; ++i) {
    if (!has_exit[i] && (*steps)[i].is_object() && !name_view(cfg_.steps[i].name).empty()) {
      fail(child(sp, i), fmt::format("step '{}' has no transition out of it", name_view(cfg_.steps[i].name)),
           "Add a transition from it; the sequence would stop there for good.");
    }
  }
}

void Loader::load(const json& doc) {
  if (!expect_object(doc, "")) return;
  check_keys(doc, "", {"format", "machine", "timing", "inputs", "outputs", "power_unit", "operator", "two_hand",
                       "functions", "interlocks", "sequence", "plant"});
  read_string(doc, "", "format");
  if (const json* m = member(doc, "", "machine"); m == nullptr) {
    missing("", "machine", "{\"name\": ..., \"description\": ...}.");
  } else if (expect_object(*m, "/machine")) {
    check_keys(*m, "/machine", {"name", "description"});
    set_name(cfg_.name, read_name(*m, "/machine"));
    read_string(*m, "/machine", "description");
  }
  load_timing(doc);
  load_inputs(doc);
  load_outputs(doc);
  load_two_hand(doc);
  prepass_names(doc);
  // The power unit's presence must be known before any condition names it.
  cfg_.power_unit.present = doc.contains("power_unit") && doc.at("power_unit").is_object();

  const json* functions = member(doc, "", "functions");
  if (functions == nullptr) {
    missing("", "functions", "the list of functions (one per actuator and directional valve).");
  } else if (expect_array(*functions, "/functions")) {
    if (functions->empty()) fail("/functions", "a machine needs at least one function", "Add a function.");
    const std::size_t n = capped(functions->size(), core::kMaxFunctions, "kMaxFunctions", "/functions", "functions");
    cfg_.function_count = static_cast<std::uint8_t>(n);
    ramp_names_.resize(n);
    kind_known_.assign(n, false);
    for (std::size_t i = 0; i < n; ++i) {
      const std::string p = child("/functions", i);
      if (expect_object((*functions)[i], p)) load_function((*functions)[i], p, static_cast<std::uint8_t>(i));
    }
  }
  load_power_unit(doc);
  if (const json* pu = member(doc, "", "power_unit"); pu != nullptr && pu->is_object()) {
    auto& p = cfg_.power_unit;
    p.pressure_ready = read_condition(*pu, "/power_unit", "pressure_ready");
    p.start = read_condition(*pu, "/power_unit", "start");
    p.stop = read_condition(*pu, "/power_unit", "stop");
  }
  load_operator(doc);
  load_two_hand_holds(doc);
  load_interlocks(doc);
  load_sequence(doc);
  for (const auto& check : deferred_) check();
  if (const json* p = member(doc, "", "plant"); p != nullptr && expect_object(*p, "/plant")) plant = *p;
}

}  // namespace

const jsondoc::ReadLimits& machine_file_limits() {
  static const jsondoc::ReadLimits limits{kMaxMachineFileBytes, kMaxMachineFileArrayItems, kMaxMachineFileDepth,
                                          "machine file"};
  return limits;
}

namespace {

LoadResult load_document(jsondoc::ReadResult read, const std::string& display_name) {
  LoadResult result;
  result.errors = std::move(read.diagnostics);
  if (!read.ok()) return result;
  try {
    auto machine = std::make_unique<LoadedMachine>();
    Loader loader(display_name, machine->config);
    loader.load(read.root);
    result.errors.insert(result.errors.end(), loader.errors.begin(), loader.errors.end());
    if (jsondoc::has_error(result.errors)) return result;
    // The core checks the configuration again on its own and has the last
    // word: a configuration it would hold safe from the first scan is bad
    // input for every command, worded the same everywhere.
    const core::Status status = core::validate_config(machine->config);
    if (!status.is_ok()) {
      result.errors.push_back(LoadError{display_name, "", runtime::core_rejection_text(status),
                                        "Fix the machine file; if no error above names the field, please report "
                                        "this with the file (the loader should have named it)."});
    } else {
      machine->plant = std::move(loader.plant);
      machine->source_path = display_name;
      result.machine = std::move(machine);
    }
  } catch (const std::exception& e) {
    result.machine.reset();
    result.errors.push_back(LoadError{display_name, "", std::string("internal error in the machine-file loader: ") + e.what(),
                                      "Please report this with the machine file."});
  }
  return result;
}

}  // namespace

LoadResult load_machine_text(const std::string& text, const std::string& display_name) {
  return load_document(jsondoc::read_text(text, display_name, machine_file_limits()), display_name);
}

LoadResult load_machine_file(const std::string& path) {
  return load_document(jsondoc::read_file(path, machine_file_limits()), path);
}

}  // namespace spoolstep::machine_file
