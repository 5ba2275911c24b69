// Human-readable summary of a configuration and the generated parameter
// reference. Both read only the data they print, so they show what the core
// will run, not what the file said.
#include <sstream>
#include <string>
#include <vector>

#include <fmt/format.h>

#include "spoolstep/core/controller.hpp"
#include "spoolstep/machine_file/machine_file.hpp"
#include "spoolstep/machine_file/parameters.hpp"

namespace spoolstep::machine_file {
namespace {

std::string ms(std::uint32_t us) { return fmt::format("{:g} ms", static_cast<double>(us) / 1000.0); }

std::string name(const core::Name& n) { return std::string(name_view(n)); }

const char* valve_text(core::ValveKind kind) {
  const core::ValveKindRow* row = core::valve_kind_row(kind);
  return row != nullptr ? row->text : "?";
}

const char* centre_text(core::ValveCentre centre) {
  const core::CentreRow* row = core::centre_row(centre);
  return row != nullptr ? row->text : "?";
}

const char* function_state_text(std::uint16_t state) {
  switch (static_cast<core::FunctionCondition>(state)) {
    case core::FunctionCondition::kAtExtendedEnd: return "at extended end";
    case core::FunctionCondition::kAtRetractedEnd: return "at retracted end";
    case core::FunctionCondition::kExtending: return "extending";
    case core::FunctionCondition::kRetracting: return "retracting";
    case core::FunctionCondition::kStopped: return "stopped";
  }
  return "?";
}

class ConditionText {
 public:
  explicit ConditionText(const core::MachineConfig& c) : c_(c) {}

  std::string operator()(std::uint16_t index) const {
    return index == core::kNoCondition ? "-" : render(index, false);
  }

 private:
  std::string render(std::uint16_t index, bool nested) const {
    if (index >= c_.node_count) return fmt::format("<bad node {}>", index);
    const auto& n = c_.nodes[index];
    switch (n.op) {
      case core::ConditionOp::kTrue: return "true";
      case core::ConditionOp::kFalse: return "false";
      case core::ConditionOp::kDigitalInput: return name(c_.digital_inputs[n.a]);
      case core::ConditionOp::kAnalogAbove:
      case core::ConditionOp::kAnalogBelow: {
        const auto& ai = c_.analog_inputs[n.a];
        std::string text = fmt::format("{} {} {:g} {}", name(ai.name), n.op == core::ConditionOp::kAnalogAbove ? ">" : "<",
                                       n.threshold, name(ai.unit));
        if (n.hysteresis > 0.0f) text += fmt::format(" (hysteresis {:g})", n.hysteresis);
        return text;
      }
      case core::ConditionOp::kFunctionState:
        return fmt::format("{} {}", name(c_.functions[n.a].name), function_state_text(n.b));
      case core::ConditionOp::kNodeRef:
        for (std::uint8_t i = 0; i < c_.interlock_count; ++i) {
          if (c_.interlocks[i].condition == n.a) return fmt::format("interlock {}", name(c_.interlocks[i].name));
        }
        return render(n.a, nested);
      case core::ConditionOp::kStepActive: return fmt::format("step {} active", name(c_.steps[n.a].name));
      case core::ConditionOp::kTwoHandHeld: return fmt::format("two-hand {} held", name(c_.two_hand[n.a].name));
      case core::ConditionOp::kModeIs: return n.b == 1 ? "mode automatic" : "mode manual";
      case core::ConditionOp::kPowerUnitReady: return "power unit ready";
      case core::ConditionOp::kNot: return "not " + render(n.a, true);
      case core::ConditionOp::kAll:
      case core::ConditionOp::kAny: {
        std::string text;
        for (std::uint16_t k = 0; k < n.b; ++k) {
          if (k > 0) text += n.op == core::ConditionOp::kAll ? " and " : " or ";
          text += render(c_.child_slots[n.a + k], true);
        }
        return nested && n.b > 1 ? "(" + text + ")" : text;
      }
      case core::ConditionOp::kOnDelay:
      case core::ConditionOp::kOffDelay:
      case core::ConditionOp::kDebounce: {
        const std::string inner = render(n.a, true);
        const std::string text = n.op == core::ConditionOp::kOnDelay    ? fmt::format("{} for {}", inner, ms(n.time_us))
                                 : n.op == core::ConditionOp::kOffDelay ? fmt::format("{} off-delayed {}", inner, ms(n.time_us))
                                                                        : fmt::format("{} debounced {}", inner, ms(n.time_us));
        return nested ? "(" + text + ")" : text;
      }
    }
    return "?";
  }

  const core::MachineConfig& c_;
};

std::string guard_text(const core::MachineConfig& c, std::uint32_t mask) {
  std::vector<std::string> parts;
  for (std::uint8_t f = 0; f < c.function_count; ++f) {
    const bool extend = (mask & core::motion_bit(f, core::Direction::kExtend)) != 0;
    const bool retract = (mask & core::motion_bit(f, core::Direction::kRetract)) != 0;
    if (extend && retract) {
      parts.push_back(name(c.functions[f].name));
    } else if (extend) {
      parts.push_back(name(c.functions[f].name) + ".extend");
    } else if (retract) {
      parts.push_back(name(c.functions[f].name) + ".retract");
    }
  }
  if ((mask & core::kPowerUnitGuardBit) != 0) parts.emplace_back("pump");
  std::string out;
  for (std::size_t i = 0; i < parts.size(); ++i) out += (i > 0 ? ", " : "") + parts[i];
  return out.empty() ? "nothing" : out;
}

std::string coil_text(const core::MachineConfig& c, std::uint8_t index) {
  return index == core::kNoIndex8 ? "-" : name(c.coils[index]);
}

std::string din_text(const core::MachineConfig& c, std::uint8_t index) {
  return index == core::kNoIndex8 ? "-" : name(c.digital_inputs[index]);
}

}  // namespace

std::string summarize(const core::MachineConfig& c) {
  const ConditionText cond(c);
  std::ostringstream out;
  const auto& s = c.safety;
  out << fmt::format("Machine {}\n", name(c.name));
  out << fmt::format("  scan {} us, watchdog {}, digital inputs stale after {}, input fault stop cat {}, "
                     "supervision stop cat {}\n",
                     s.scan_period_us, ms(s.watchdog_us), s.max_digital_age_us == 0 ? std::string("off") : ms(s.max_digital_age_us),
                     static_cast<int>(s.input_fault_category), static_cast<int>(s.supervision_category));

  out << fmt::format("Digital inputs ({}):\n", c.digital_input_count);
  for (std::uint8_t i = 0; i < c.digital_input_count; ++i) out << fmt::format("  {:2} {}\n", i, name(c.digital_inputs[i]));
  out << fmt::format("Analog inputs ({}):\n", c.analog_input_count);
  for (std::uint8_t i = 0; i < c.analog_input_count; ++i) {
    const auto& a = c.analog_inputs[i];
    out << fmt::format("  {:2} {}: {}, {:g} to {:g} {}, stale after {}\n", i, name(a.name),
                       a.signal == core::AnalogSignal::kCurrent4To20 ? "4-20 mA" : "engineering", a.range_min,
                       a.range_max, name(a.unit), a.max_age_us == 0 ? std::string("off") : ms(a.max_age_us));
  }
  out << fmt::format("Coils ({}):\n", c.coil_count);
  for (std::uint8_t i = 0; i < c.coil_count; ++i) out << fmt::format("  {:2} {}\n", i, name(c.coils[i]));
  out << fmt::format("Proportional outputs ({}):\n", c.prop_output_count);
  for (std::uint8_t i = 0; i < c.prop_output_count; ++i) {
    out << fmt::format("  {:2} {} ({})\n", i, name(c.prop_outputs[i].name),
                       c.prop_outputs[i].unit == core::PropUnit::kMilliamp ? "mA" : "percent");
  }

  out << fmt::format("Functions ({}):\n", c.function_count);
  for (std::uint8_t i = 0; i < c.function_count; ++i) {
    const auto& f = c.functions[i];
    out << fmt::format("  {} {}: {}, {}\n", i, name(f.name), valve_text(f.valve), centre_text(f.centre));
    switch (f.valve) {
      case core::ValveKind::kSolenoid43SpringCentred:
      case core::ValveKind::kSolenoid42Detented:
        out << fmt::format("      coils: extend (P->A) {}, retract (P->B) {}\n", coil_text(c, f.coil_extend),
                           coil_text(c, f.coil_retract));
        if (f.valve == core::ValveKind::kSolenoid42Detented) out << fmt::format("      detent pulse {}\n", ms(f.detent_pulse_us));
        break;
      case core::ValveKind::kSolenoid42SpringReturn:
        out << fmt::format("      coil: extend (P->A) {}; spring gives retract\n", coil_text(c, f.coil_extend));
        break;
      case core::ValveKind::kProportional43TwoSolenoid:
        out << fmt::format("      extend (P->A) {} {:g}..{:g} mA, retract (P->B) {} {:g}..{:g} mA\n",
                           name(c.prop_outputs[f.prop_extend].name), f.current_extend.crack_ma, f.current_extend.max_ma,
                           name(c.prop_outputs[f.prop_retract].name), f.current_retract.crack_ma, f.current_retract.max_ma);
        break;
      case core::ValveKind::kProportional43SignedCommand:
        out << fmt::format("      channel {} (signed percent), deadband jump {:g} %\n",
                           name(c.prop_outputs[f.prop_extend].name), f.deadband_jump_percent);
        break;
    }
    if (core::is_proportional(f.valve)) {
      if (f.dither_amplitude_ma > 0.0f) {
        out << fmt::format("      dither {:g} mA at {:g} Hz\n", f.dither_amplitude_ma, f.dither_frequency_hz);
      }
      out << fmt::format("      quick stop {}, jog speed {:g} %\n", ms(f.quick_stop_us), f.jog_speed_percent);
    }
    if (f.enable_coil != core::kNoIndex8) out << fmt::format("      enable coil {}\n", coil_text(c, f.enable_coil));
    out << fmt::format("      ends: extended {}, retracted {}", din_text(c, f.extended_end_input),
                       din_text(c, f.retracted_end_input));
    if (f.position_input != core::kNoIndex8) {
      out << fmt::format("; position {} window {:g} to {:g} (release band {:g})",
                         name(c.analog_inputs[f.position_input].name), f.retract_limit, f.extend_limit,
                         f.limit_release_band);
    }
    out << fmt::format("; reversal dwell {}\n", ms(f.reversal_dwell_us));
    if (f.slowdown_speed_percent > 0.0f) {
      auto zone = [&](float length, std::uint8_t input) {
        std::string text;
        if (length > 0.0f) text = fmt::format("the last {:g}", length);
        if (input != core::kNoIndex8) text += (text.empty() ? "" : " or ") + fmt::format("while {}", din_text(c, input));
        return text.empty() ? std::string("no slow-down") : text;
      };
      out << fmt::format("      slow-down to {:g} %: extending {}; retracting {}\n", f.slowdown_speed_percent,
                         zone(f.extend_slowdown, f.extend_slowdown_input), zone(f.retract_slowdown, f.retract_slowdown_input));
    }
    if (f.jog_extend != core::kNoCondition || f.jog_retract != core::kNoCondition) {
      out << fmt::format("      jog extend when {}; jog retract when {}\n", cond(f.jog_extend), cond(f.jog_retract));
    }
    for (std::uint8_t r = 0; r < f.ramp_count; ++r) {
      const auto& ramp = f.ramps[r];
      out << fmt::format("      ramp {}{}: {}, extend accel {} decel {}, retract accel {} decel {}", name(ramp.name),
                         r == 0 ? " (default)" : "", ramp.profile == core::RampProfile::kSCurve ? "s-curve" : "linear",
                         ms(ramp.extend_accel_us), ms(ramp.extend_decel_us), ms(ramp.retract_accel_us),
                         ms(ramp.retract_decel_us));
      if (ramp.profile == core::RampProfile::kSCurve) out << fmt::format(", jerk {}", ms(ramp.jerk_us));
      out << "\n";
    }
  }

  const auto& pu = c.power_unit;
  if (pu.present) {
    out << fmt::format("Power unit: motor {}, dump valve {}, unloaded start {}\n", coil_text(c, pu.motor_coil),
                       coil_text(c, pu.dump_coil), ms(pu.unloaded_start_us));
    out << fmt::format("  ready when {} (timeout {})\n", cond(pu.pressure_ready), ms(pu.pressure_ready_timeout_us));
    out << fmt::format("  start on {}; stop on {}\n", cond(pu.start), cond(pu.stop));
  } else {
    out << "Power unit: none\n";
  }
  const auto& op = c.operator_panel;
  out << fmt::format("Operator: emergency stop {} (normally closed, stop category {})\n", din_text(c, op.estop_input),
                     static_cast<int>(op.estop_category));
  out << fmt::format("  reset {}; cycle start {}; cycle stop {}; stop {}\n", cond(op.reset), cond(op.cycle_start),
                     cond(op.cycle_stop), cond(op.stop));
  out << fmt::format("  automatic when {}; continuous when {}\n", cond(op.auto_mode), cond(op.continuous));
  for (std::uint8_t i = 0; i < c.two_hand_count; ++i) {
    const auto& th = c.two_hand[i];
    out << fmt::format("Two-hand {}: {} + {} within {}; releasing a hand holds {}\n", name(th.name),
                       din_text(c, th.left_input), din_text(c, th.right_input), ms(th.max_sync_us),
                       (th.release_holds & core::kAllMotionBits) == core::kAllMotionBits
                           ? std::string("every motion")
                           : guard_text(c, th.release_holds & core::kAllMotionBits));
  }

  out << fmt::format("Interlocks ({}):\n", c.interlock_count);
  for (std::uint8_t i = 0; i < c.interlock_count; ++i) {
    const auto& il = c.interlocks[i];
    out << fmt::format("  {} {}: {}, stop category {}, healthy when {}\n      guards {}\n", i, name(il.name),
                       il.kind == core::InterlockKind::kTrip ? "trip" : "permissive", static_cast<int>(il.stop_category),
                       cond(il.condition), guard_text(c, il.guards));
  }

  out << fmt::format("Sequence ({} steps, {} transitions):\n", c.step_count, c.transition_count);
  for (std::uint8_t i = 0; i < c.step_count; ++i) {
    const auto& st = c.steps[i];
    out << fmt::format("  {} {}{}", i, name(st.name), i == 0 ? " (initial)" : "");
    if (st.min_time_us != 0) out << fmt::format(", at least {}", ms(st.min_time_us));
    if (st.supervision_us != 0) out << fmt::format(", supervised {}", ms(st.supervision_us));
    out << "\n";
    for (std::uint8_t k = 0; k < st.action_count; ++k) {
      const auto& a = st.actions[k];
      const auto& f = c.functions[a.function];
      out << fmt::format("      {} {}", name(f.name), a.direction == core::Direction::kExtend ? "extend" : "retract");
      if (core::is_proportional(f.valve)) {
        out << fmt::format(" at {:g} % on ramp {}", a.speed_percent, name(f.ramps[a.ramp].name));
      }
      out << "\n";
    }
    for (std::uint8_t t = 0; t < c.transition_count; ++t) {
      const auto& tr = c.transitions[t];
      if (tr.from_step != i) continue;
      out << fmt::format("      -> {} when {}\n", name(c.steps[tr.to_step].name), cond(tr.condition));
    }
  }
  out << fmt::format("Condition nodes: {} of {}, child slots: {} of {}\n", c.node_count, core::kMaxConditionNodes,
                     c.child_slot_count, core::kMaxConditionChildren);
  return out.str();
}

namespace {

/// The "Required" column: the loader's rule for the row, in words.
std::string presence_text(const Parameter& p) {
  switch (p.presence.kind) {
    case Presence::Kind::kOptional:
      return "no";
    case Presence::Kind::kAlways:
      return "yes";
    case Presence::Kind::kInObject: {
      const std::string_view key = p.key;
      const std::size_t last = key.rfind('/');
      const std::size_t before = last == std::string_view::npos ? 0 : key.rfind('/', last - 1);
      const std::string_view parent = key.substr(before + 1, last - before - 1);
      return fmt::format("yes, once `{}` is given", parent);
    }
    case Presence::Kind::kWhen:
      return fmt::format("when {}", p.presence.when);
  }
  return "no";
}

/// The valve kinds, printed from the core's one table (core/valve_kinds.hpp).
void write_valve_kind_table(std::ostream& out) {
  out << "\n## Valve kinds\n\n"
      << "Printed from `kValveKinds` in firmware_core/include/spoolstep/core/valve_kinds.hpp. A valve gives\n"
      << "the fields of its kind (outputs required; settings as in the table above) and no other kind's.\n\n"
      << "| `valve/kind` | Valve | Positions | Meters (ramps) | Fields of its own (outputs, settings) |\n"
      << "|---|---|---|---|---|\n";
  for (const core::ValveKindRow& row : core::kValveKinds) {
    std::string fields;
    for (const std::string_view field : valve_keys_of(row)) {
      fields += (fields.empty() ? "" : ", ") + fmt::format("`{}`", field);
    }
    out << fmt::format("| `{}` | {} | {} | {} | {} |\n", row.key, row.text, row.positions,
                       row.meters ? "yes" : "no", fields);
  }
}

}  // namespace

void write_parameter_reference(std::ostream& out) {
  out << "# Machine file parameter reference\n\n"
      << "Generated from the parameter table in machine_file/src/parameters.cpp by\n"
      << "`spoolstep check --reference`; do not edit by hand.\n\n"
      << "`*` stands for a list index; `<condition>` for any place a condition is written.\n"
      << "Times in `_ms` keys are milliseconds; the core stores microseconds.\n\n"
      << "| Key | Type | Unit | Required | Default | Min | Max | Description |\n"
      << "|---|---|---|---|---|---|---|---|\n";
  for (std::size_t i = 0; i < parameter_count(); ++i) {
    const Parameter& p = parameter_at(i);
    const bool numeric = p.type == ParamType::kInteger || p.type == ParamType::kNumber;
    std::string type(to_string(p.type));
    if (p.type == ParamType::kChoice) {
      std::string choices(p.choices);
      std::string escaped;
      for (const char ch : choices) escaped += ch == '|' ? std::string(", ") : std::string(1, ch);
      type += ": " + escaped;
    }
    std::string description(p.description);
    if (!p.limit_note.empty()) description += " " + std::string(p.limit_note);
    const bool always = p.presence.required_in_object();
    out << fmt::format("| `{}` | {} | {} | {} | {} | {} | {} | {} |\n", p.key, type, p.unit, presence_text(p),
                       p.default_value.empty() ? (always ? "" : "none") : std::string(p.default_value),
                       numeric ? fmt::format("{:g}", p.min) : std::string(),
                       numeric ? fmt::format("{:g}", p.max) : std::string(), description);
  }
  write_valve_kind_table(out);
  out << "\n## Limits\n\n"
      << "Checked while the file is read, so that a file past them is refused at once:\n\n"
      << fmt::format("- file size: at most {} bytes;\n", kMaxMachineFileBytes)
      << fmt::format("- any one list: at most {} items (the core's own capacities, in capacity.hpp, are lower);\n",
                     kMaxMachineFileArrayItems)
      << fmt::format("- nesting: at most {} levels, conditions included;\n", kMaxMachineFileDepth)
      << "- numbers must fit a double; names at most " << core::kMaxNameLength
      << " characters, letters, digits and '_'.\n";
}

std::vector<std::string> configuration_warnings(const core::MachineConfig& c) {
  std::vector<std::string> warnings;
  std::uint32_t cycle_motions = 0;  // every motion some step of the cycle demands
  for (std::uint8_t s = 0; s < c.step_count; ++s) {
    for (std::uint8_t k = 0; k < c.steps[s].action_count; ++k) {
      cycle_motions |= core::motion_bit(c.steps[s].actions[k].function, c.steps[s].actions[k].direction);
    }
  }
  const std::uint8_t starters = core::two_hand_devices_read_by(c, c.operator_panel.cycle_start);
  for (std::uint8_t i = 0; i < c.two_hand_count; ++i) {
    if (((starters >> i) & 1u) == 0) continue;
    const std::uint32_t free_running = cycle_motions & ~c.two_hand[i].release_holds;
    if (free_running == 0) continue;
    // ISO 13851 type III continuous actuation (from memory): the file chose
    // to let these motions go on without the hands; say so on every check.
    warnings.push_back(fmt::format(
        "two-hand '{}' starts the cycle, but releasing a hand does not hold {}: those motions go on without the "
        "hands (release_holds); make sure none of them is hazardous",
        name(c.two_hand[i].name), guard_text(c, free_running)));
  }
  for (std::uint8_t i = 0; i < c.function_count; ++i) {
    const core::FunctionConfig& f = c.functions[i];
    if (!core::is_proportional(f.valve)) continue;
    // A step ending on an end switch cuts the valve there in one scan; from
    // full speed the trapped oil peaks at v*sqrt(beta*m/V) (textbook physics).
    const bool extend_unslowed = f.extended_end_input != core::kNoIndex8 && f.extend_slowdown == 0.0f &&
                                 f.extend_slowdown_input == core::kNoIndex8;
    const bool retract_unslowed = f.retracted_end_input != core::kNoIndex8 && f.retract_slowdown == 0.0f &&
                                  f.retract_slowdown_input == core::kNoIndex8;
    for (const auto& [unslowed, side] : {std::pair{extend_unslowed, "extended"}, std::pair{retract_unslowed, "retracted"}}) {
      if (!unslowed) continue;
      warnings.push_back(fmt::format(
          "function '{}' stops at its {} end switch in one scan from whatever speed it has: give it a slow-down "
          "(slowdown.{}_zone or slowdown.{}_input) so it arrives at creep speed",
          name(f.name), side, side[0] == 'e' ? "extend" : "retract", side[0] == 'e' ? "extend" : "retract"));
    }
  }
  return warnings;
}

}  // namespace spoolstep::machine_file
