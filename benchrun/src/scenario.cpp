// Scenario loader. Collects every problem instead of stopping at the first;
// exceptions from nlohmann_json stop here and become ScenarioErrors.
#include "spoolstep/benchrun/scenario.hpp"

#include <algorithm>
#include <cmath>
#include <fstream>
#include <set>
#include <sstream>

#include <fmt/format.h>

#include "spoolstep/benchrun/runner.hpp"
#include "spoolstep/benchrun/sinks.hpp"
#include "spoolstep/core/soft_command.hpp"
#include "spoolstep/jsondoc/reader.hpp"
#include "spoolstep/machine_file/machine_file.hpp"

namespace spoolstep::benchrun {
namespace {

using json = nlohmann::json;
using jsondoc::did_you_mean;
using jsondoc::printable;
using machine_file::name_view;
using machine_file::NamedKind;

// The on/off soft commands ("jog" is its own timeline entry), named as in
// the core's kSoftCommandTable.
std::optional<core::SoftCommand> on_off_command(const std::string& name) {
  for (const core::SoftCommandRow& row : core::kSoftCommandTable) {
    if (row.command != core::SoftCommand::kJog && name == row.name) return row.command;
  }
  return std::nullopt;
}

const char* kind_noun(NamedKind kind) {
  switch (kind) {
    case NamedKind::kDigitalInput: return "digital input";
    case NamedKind::kAnalogInput: return "analog input";
    case NamedKind::kCoil: return "coil";
    case NamedKind::kPropOutput: return "proportional output";
    case NamedKind::kFunction: return "function";
    case NamedKind::kStep: return "step";
  }
  return "name";
}

std::vector<std::string> on_off_command_names() {
  std::vector<std::string> names;
  for (const core::SoftCommandRow& row : core::kSoftCommandTable) {
    if (row.command != core::SoftCommand::kJog) names.emplace_back(row.name);
  }
  return names;
}

std::string on_off_command_list() {
  std::string list;
  for (const core::SoftCommandRow& row : core::kSoftCommandTable) {
    if (row.command != core::SoftCommand::kJog) list += (list.empty() ? "" : ", ") + std::string(row.name);
  }
  return list;
}

class Reader {
 public:
  Reader(std::string file, const core::MachineConfig& machine, const PlantFacts* plant)
      : file_(std::move(file)), machine_(machine), plant_(plant) {}

  void error(const std::string& path, std::string reason, std::string hint) {
    errors_.push_back(ScenarioError{file_, path, std::move(reason), std::move(hint)});
  }

  // Checks that `object` is an object with only `allowed` keys.
  bool object(const json& object, const std::string& path, std::initializer_list<const char*> allowed) {
    if (!object.is_object()) {
      error(path, fmt::format("must be an object, got {}", object.type_name()), "Write it as { ... }.");
      return false;
    }
    for (const auto& [key, value] : object.items()) {
      bool known = false;
      for (const char* a : allowed) known = known || key == a;
      if (!known) {
        std::string list;
        std::vector<std::string> fields;
        for (const char* a : allowed) {
          list += (list.empty() ? "" : ", ") + std::string(a);
          fields.emplace_back(a);
        }
        error(path + "/" + jsondoc::escape_token(key), fmt::format("unknown field '{}'", printable(key)),
              did_you_mean(key, fields, "Known fields here: " + list + "."));
      }
    }
    return true;
  }

  std::optional<double> number(const json& parent, const std::string& path, const char* key,
                               double min, double max, bool required) {
    if (!parent.contains(key)) {
      if (required) error(path + "/" + key, fmt::format("missing required field '{}'", key), "Add it.");
      return std::nullopt;
    }
    const json& v = parent.at(key);
    if (!v.is_number()) {
      error(path + "/" + key, fmt::format("must be a number, got {}", v.type_name()), "Write a number.");
      return std::nullopt;
    }
    const double x = v.get<double>();
    if (!(x >= min && x <= max)) {
      error(path + "/" + key, fmt::format("must be between {} and {} (got {})", min, max, x), "Fix the value.");
      return std::nullopt;
    }
    return x;
  }

  std::optional<std::string> text(const json& parent, const std::string& path, const char* key, bool required) {
    if (!parent.contains(key)) {
      if (required) error(path + "/" + key, fmt::format("missing required field '{}'", key), "Add it.");
      return std::nullopt;
    }
    if (!parent.at(key).is_string()) {
      error(path + "/" + key, "must be a string", "Write it in double quotes.");
      return std::nullopt;
    }
    return parent.at(key).get<std::string>();
  }

  /// Index of the named item of `kind` in the machine file, or an error with
  /// a did-you-mean hint and nullopt.
  std::optional<std::uint8_t> resolve(const std::string& name, const std::string& path, NamedKind kind) {
    const std::vector<std::string> names = machine_file::names_of(machine_, kind);
    const auto it = std::find(names.begin(), names.end(), name);
    if (it != names.end()) return static_cast<std::uint8_t>(it - names.begin());
    const char* what = kind_noun(kind);
    error(path, fmt::format("no {} named '{}' in the machine file", what, printable(name)),
          did_you_mean(name, names, fmt::format("Use a {} the machine file declares.", what)));
    return std::nullopt;
  }

  std::optional<std::uint8_t> digital(const std::string& name, const std::string& path, bool settable) {
    const auto index = resolve(name, path, NamedKind::kDigitalInput);
    if (index && settable && plant_ != nullptr && *index < plant_->plant_digital.size() && plant_->plant_digital[*index]) {
      error(path, fmt::format("digital input '{}' is driven by the plant model's sensor", name),
            "Change the plant instead (a plant fault), or remove the sensor wiring.");
      return std::nullopt;
    }
    return index;
  }

  std::optional<std::uint8_t> analog(const std::string& name, const std::string& path) {
    const auto index = resolve(name, path, NamedKind::kAnalogInput);
    if (index && plant_ != nullptr && *index < plant_->plant_analog.size() && plant_->plant_analog[*index]) {
      error(path, fmt::format("analog input '{}' is driven by the plant model's sensor", name),
            "Inject a sensor fault on the plant instead.");
      return std::nullopt;
    }
    return index;
  }

  std::uint64_t at_us(double seconds) { return static_cast<std::uint64_t>(std::llround(seconds * 1e6)); }

  void timeline_entry(const json& e, const std::string& path, std::vector<TimelineEvent>& out) {
    if (!object(e, path, {"at_s", "set", "pulse", "ms", "analog", "analog_ma", "analog_healthy",
                          "command", "jog", "plant_fault", "delay_scan_ms", "note"}))
      return;
    const auto at = number(e, path, "at_s", 0.0, 1e6, true);
    if (!at) return;
    const std::uint64_t t = at_us(*at);
    int actions = 0;
    auto add = [&](TimelineEvent ev, const std::string& p) {
      ev.at_us = t;
      ev.json_path = p;
      out.push_back(std::move(ev));
    };
    if (e.contains("set")) {
      ++actions;
      const std::string p = path + "/set";
      if (!e["set"].is_object()) {
        error(p, "must be an object of input name to true/false", "Write {\"guard_door_closed\": false}.");
      } else {
        for (const auto& [name, v] : e["set"].items()) {
          if (!v.is_boolean()) { error(p + "/" + name, "must be true or false", "Digital inputs are booleans."); continue; }
          if (const auto i = digital(name, p + "/" + name, true)) {
            TimelineEvent ev; ev.kind = TimelineEvent::Kind::kSetDigital; ev.index = *i; ev.value = v.get<bool>() ? 1 : 0;
            add(ev, p + "/" + name);
          }
        }
      }
    }
    if (e.contains("pulse")) {
      ++actions;
      const std::string p = path + "/pulse";
      const double ms = number(e, path, "ms", 1.0, 60000.0, false).value_or(100.0);
      std::vector<std::pair<std::string, std::string>> names;
      if (e["pulse"].is_string()) names.emplace_back(e["pulse"].get<std::string>(), p);
      else if (e["pulse"].is_array()) {
        for (std::size_t k = 0; k < e["pulse"].size(); ++k) {
          if (e["pulse"][k].is_string()) names.emplace_back(e["pulse"][k].get<std::string>(), p + "/" + std::to_string(k));
          else error(p + "/" + std::to_string(k), "must be an input name", "Write the button's input name.");
        }
      } else error(p, "must be an input name or a list of names", "Write \"reset_pb\" or [\"a\", \"b\"].");
      for (const auto& [name, np] : names) {
        if (const auto i = digital(name, np, true)) {
          TimelineEvent on; on.kind = TimelineEvent::Kind::kSetDigital; on.index = *i; on.value = 1;
          add(on, np);
          TimelineEvent off; off.kind = TimelineEvent::Kind::kSetDigital; off.index = *i; off.value = 0;
          off.at_us = t + at_us(ms * 1e-3); off.json_path = np;
          out.push_back(off);
        }
      }
    } else if (e.contains("ms")) {
      error(path + "/ms", "'ms' belongs to a pulse", "Remove it or add \"pulse\".");
    }
    for (const char* key : {"analog", "analog_ma"}) {
      if (!e.contains(key)) continue;
      ++actions;
      const std::string p = path + "/" + key;
      if (!e[key].is_object()) { error(p, "must be an object of analog input name to value", "Write {\"press_pressure\": 120}."); continue; }
      for (const auto& [name, v] : e[key].items()) {
        if (!v.is_number()) { error(p + "/" + name, "must be a number", "Write a number."); continue; }
        if (const auto i = analog(name, p + "/" + name)) {
          TimelineEvent ev;
          ev.kind = std::string(key) == "analog" ? TimelineEvent::Kind::kSetAnalog : TimelineEvent::Kind::kSetAnalogMa;
          ev.index = *i; ev.value = v.get<double>();
          add(ev, p + "/" + name);
        }
      }
    }
    if (e.contains("analog_healthy")) {
      ++actions;
      const std::string p = path + "/analog_healthy";
      if (!e["analog_healthy"].is_object()) error(p, "must be an object of analog input name to true/false", "Write {\"press_pressure\": false}.");
      else for (const auto& [name, v] : e["analog_healthy"].items()) {
        if (!v.is_boolean()) { error(p + "/" + name, "must be true or false", "Write true or false."); continue; }
        if (const auto i = resolve(name, p + "/" + name, NamedKind::kAnalogInput)) {
          TimelineEvent ev; ev.kind = TimelineEvent::Kind::kAnalogHealth; ev.index = *i; ev.value = v.get<bool>() ? 1 : 0;
          add(ev, p + "/" + name);
        }
      }
    }
    if (e.contains("command")) {
      ++actions;
      const std::string p = path + "/command";
      if (!e["command"].is_object()) error(p, "must be an object of command name to true/false", "Write {\"cycle_stop\": true}.");
      else for (const auto& [name, v] : e["command"].items()) {
        const std::optional<core::SoftCommand> command = on_off_command(name);
        if (!command) {
          error(p + "/" + jsondoc::escape_token(name), fmt::format("unknown command '{}'", printable(name)),
                did_you_mean(name, on_off_command_names(), "Commands: " + on_off_command_list() + "."));
          continue;
        }
        if (!v.is_boolean()) { error(p + "/" + name, "must be true or false", "Commands are levels: true until set false."); continue; }
        TimelineEvent ev; ev.kind = TimelineEvent::Kind::kCommand; ev.command = *command; ev.value = v.get<bool>() ? 1 : 0;
        add(ev, p + "/" + name);
      }
    }
    if (e.contains("jog")) {
      ++actions;
      const std::string p = path + "/jog";
      if (!e["jog"].is_object()) error(p, "must be an object of function name to extend/retract/none", "Write {\"press\": \"extend\"}.");
      else for (const auto& [name, v] : e["jog"].items()) {
        const auto f = resolve(name, p + "/" + name, NamedKind::kFunction);
        const std::string d = v.is_string() ? v.get<std::string>() : "";
        if (d != "extend" && d != "retract" && d != "none") { error(p + "/" + name, "must be \"extend\", \"retract\" or \"none\"", "Jog is hold-to-run: set \"none\" to release."); continue; }
        if (!f) continue;
        TimelineEvent ev; ev.kind = TimelineEvent::Kind::kJog; ev.index = *f;
        ev.direction = d == "extend" ? core::Direction::kExtend : d == "retract" ? core::Direction::kRetract : core::Direction::kNone;
        add(ev, p + "/" + name);
      }
    }
    if (e.contains("plant_fault")) {
      ++actions;
      const std::string p = path + "/plant_fault";
      if (plant_ == nullptr) {
        error(p, "plant faults need a plant model", "Run it with 'spoolstep sim' on a machine file that has a plant section.");
      } else if (const auto problem = plant_->check_fault ? plant_->check_fault(e["plant_fault"]) : std::nullopt) {
        error(problem->field.empty() ? p : p + "/" + problem->field, problem->reason,
              "See docs/scenario-format.md for the plant fault kinds and their targets.");
      } else {
        TimelineEvent ev; ev.kind = TimelineEvent::Kind::kPlantFault; ev.plant_fault = e["plant_fault"];
        add(ev, p);
      }
    }
    if (e.contains("delay_scan_ms")) {
      ++actions;
      if (const auto ms = number(e, path, "delay_scan_ms", 0.0, 10000.0, true)) {
        TimelineEvent ev; ev.kind = TimelineEvent::Kind::kDelayScan; ev.value = *ms * 1000.0;
        add(ev, path + "/delay_scan_ms");
      }
    }
    if (actions == 0) {
      error(path, "the entry does nothing", "Add one of set, pulse, analog, analog_ma, analog_healthy, command, jog, plant_fault, delay_scan_ms.");
    }
  }

  void expectation(const json& e, const std::string& path, const std::vector<std::string>& signals,
                   std::vector<Expectation>& out) {
    if (!object(e, path, {"name", "kind", "step", "before_s", "state", "at_s", "signal", "min", "max",
                          "from_s", "to_s", "tolerance", "while_off", "grace_ms", "within_ms", "hold_ms"}))
      return;
    const auto kind = text(e, path, "kind", true);
    if (!kind) return;
    Expectation x;
    x.json_path = path;
    // Printed in the run's table and the report: cut and escaped like any text echoed from a file.
    x.name = printable(text(e, path, "name", false).value_or(*kind), 2 * jsondoc::kMaxEchoedChars);
    auto signal = [&]() -> bool {
      const auto s = text(e, path, "signal", true);
      if (!s) return false;
      if (std::find(signals.begin(), signals.end(), *s) == signals.end()) {
        std::string hint = "Signals are the trace's column names (see trace.csv), e.g. ";
        for (std::size_t k = 0; k < signals.size() && k < 6; ++k) hint += (k ? ", " : "") + signals[k];
        error(path + "/signal", fmt::format("no signal named '{}'", printable(*s)), did_you_mean(*s, signals, hint + "."));
        return false;
      }
      x.signal = *s;
      return true;
    };
    auto range = [&]() {
      x.min = number(e, path, "min", -1e12, 1e12, false).value_or(-1e300);
      x.max = number(e, path, "max", -1e12, 1e12, false).value_or(1e300);
      if (!e.contains("min") && !e.contains("max")) error(path, "needs 'min', 'max' or both", "Give the allowed range.");
      if (e.contains("min") && e.contains("max") && x.min > x.max)
        error(path + "/min", fmt::format("min {} is above max {}: nothing could pass", x.min, x.max), "Swap them or fix one.");
    };
    if (*kind == "step_reached") {
      x.kind = Expectation::Kind::kStepReached;
      if (const auto s = text(e, path, "step", true)) {
        if (const auto i = resolve(*s, path + "/step", NamedKind::kStep)) x.step = *i;
      }
      x.before_s = number(e, path, "before_s", 0.0, 1e6, true).value_or(0.0);
    } else if (*kind == "state_at") {
      x.kind = Expectation::Kind::kStateAt;
      if (const auto s = text(e, path, "state", true)) {
        bool found = false;
        for (std::uint8_t k = 0; k < core::kMachineStateCount; ++k) {
          if (*s == state_name(k)) { x.state = k; found = true; }
        }
        if (!found) {
          std::vector<std::string> states;
          for (std::uint8_t k = 0; k < core::kMachineStateCount; ++k) states.emplace_back(state_name(k));
          std::string list;
          for (const auto& name : states) list += (list.empty() ? "" : ", ") + name;
          error(path + "/state", fmt::format("unknown state '{}'", printable(*s)),
                did_you_mean(*s, states, "States: " + list + "."));
        }
      }
      x.at_s = number(e, path, "at_s", 0.0, 1e6, true).value_or(0.0);
    } else if (*kind == "stays_within") {
      x.kind = Expectation::Kind::kStaysWithin;
      signal();
      range();
      x.from_s = number(e, path, "from_s", 0.0, 1e6, false).value_or(0.0);
      x.to_s = number(e, path, "to_s", 0.0, 1e6, false).value_or(1e300);
      if (x.from_s > x.to_s)
        error(path + "/from_s", fmt::format("the window ends ({} s) before it starts ({} s)", x.to_s, x.from_s),
              "Swap from_s and to_s.");
    } else if (*kind == "still_while_off") {
      x.kind = Expectation::Kind::kStillWhileOff;
      signal();
      x.tolerance = number(e, path, "tolerance", 0.0, 1e12, true).value_or(0.0);
      x.grace_ms = number(e, path, "grace_ms", 0.0, 1e6, false).value_or(0.0);
      if (const auto s = text(e, path, "while_off", true)) {
        if (const auto i = digital(*s, path + "/while_off", false)) x.input = *i;
      }
    } else if (*kind == "safe_within") {
      x.kind = Expectation::Kind::kSafeWithin;
      x.at_s = number(e, path, "at_s", 0.0, 1e6, true).value_or(0.0);
      x.within_ms = number(e, path, "within_ms", 0.0, 1e6, true).value_or(0.0);
      x.hold_ms = number(e, path, "hold_ms", 0.0, 1e6, false).value_or(100.0);
    } else if (*kind == "final_within") {
      x.kind = Expectation::Kind::kFinalWithin;
      signal();
      range();
    } else {
      error(path + "/kind", fmt::format("unknown expectation kind '{}'", printable(*kind)),
            did_you_mean(*kind, {"step_reached", "state_at", "stays_within", "still_while_off", "safe_within", "final_within"},
                         "Kinds: step_reached, state_at, stays_within, still_while_off, safe_within, final_within."));
      return;
    }
    out.push_back(std::move(x));
  }

  std::unique_ptr<Scenario> read(const json& doc) {
    auto scenario = std::make_unique<Scenario>();
    scenario->source_path = file_;
    if (!object(doc, "", {"format", "description", "duration_s", "initial", "timeline", "expect"})) return nullptr;
    const auto format = text(doc, "", "format", true);
    if (format && *format != kScenarioFormatTag)
      error("/format", fmt::format("unsupported format '{}'", printable(*format)), fmt::format("This version reads \"{}\".", kScenarioFormatTag));
    scenario->description = printable(text(doc, "", "description", false).value_or(""), 4 * jsondoc::kMaxEchoedChars);
    const auto duration = number(doc, "", "duration_s", 0.001, 86400.0, true);
    scenario->duration_s = duration.value_or(0.0);
    if (doc.contains("initial")) {
      const json& init = doc["initial"];
      json as_entry = json::object();
      as_entry["at_s"] = 0.0;
      if (object(init, "/initial", {"inputs", "analog", "analog_ma"})) {
        // The initial section is a timeline entry at t = 0 under other key names.
        std::vector<TimelineEvent> events;
        if (init.contains("inputs")) as_entry["set"] = init["inputs"];
        if (init.contains("analog")) as_entry["analog"] = init["analog"];
        if (init.contains("analog_ma")) as_entry["analog_ma"] = init["analog_ma"];
        if (as_entry.size() > 1) {
          const std::size_t before = errors_.size();
          timeline_entry(as_entry, "/initial", events);
          for (std::size_t k = before; k < errors_.size(); ++k) {
            auto& p = errors_[k].json_path;
            if (p.rfind("/initial/set", 0) == 0) p.replace(0, 12, "/initial/inputs");
          }
          scenario->events.insert(scenario->events.end(), events.begin(), events.end());
        }
      }
    }
    if (!doc.contains("timeline") || !doc["timeline"].is_array()) {
      error("/timeline", "missing or not a list", "Add \"timeline\": [ {\"at_s\": 0.1, \"pulse\": \"reset_pb\"}, ... ].");
    } else {
      for (std::size_t k = 0; k < doc["timeline"].size(); ++k) {
        timeline_entry(doc["timeline"][k], "/timeline/" + std::to_string(k), scenario->events);
      }
    }
    std::vector<std::string> signals;
    for (const Signal& s : core_signals(machine_)) signals.push_back(s.name);
    if (plant_ != nullptr) signals.insert(signals.end(), plant_->signal_names.begin(), plant_->signal_names.end());
    if (doc.contains("expect")) {
      if (!doc["expect"].is_array()) error("/expect", "must be a list", "Write \"expect\": [ ... ].");
      else for (std::size_t k = 0; k < doc["expect"].size(); ++k) {
        expectation(doc["expect"][k], "/expect/" + std::to_string(k), signals, scenario->expectations);
      }
    }
    // A bad duration is its own error; times are checked against a good one.
    if (duration) check_times_before_the_end(*scenario);
    std::stable_sort(scenario->events.begin(), scenario->events.end(),
                     [](const TimelineEvent& a, const TimelineEvent& b) { return a.at_us < b.at_us; });
    return errors_.empty() ? std::move(scenario) : nullptr;
  }

  std::vector<ScenarioError> take_errors() { return std::move(errors_); }

 private:
  // Events and checks after the end of the run would be silently ignored.
  void check_times_before_the_end(const Scenario& scenario) {
    const double end_s = scenario.duration_s + 1e-9;
    for (const TimelineEvent& ev : scenario.events) {
      // A pulse's release may fall after the end.
      const bool pulse_release = ev.kind == TimelineEvent::Kind::kSetDigital && ev.value == 0.0 &&
                                 ev.json_path.find("/pulse") != std::string::npos;
      if (static_cast<double>(ev.at_us) * 1e-6 > end_s && !pulse_release)
        error(ev.json_path, "happens after the end of the run", "Raise duration_s or move the event.");
    }
    for (const Expectation& x : scenario.expectations) {
      const bool at_kind = x.kind == Expectation::Kind::kStateAt || x.kind == Expectation::Kind::kSafeWithin;
      if (at_kind && x.at_s > end_s)
        error(x.json_path + "/at_s", fmt::format("{} s is after the end of the run ({} s)", x.at_s, scenario.duration_s),
              "Raise duration_s or move the check.");
      if (x.kind == Expectation::Kind::kStaysWithin && x.from_s > end_s)
        error(x.json_path + "/from_s",
              fmt::format("{} s is after the end of the run ({} s)", x.from_s, scenario.duration_s),
              "Raise duration_s or move the window.");
    }
  }

  std::string file_;
  const core::MachineConfig& machine_;
  const PlantFacts* plant_;
  std::vector<ScenarioError> errors_;
};

}  // namespace

const jsondoc::ReadLimits& scenario_limits() {
  static const jsondoc::ReadLimits limits{kMaxScenarioBytes, kMaxScenarioArrayItems, 64, "scenario"};
  return limits;
}

namespace {

ScenarioLoad load_document(jsondoc::ReadResult read, const std::string& display_name,
                           const core::MachineConfig& machine, const PlantFacts* plant) {
  ScenarioLoad result;
  result.errors = std::move(read.diagnostics);
  if (!read.ok()) return result;
  Reader reader(display_name, machine, plant);
  try {
    result.scenario = reader.read(read.root);
  } catch (const json::exception& e) {
    reader.error("", std::string("unexpected JSON structure: ") + e.what(), "Compare the file with docs/scenario-format.md.");
    result.scenario.reset();
  }
  result.errors = reader.take_errors();
  if (!result.errors.empty()) result.scenario.reset();
  return result;
}

}  // namespace

ScenarioLoad load_scenario_text(const std::string& text, const std::string& display_name,
                                const core::MachineConfig& machine, const PlantFacts* plant) {
  return load_document(jsondoc::read_text(text, display_name, scenario_limits()), display_name, machine, plant);
}

ScenarioLoad load_scenario_file(const std::string& path, const core::MachineConfig& machine,
                                const PlantFacts* plant) {
  return load_document(jsondoc::read_file(path, scenario_limits()), path, machine, plant);
}

}  // namespace spoolstep::benchrun
