// One scan of the control core. The order inside a scan is fixed and is the
// contract the tests pin:
//   1. time since the previous scan; scan watchdog
//   2. input checks (health, age, NAMUR NE 43) and analog scaling
//   3. two-hand devices, then all condition nodes in index order
//   4. emergency stop, interlocks (trips latch, permissives block motions)
//   5. machine state (faults first, then reset, mode, cycle start/stop)
//   6. step chain (one transition per scan at most), power unit
//   7. per function: demand -> blocking -> reversal dwell -> ramp -> outputs
//   8. output invariant check (never both solenoids of one valve)
#include "spoolstep/core/analog.hpp"
#include "spoolstep/core/controller.hpp"

#include <cmath>

#include "spoolstep/core/soft_command.hpp"

namespace spoolstep::core {
namespace {

// A scan loop always advances its clock; this many scans in a row with the
// same time stamp mean the time source is stuck.
constexpr std::uint8_t kMaxFrozenScans = 3;
// A "forward" interval this long is a clock that ran backwards (modulo 2^32).
constexpr std::uint32_t kMaxPlausibleIntervalUs = 0x80000000u;
// Allowance on top of the longest quick stop before a controlled stop is
// declared stuck and cut to category 0.
constexpr std::uint32_t kStopMarginUs = 500000;


std::uint32_t saturating_add(std::uint32_t a, std::uint32_t b) {
  return a + b < a ? 0xFFFFFFFFu : a + b;
}

Direction side_of(float command) {
  return command > 0.0f ? Direction::kExtend
                        : (command < 0.0f ? Direction::kRetract : Direction::kNone);
}

float current_for(const SolenoidCurrent& range, float fraction) {
  return range.crack_ma + (range.max_ma - range.crack_ma) * fraction;
}

}  // namespace

std::uint8_t two_hand_devices_read_by(const MachineConfig& c, std::uint16_t condition) {
  if (condition == kNoCondition || condition >= c.node_count) return 0;
  // Nodes read only lower indices, so one pass in index order collects the
  // devices every node depends on.
  std::array<std::uint8_t, kMaxConditionNodes> devices{};
  for (std::uint16_t i = 0; i <= condition; ++i) {
    const ConditionNode& n = c.nodes[i];
    switch (n.op) {
      case ConditionOp::kTwoHandHeld:
        if (n.a < kMaxTwoHandDevices) devices[i] = static_cast<std::uint8_t>(1u << n.a);
        break;
      case ConditionOp::kNodeRef:
      case ConditionOp::kNot:
      case ConditionOp::kOnDelay:
      case ConditionOp::kOffDelay:
      case ConditionOp::kDebounce:
        if (n.a < i) devices[i] = devices[n.a];
        break;
      case ConditionOp::kAll:
      case ConditionOp::kAny:
        for (std::uint16_t k = 0; k < n.b && n.a + k < kMaxConditionChildren; ++k) {
          const std::uint16_t child = c.child_slots[n.a + k];
          if (child < i) devices[i] = static_cast<std::uint8_t>(devices[i] | devices[child]);
        }
        break;
      default:
        break;
    }
  }
  return devices[condition];
}

Status Controller::init(const MachineConfig& config) {
  config_ = &config;
  const Status status = validate_config(config);
  config_ok_ = status.is_ok();
  first_scan_ = true;
  previous_now_us_ = 0;
  nodes_ = {};
  two_hand_ = {};
  // Both hands must be seen released after power-up before a two-hand
  // command counts (ISO 13851:2019 5.7, re-initiation).
  for (TwoHandStep& t : two_hand_) t.phase = TwoHandPhase::kBlocked;
  functions_ = {};
  prev_reset_ = prev_cycle_start_ = prev_pump_start_ = false;
  cycle_start_devices_ = 0;
  holding_devices_ = 0;
  commands_ = {};
  refused_commands_ = 0;
  blocked_motions_ = immediate_motions_ = 0;
  pump_elapsed_us_ = 0;
  supervision_raised_ = false;
  overflow_this_scan_ = false;
  end_cycle_requested_ = false;
  operator_stop_ = false;
  frozen_scans_ = 0;
  stopping_us_ = 0;
  stopping_scans_ = 0;
  reach_ = {};
  stop_limit_us_ = kStopMarginUs;
  diag_ = Diagnostics{};
  if (config_ok_) {
    compute_reach();
    cycle_start_devices_ = two_hand_devices_read_by(config, config.operator_panel.cycle_start);
    for (std::uint8_t i = 0; i < config.function_count; ++i) {
      const FunctionConfig& f = config.functions[i];
      if (is_proportional(f.valve) && f.quick_stop_us + kStopMarginUs > stop_limit_us_) {
        stop_limit_us_ = f.quick_stop_us + kStopMarginUs;
      }
    }
  }
  return status;
}

void Controller::compute_reach() {
  // Motions each step demands, then everything reachable before the chain
  // returns to its initial step (a fixpoint over the transitions).
  const MachineConfig& c = *config_;
  for (std::uint8_t s = 0; s < c.step_count; ++s) {
    for (std::uint8_t k = 0; k < c.steps[s].action_count; ++k) {
      const StepAction& a = c.steps[s].actions[k];
      reach_[s] |= motion_bit(a.function, a.direction);
    }
  }
  for (std::uint8_t round = 0; round < c.step_count; ++round) {
    bool changed = false;
    for (std::uint8_t t = 0; t < c.transition_count; ++t) {
      const TransitionConfig& tr = c.transitions[t];
      if (tr.to_step == 0) continue;  // back at the initial step: the cycle is over
      const std::uint32_t merged = reach_[tr.from_step] | reach_[tr.to_step];
      changed = changed || merged != reach_[tr.from_step];
      reach_[tr.from_step] = merged;
    }
    if (!changed) break;
  }
}

void Controller::log(std::uint32_t now_us, EventCode code, std::uint8_t subject,
                     std::uint16_t detail) {
  diag_.events.push(Event{now_us, code, subject, detail});
}

bool Controller::edge(bool value, bool& previous) const {
  // On the first scan a held button is not an edge: power-up must not act on it.
  const bool rose = value && !previous && !first_scan_;
  previous = value;
  return rose;
}

void Controller::raise_fault(FaultCode code, std::uint8_t subject, std::uint16_t detail,
                             StopCategory category, std::uint32_t now_us) {
  for (std::uint8_t i = 0; i < diag_.fault_count; ++i) {
    Fault& f = diag_.faults[i];
    if (f.code == code && f.subject == subject) {
      f.cause_present = true;
      return;
    }
  }
  if (diag_.fault_count < kMaxActiveFaults) {
    diag_.faults[diag_.fault_count++] = Fault{code, subject, detail, category, now_us, true};
  } else {
    diag_.faults_overflowed = true;  // treated as category 0: an unrecorded fault must still stop
    overflow_this_scan_ = true;
  }
  log(now_us, EventCode::kFaultRaised, static_cast<std::uint8_t>(code), subject);
}

StopCategory Controller::worst_category() const {
  if (diag_.faults_overflowed) return StopCategory::kCat0;
  StopCategory worst = StopCategory::kCat2;
  for (std::uint8_t i = 0; i < diag_.fault_count; ++i) {
    const StopCategory category = diag_.faults[i].category;
    if (category > StopCategory::kCat2) return StopCategory::kCat0;  // corrupted: the safest reading
    if (category < worst) worst = category;
  }
  return worst;
}

bool Controller::power_removed() const {
  switch (diag_.state) {
    case MachineState::kPowerUp:
      return true;
    case MachineState::kFaulted:
      return worst_category() != StopCategory::kCat2;
    default:
      return false;
  }
}

void Controller::check_inputs(const InputImage& in, std::uint32_t now_us) {
  const MachineConfig& c = *config_;
  const StopCategory category = c.safety.input_fault_category;
  for (std::uint8_t i = 0; i < c.analog_input_count; ++i) {
    const AnalogInputConfig& cfg = c.analog_inputs[i];
    const AnalogSample& sample = in.analog[i];
    bool bad = true;
    AnalogFaultReason reason = AnalogFaultReason::kUnhealthy;
    if (!sample.healthy) {
      reason = AnalogFaultReason::kUnhealthy;
    } else if (!std::isfinite(sample.value)) {
      reason = AnalogFaultReason::kNotFinite;
    } else if (cfg.max_age_us != 0 && sample.age_us > cfg.max_age_us) {
      reason = AnalogFaultReason::kStale;
    } else if (cfg.signal == AnalogSignal::kCurrent4To20 && sample.value <= kNe43FailLowMa) {
      reason = AnalogFaultReason::kNe43FailLow;
    } else if (cfg.signal == AnalogSignal::kCurrent4To20 && sample.value >= kNe43FailHighMa) {
      reason = AnalogFaultReason::kNe43FailHigh;
    } else {
      bad = false;
    }
    diag_.analog_value[i] =
        cfg.signal == AnalogSignal::kCurrent4To20
            ? engineering_from_loop(sample.value, cfg.range_min, cfg.range_max)
            : sample.value;
    if (bad) {
      raise_fault(FaultCode::kAnalogInputFault, i, static_cast<std::uint16_t>(reason), category,
                  now_us);
    }
  }
  if (c.safety.max_digital_age_us != 0 && in.digital_age_us > c.safety.max_digital_age_us) {
    raise_fault(FaultCode::kDigitalInputsStale, 0, 0, category, now_us);
  }
}

void Controller::accept_soft_commands(const OperatorCommands& requested, std::uint32_t now_us) {
  commands_ = requested;
  // Almost every scan carries no soft command at all: find that out in one
  // pass over the flags before walking the table.
  const std::uint16_t refused =
      static_cast<std::uint16_t>(soft_commands_given(requested) & ~config_->operator_panel.soft_commands);
  if (refused != 0) {
    for (const SoftCommandRow& row : kSoftCommandTable) {
      if ((refused & soft_command_bit(row.command)) == 0) continue;
      bool* flag = soft_command_flag(commands_, row.command);
      if (flag != nullptr) {
        *flag = false;
      } else {  // jog: one enable for every function's direction
        for (Direction& d : commands_.jog) d = Direction::kNone;
      }
    }
  }
  // Logged once when a refused command is first given, not on every scan it is held.
  const std::uint16_t fresh = static_cast<std::uint16_t>(refused & ~refused_commands_);
  if (fresh != 0) {
    for (const SoftCommandRow& row : kSoftCommandTable) {
      if ((fresh & soft_command_bit(row.command)) != 0) {
        log(now_us, EventCode::kSoftCommandRefused, static_cast<std::uint8_t>(row.command), 0);
      }
    }
  }
  refused_commands_ = refused;
}

void Controller::update_two_hand(const InputImage& in, std::uint32_t dt_us, std::uint32_t now_us) {
  const MachineConfig& c = *config_;
  for (std::uint8_t i = 0; i < c.two_hand_count; ++i) {
    const TwoHandConfig& t = c.two_hand[i];
    bool late = false;
    two_hand_[i] = advance_two_hand(two_hand_[i], in.digital[t.left_input],
                                    in.digital[t.right_input], dt_us, t.max_sync_us, late);
    if (late) log(now_us, EventCode::kTwoHandBlocked, i, 0);
    const bool held = two_hand_[i].phase == TwoHandPhase::kHeld;
    if (diag_.two_hand_held[i] && !held && ((static_cast<unsigned>(holding_devices_) >> i) & 1u) != 0 &&
        chain_running(diag_.state)) {
      log(now_us, EventCode::kTwoHandReleased, i, 0);
    }
    diag_.two_hand_held[i] = held;
  }
}

void Controller::evaluate_conditions(const InputImage& in, std::uint32_t dt_us) {
  const MachineConfig& c = *config_;
  for (std::uint16_t i = 0; i < c.node_count; ++i) {
    const ConditionNode& n = c.nodes[i];
    NodeState& s = nodes_[i];
    bool v = false;
    switch (n.op) {
      case ConditionOp::kTrue:
        v = true;
        break;
      case ConditionOp::kFalse:
        v = false;
        break;
      case ConditionOp::kDigitalInput:
        v = in.digital[n.a];
        break;
      case ConditionOp::kAnalogAbove: {
        const float x = diag_.analog_value[n.a];
        v = s.value ? x > n.threshold - n.hysteresis : x > n.threshold;
        break;
      }
      case ConditionOp::kAnalogBelow: {
        const float x = diag_.analog_value[n.a];
        v = s.value ? x < n.threshold + n.hysteresis : x < n.threshold;
        break;
      }
      case ConditionOp::kFunctionState: {
        const FunctionConfig& f = c.functions[n.a];
        const MotionState motion = diag_.functions[n.a].motion;
        switch (static_cast<FunctionCondition>(n.b)) {
          case FunctionCondition::kAtExtendedEnd:
            v = f.extended_end_input != kNoIndex8 && in.digital[f.extended_end_input];
            break;
          case FunctionCondition::kAtRetractedEnd:
            v = f.retracted_end_input != kNoIndex8 && in.digital[f.retracted_end_input];
            break;
          case FunctionCondition::kExtending:
            v = motion == MotionState::kExtending;
            break;
          case FunctionCondition::kRetracting:
            v = motion == MotionState::kRetracting;
            break;
          case FunctionCondition::kStopped:
            v = motion == MotionState::kStopped;
            break;
        }
        break;
      }
      case ConditionOp::kNodeRef:
        v = nodes_[n.a].value;
        break;
      case ConditionOp::kStepActive:
        v = diag_.active_step == n.a;
        break;
      case ConditionOp::kTwoHandHeld:
        v = diag_.two_hand_held[n.a];
        break;
      case ConditionOp::kModeIs:
        v = n.b == 0 ? diag_.state == MachineState::kManual
                     : (diag_.state == MachineState::kAutoIdle || diag_.state == MachineState::kAutoHeld ||
                        chain_running(diag_.state));
        break;
      case ConditionOp::kPowerUnitReady:
        v = !c.power_unit.present || diag_.power_unit == PowerUnitState::kReady;
        break;
      case ConditionOp::kNot:
        v = !nodes_[n.a].value;
        break;
      case ConditionOp::kAll:
        v = true;
        for (std::uint16_t k = 0; k < n.b; ++k) v = v && nodes_[c.child_slots[n.a + k]].value;
        break;
      case ConditionOp::kAny:
        v = false;
        for (std::uint16_t k = 0; k < n.b; ++k) v = v || nodes_[c.child_slots[n.a + k]].value;
        break;
      case ConditionOp::kOnDelay:
        s.timer_us = nodes_[n.a].value ? saturating_add(s.timer_us, dt_us) : 0;
        v = nodes_[n.a].value && s.timer_us >= n.time_us;
        break;
      case ConditionOp::kOffDelay:
        // At power-up the child counts as "off for long": an off-delay must
        // not make a condition true that has never been true.
        if (first_scan_) s.timer_us = n.time_us;
        s.timer_us = nodes_[n.a].value ? 0 : saturating_add(s.timer_us, dt_us);
        v = nodes_[n.a].value || s.timer_us < n.time_us;
        break;
      case ConditionOp::kDebounce: {
        const bool raw = nodes_[n.a].value;
        if (first_scan_) {
          s.held = raw;  // nothing to debounce against yet
          s.timer_us = 0;
        } else if (raw == s.held) {
          s.timer_us = 0;
        } else {
          s.timer_us = saturating_add(s.timer_us, dt_us);
          if (s.timer_us >= n.time_us) {
            s.held = raw;
            s.timer_us = 0;
          }
        }
        v = s.held;
        break;
      }
    }
    s.value = v;
  }
}

std::uint16_t Controller::first_unmet(std::uint16_t index) const {
  const MachineConfig& c = *config_;
  // Descend through the node tree toward the leaf that holds the condition
  // false. Children have lower indices, so this always ends.
  while (index != kNoCondition && index < c.node_count) {
    const ConditionNode& n = c.nodes[index];
    std::uint16_t next = kNoCondition;
    switch (n.op) {
      case ConditionOp::kAll:
        for (std::uint16_t k = 0; k < n.b; ++k) {
          if (!nodes_[c.child_slots[n.a + k]].value) {
            next = c.child_slots[n.a + k];
            break;
          }
        }
        break;
      case ConditionOp::kNodeRef:
      case ConditionOp::kOnDelay:
      case ConditionOp::kDebounce:
        if (!nodes_[n.a].value) next = n.a;
        break;
      default:
        break;
    }
    if (next == kNoCondition) return index;
    index = next;
  }
  return index;
}

void Controller::update_interlocks(std::uint32_t now_us) {
  const MachineConfig& c = *config_;
  const std::uint32_t previous_ok = diag_.interlock_ok;
  blocked_motions_ = 0;
  immediate_motions_ = 0;
  diag_.interlock_ok = 0;
  for (std::uint8_t i = 0; i < c.interlock_count; ++i) {
    const InterlockConfig& il = c.interlocks[i];
    const std::uint32_t bit = std::uint32_t{1} << i;
    const bool ok = node(il.condition);
    if (ok) diag_.interlock_ok |= bit;
    if (il.kind == InterlockKind::kTrip) {
      if (!ok) {
        diag_.interlock_latched |= bit;
        raise_fault(FaultCode::kTrip, i, 0, il.stop_category, now_us);
      }
      if (diag_.interlock_latched & bit) blocked_motions_ |= il.guards;
    } else if (!ok) {
      blocked_motions_ |= il.guards;
      if (il.stop_category == StopCategory::kCat0) immediate_motions_ |= il.guards;
      if ((previous_ok & bit) && !first_scan_) log(now_us, EventCode::kPermissiveLost, i, 0);
    }
  }
  // A two-hand device that started the running cycle acts as a permissive
  // over its release_holds motions: ISO 13851 type III, continuous actuation
  // for the hazardous phase (from memory). Releasing either hand holds the
  // cycle; only a new two-hand actuation (a new cycle start) resumes it.
  for (std::uint8_t i = 0; i < c.two_hand_count; ++i) {
    if (((static_cast<unsigned>(holding_devices_) >> i) & 1u) != 0 && !diag_.two_hand_held[i]) {
      blocked_motions_ |= c.two_hand[i].release_holds;
    }
  }
}

void Controller::apply_event(MachineEvent event, std::uint32_t now_us) {
  const TransitionResult result = next_state(diag_.state, event);
  if (!result.handled || result.next == diag_.state) return;
  const MachineState old = diag_.state;
  diag_.state = result.next;
  log(now_us, EventCode::kStateChanged, static_cast<std::uint8_t>(result.next),
      static_cast<std::uint16_t>(old));
  if (result.next == MachineState::kManual || result.next == MachineState::kAutoIdle ||
      (result.next == MachineState::kAutoCycle && old == MachineState::kAutoIdle)) {
    diag_.active_step = 0;  // the chain starts from its initial step
    diag_.step_elapsed_us = 0;
    supervision_raised_ = false;
  }
}

void Controller::apply_fault_events(std::uint32_t now_us) {
  if (any_fault()) {
    apply_event(worst_category() == StopCategory::kCat0 ? MachineEvent::kFaultImmediate
                                                        : MachineEvent::kFaultControlled,
                now_us);
  }
}

bool Controller::initial_step_can_start() const {
  const MachineConfig& c = *config_;
  for (std::uint8_t t = 0; t < c.transition_count; ++t) {
    if (c.transitions[t].from_step == 0 && node(c.transitions[t].condition)) return true;
  }
  return false;
}

std::uint16_t Controller::initial_step_unmet() const {
  const MachineConfig& c = *config_;
  for (std::uint8_t t = 0; t < c.transition_count; ++t) {
    if (c.transitions[t].from_step == 0) return first_unmet(c.transitions[t].condition);
  }
  return kNoCondition;
}

void Controller::update_machine_state(std::uint32_t now_us) {
  const MachineConfig& c = *config_;
  const OperatorCommands& cmd = commands_;
  apply_fault_events(now_us);
  const bool reset = edge(node(c.operator_panel.reset) || cmd.reset, prev_reset_);
  const bool cycle_start =
      edge(node(c.operator_panel.cycle_start) || cmd.cycle_start, prev_cycle_start_);
  const bool cycle_stop = node(c.operator_panel.cycle_stop) || cmd.cycle_stop;
  operator_stop_ = node(c.operator_panel.stop) || cmd.stop;
  diag_.auto_selected = node(c.operator_panel.auto_mode) || cmd.select_auto;

  if (reset && (diag_.state == MachineState::kFaulted || diag_.state == MachineState::kPowerUp)) {
    bool cause_left = overflow_this_scan_;
    for (std::uint8_t i = 0; i < diag_.fault_count; ++i) {
      cause_left = cause_left || diag_.faults[i].cause_present;
    }
    if (!cause_left) {
      if (any_fault()) log(now_us, EventCode::kFaultsCleared, diag_.fault_count, 0);
      diag_.fault_count = 0;
      diag_.faults_overflowed = false;
      diag_.interlock_latched = 0;
      apply_event(MachineEvent::kReset, now_us);
      // A reset only permits; nothing else is acted on in the scan it happens.
      return;
    }
  }
  apply_event(diag_.auto_selected ? MachineEvent::kSelectAuto : MachineEvent::kSelectManual,
              now_us);
  if (operator_stop_) apply_event(MachineEvent::kStopRequest, now_us);
  if (cycle_start) {
    if (operator_stop_) {
      // The stop overrides every start.
      log(now_us, EventCode::kStartRefused, static_cast<std::uint8_t>(StartRefusal::kStopPressed), 0);
    } else if (diag_.state == MachineState::kAutoIdle && !initial_step_can_start()) {
      // A start the machine cannot act on now is refused, not stored: it
      // would otherwise fire by itself when the conditions come true later.
      log(now_us, EventCode::kStartRefused, static_cast<std::uint8_t>(StartRefusal::kNotReady),
          initial_step_unmet());
    } else {
      const MachineState before = diag_.state;
      apply_event(MachineEvent::kCycleStart, now_us);
      if (diag_.state != before) {
        // The devices held at this start hold the cycle when released.
        std::uint8_t held = 0;
        for (std::uint8_t i = 0; i < c.two_hand_count; ++i) {
          if (diag_.two_hand_held[i]) held = static_cast<std::uint8_t>(held | (1u << i));
        }
        holding_devices_ = static_cast<std::uint8_t>(held & cycle_start_devices_);
      }
    }
  }
  if (cycle_stop && (chain_running(diag_.state) || diag_.state == MachineState::kAutoHeld)) {
    end_cycle_requested_ = true;
  }
  if (end_cycle_requested_) apply_event(MachineEvent::kCycleStop, now_us);
  if (!chain_running(diag_.state) && diag_.state != MachineState::kAutoHeld) {
    end_cycle_requested_ = false;
    holding_devices_ = 0;
  }
  // A permissive that guards any motion the chain may still demand in this
  // cycle holds it, whatever the present step moves: closing a guard must
  // never let the cycle go on by itself.
  if (chain_running(diag_.state) && (blocked_motions_ & reach_[diag_.active_step]) != 0) {
    apply_event(MachineEvent::kPermissiveHold, now_us);
  }
}

void Controller::run_sequence(std::uint32_t dt_us, std::uint32_t now_us) {
  const MachineConfig& c = *config_;
  if (!chain_running(diag_.state) || c.step_count == 0) return;
  diag_.step_elapsed_us = saturating_add(diag_.step_elapsed_us, dt_us);
  const std::uint8_t active = diag_.active_step;
  const StepConfig& step = c.steps[active];
  for (std::uint8_t t = 0; t < c.transition_count; ++t) {
    const TransitionConfig& tr = c.transitions[t];
    if (tr.from_step != active) continue;
    // The initial step only waits for its start; its minimum time does not apply.
    if ((active != 0 && diag_.step_elapsed_us < step.min_time_us) || !node(tr.condition)) continue;
    diag_.active_step = tr.to_step;
    diag_.step_elapsed_us = 0;
    supervision_raised_ = false;
    log(now_us, EventCode::kStepChanged, tr.to_step, active);
    if (tr.to_step == 0) {
      ++diag_.completed_cycles;
      const bool continuous =
          node(c.operator_panel.continuous) || continuous_command_;  // read at the cycle's end
      apply_event(continuous ? MachineEvent::kCycleRepeat : MachineEvent::kCycleComplete, now_us);
    }
    return;  // one transition per scan
  }
  if (active == 0) {
    // A cycle (or a continuous repeat) whose start conditions do not hold
    // ends here instead of waiting to start by itself later.
    log(now_us, EventCode::kStartRefused, static_cast<std::uint8_t>(StartRefusal::kRepeatNotReady),
        initial_step_unmet());
    apply_event(MachineEvent::kCycleComplete, now_us);
    return;
  }
  if (step.supervision_us != 0 && diag_.step_elapsed_us > step.supervision_us &&
      !supervision_raised_) {
    supervision_raised_ = true;
    std::uint16_t unmet = kNoCondition;
    for (std::uint8_t t = 0; t < c.transition_count; ++t) {
      if (c.transitions[t].from_step == active) {
        unmet = first_unmet(c.transitions[t].condition);
        break;
      }
    }
    raise_fault(FaultCode::kStepSupervision, active, unmet, c.safety.supervision_category, now_us);
  }
}

void Controller::update_power_unit(std::uint32_t dt_us, std::uint32_t now_us) {
  const PowerUnitConfig& pu = config_->power_unit;
  if (!pu.present) {
    diag_.power_unit = PowerUnitState::kReady;
    return;
  }
  const PowerUnitState before = diag_.power_unit;
  const bool start = edge(node(pu.start) || commands_.pump_start, prev_pump_start_);
  const bool stop = node(pu.stop) || commands_.pump_stop;
  const bool allowed = pump_may_start(diag_.state) || diag_.state == MachineState::kStopping ||
                       (diag_.state == MachineState::kFaulted && !power_removed());
  const bool blocked = (blocked_motions_ & kPowerUnitGuardBit) != 0;
  PowerUnitState next = before;
  if (before != PowerUnitState::kOff && (stop || blocked || !allowed)) {
    next = PowerUnitState::kOff;
  } else {
    switch (before) {
      case PowerUnitState::kOff:
        if (start && pump_may_start(diag_.state) && !blocked) next = PowerUnitState::kStartingUnloaded;
        break;
      case PowerUnitState::kStartingUnloaded:
        pump_elapsed_us_ = saturating_add(pump_elapsed_us_, dt_us);
        if (pump_elapsed_us_ >= pu.unloaded_start_us) next = PowerUnitState::kLoading;
        break;
      case PowerUnitState::kLoading:
        pump_elapsed_us_ = saturating_add(pump_elapsed_us_, dt_us);
        if (pu.pressure_ready == kNoCondition || node(pu.pressure_ready)) {
          next = PowerUnitState::kReady;
        } else if (pu.pressure_ready_timeout_us != 0 &&
                   pump_elapsed_us_ > pu.pressure_ready_timeout_us) {
          raise_fault(FaultCode::kPressureNotReady, 0, 0, StopCategory::kCat1, now_us);
          next = PowerUnitState::kOff;
        }
        break;
      case PowerUnitState::kReady:
        break;
    }
  }
  if (next != before) {
    pump_elapsed_us_ = 0;
    diag_.power_unit = next;
    log(now_us, EventCode::kPowerUnitState, static_cast<std::uint8_t>(next), 0);
  }
}

void Controller::decide_demands(const InputImage& in, std::uint32_t now_us) {
  const MachineConfig& c = *config_;
  const bool pressure_available =
      !c.power_unit.present || diag_.power_unit == PowerUnitState::kReady;
  bool hold_chain = false;
  const StepConfig* step = chain_running(diag_.state) && c.step_count > 0
                               ? &c.steps[diag_.active_step]
                               : nullptr;
  for (std::uint8_t i = 0; i < c.function_count; ++i) {
    const FunctionConfig& f = c.functions[i];
    FunctionRuntime& r = functions_[i];
    Direction want = Direction::kNone;
    float speed = 0.0f;
    std::uint8_t ramp = r.ramp_index;
    if (diag_.state == MachineState::kManual) {
      const bool ext = node(f.jog_extend) || commands_.jog[i] == Direction::kExtend;
      const bool ret = node(f.jog_retract) || commands_.jog[i] == Direction::kRetract;
      // A jog held while the machine arrives in manual (reset, selector) must be
      // released and pressed again: a reset never starts motion by itself.
      if (!ext) r.rearm_extend = false;
      if (!ret) r.rearm_retract = false;
      // The operator stop holds every jog off; each needs a fresh press after.
      if (operator_stop_) r.rearm_extend = r.rearm_retract = true;
      const bool armed = ext ? !r.rearm_extend : !r.rearm_retract;
      if (ext != ret && armed) {  // both pressed means neither
        want = ext ? Direction::kExtend : Direction::kRetract;
        speed = f.jog_speed_percent * 0.01f;
        ramp = 0;
      }
    } else {
      r.rearm_extend = r.rearm_retract = true;
    }
    if (step != nullptr) {
      for (std::uint8_t k = 0; k < step->action_count; ++k) {
        const StepAction& a = step->actions[k];
        if (a.function != i) continue;
        want = a.direction;
        speed = a.speed_percent * 0.01f;
        ramp = a.ramp;
        break;
      }
    }
    if (!is_proportional(f.valve)) {
      speed = want == Direction::kNone ? 0.0f : 1.0f;
    } else if (want != Direction::kNone && in_slowdown(i, in, want) && speed > f.slowdown_speed_percent * 0.01f) {
      // Approaching the end: creep speed, reached on the ramp's deceleration.
      speed = f.slowdown_speed_percent * 0.01f;
    }
    const Direction requested = want;  // before any permissive or end of travel

    StopKind stop = StopKind::kNone;
    if (diag_.state == MachineState::kPowerUp || diag_.state == MachineState::kFaulted) {
      stop = power_removed() ? StopKind::kImmediate : StopKind::kQuick;
      want = Direction::kNone;
    } else if (diag_.state == MachineState::kStopping) {
      stop = worst_category() == StopCategory::kCat0 ? StopKind::kImmediate : StopKind::kQuick;
      want = Direction::kNone;
    }
    if (diag_.state == MachineState::kAutoHeld || operator_stop_) stop = StopKind::kQuick;
    const std::uint32_t bit = motion_bit(i, want);
    diag_.functions[i].blocked = false;
    if (want != Direction::kNone && ((blocked_motions_ & bit) || !pressure_available)) {
      diag_.functions[i].blocked = true;
      stop = (immediate_motions_ & bit) ? StopKind::kImmediate : StopKind::kQuick;
      // The lost permissive must not let the motion restart by itself when
      // it comes back: manual needs the jog pressed again, automatic a new
      // cycle start (the chain holds: see update_machine_state, and below
      // for lost pressure).
      (want == Direction::kExtend ? r.rearm_extend : r.rearm_retract) = true;
      if (chain_running(diag_.state) && (blocked_motions_ & bit) == 0) hold_chain = true;
      want = Direction::kNone;
    }
    // End of travel and the position window cut the motion at once, also
    // the side still moving while it decelerates. A motion cut at its end
    // stays cut until its demand is released: a load ringing back out of
    // the limit must not re-open the valve towards it, or the rod ratchets
    // past the limit and the trapped side's pressure climbs with each
    // re-opening (ISO 4413: surge pressure shall not cause a hazard, from
    // memory; IEC 60204-1 9.2.5.4 hold-to-run: a new press, from memory).
    update_limits(i);
    if (requested != Direction::kExtend) r.stopped_at_extend_end = false;
    if (requested != Direction::kRetract) r.stopped_at_retract_end = false;
    if (want != Direction::kNone) {
      bool& stopped = want == Direction::kExtend ? r.stopped_at_extend_end : r.stopped_at_retract_end;
      if (at_end(i, in, want)) {
        if (r.side == want) log(now_us, EventCode::kEndOfTravel, i, static_cast<std::uint16_t>(want));
        stopped = true;
      }
      if (stopped) {
        stop = StopKind::kImmediate;
        want = Direction::kNone;
      }
    }
    if (r.side != Direction::kNone && want != r.side && at_end(i, in, r.side)) stop = StopKind::kImmediate;
    // A category 0 permissive removes the valve's power (its enable) for as
    // long as it is lost, not only the command.
    r.enable_cut = (immediate_motions_ & (motion_bit(i, Direction::kExtend) |
                                          motion_bit(i, Direction::kRetract))) != 0;
    // A stop keeps its severity until the function is at rest: a quick stop
    // is not relaxed into a normal deceleration halfway.
    if (want == Direction::kNone && r.side != Direction::kNone && stop < r.stop) stop = r.stop;
    r.demand = want;
    r.speed = want == Direction::kNone ? 0.0f : speed;
    r.stop = stop;
    if (want != Direction::kNone) r.ramp_index = ramp;
  }
  if (hold_chain) apply_event(MachineEvent::kPermissiveHold, now_us);
}

void Controller::update_limits(std::uint8_t index) {
  const FunctionConfig& f = config_->functions[index];
  if (f.position_input == kNoIndex8) return;
  FunctionRuntime& r = functions_[index];
  const float pos = diag_.analog_value[f.position_input];
  const float band = f.limit_release_band;
  r.beyond_extend_limit = r.beyond_extend_limit ? pos > f.extend_limit - band : pos >= f.extend_limit;
  r.beyond_retract_limit = r.beyond_retract_limit ? pos < f.retract_limit + band : pos <= f.retract_limit;
}

bool Controller::at_end(std::uint8_t index, const InputImage& in, Direction side) const {
  const FunctionConfig& f = config_->functions[index];
  const FunctionRuntime& r = functions_[index];
  const std::uint8_t end = side == Direction::kExtend ? f.extended_end_input : f.retracted_end_input;
  if (end != kNoIndex8 && in.digital[end]) return true;
  return side == Direction::kExtend ? r.beyond_extend_limit : r.beyond_retract_limit;
}

bool Controller::in_slowdown(std::uint8_t index, const InputImage& in, Direction side) const {
  const FunctionConfig& f = config_->functions[index];
  const bool extend = side == Direction::kExtend;
  const std::uint8_t input = extend ? f.extend_slowdown_input : f.retract_slowdown_input;
  if (input != kNoIndex8 && in.digital[input]) return true;
  const float zone = extend ? f.extend_slowdown : f.retract_slowdown;
  if (zone == 0.0f || f.position_input == kNoIndex8) return false;
  const float pos = diag_.analog_value[f.position_input];
  return extend ? pos >= f.extend_limit - zone : pos <= f.retract_limit + zone;
}

void Controller::drive_function(std::uint8_t index, std::uint32_t dt_us) {
  const FunctionConfig& f = config_->functions[index];
  FunctionRuntime& r = functions_[index];
  FunctionStatus& status = diag_.functions[index];

  // Reversal through centre: the previous scan must have been centred and
  // the dwell must have passed before the other side may be driven.
  r.centred_us = r.side == Direction::kNone ? saturating_add(r.centred_us, dt_us) : 0;
  Direction want = r.demand;
  r.waiting_reversal = false;
  if (want != Direction::kNone && r.last_side != Direction::kNone && want != r.last_side) {
    const bool centred_long_enough = r.side == Direction::kNone && r.centred_us >= f.reversal_dwell_us;
    const bool still_moving = is_proportional(f.valve) && r.ramp.value != 0.0f;
    if (!centred_long_enough || still_moving) {
      r.waiting_reversal = !still_moving;
      if (!still_moving) want = Direction::kNone;
    }
  }

  Direction side = Direction::kNone;
  switch (f.valve) {
    case ValveKind::kSolenoid43SpringCentred:
      side = r.stop == StopKind::kNone ? want : Direction::kNone;
      if (r.stop != StopKind::kNone) side = Direction::kNone;
      break;
    case ValveKind::kSolenoid42SpringReturn:
      side = want == Direction::kExtend && r.stop == StopKind::kNone ? Direction::kExtend
                                                                     : Direction::kNone;
      break;
    case ValveKind::kSolenoid42Detented:
      if (r.pulse_side != Direction::kNone) {
        if (r.stop != StopKind::kNone) {
          // Any stop cuts a shift in progress; where the spool came to rest
          // is unknown, so the next command pulses whichever side it names.
          r.pulse_side = Direction::kNone;
          status.detent_side = Direction::kNone;
        } else {
          r.pulse_us = saturating_add(r.pulse_us, dt_us);
          if (r.pulse_us >= f.detent_pulse_us) {
            status.detent_side = r.pulse_side;
            r.pulse_side = Direction::kNone;
          }
        }
      }
      if (r.stop == StopKind::kNone && want != Direction::kNone && want != status.detent_side &&
          r.pulse_side == Direction::kNone) {
        r.pulse_side = want;
        r.pulse_us = 0;
      }
      side = r.pulse_side;
      break;
    case ValveKind::kProportional43TwoSolenoid:
    case ValveKind::kProportional43SignedCommand: {
      float target = 0.0f;
      if (want == Direction::kExtend) target = r.speed;
      if (want == Direction::kRetract) target = -r.speed;
      const float dt_s = static_cast<float>(dt_us) * 1e-6f;
      if (r.stop == StopKind::kImmediate) {
        r.ramp = RampState{};
      } else if (r.stop == StopKind::kQuick) {
        const RampLimits quick = quick_stop_limits(f.quick_stop_us);
        advance_ramp(r.ramp, 0.0f, quick, quick, dt_s);
      } else {
        const RampConfig& ramp = f.ramps[r.ramp_index < f.ramp_count ? r.ramp_index : 0];
        advance_ramp(r.ramp, target, ramp_limits(ramp, Direction::kExtend),
                     ramp_limits(ramp, Direction::kRetract), dt_s);
      }
      side = side_of(r.ramp.value);
      status.target = target;
      break;
    }
  }
  r.side = side;
  if (side != Direction::kNone) r.last_side = side;

  status.demand = r.demand;
  status.command = is_proportional(f.valve)
                       ? r.ramp.value
                       : (side == Direction::kExtend ? 1.0f : side == Direction::kRetract ? -1.0f : 0.0f);
  if (!is_proportional(f.valve)) status.target = status.command;
  if (f.valve == ValveKind::kSolenoid42Detented) {
    status.motion = status.detent_side == Direction::kExtend    ? MotionState::kExtending
                    : status.detent_side == Direction::kRetract ? MotionState::kRetracting
                                                                : MotionState::kStopped;
  } else if (side == Direction::kNone) {
    status.motion = r.waiting_reversal ? MotionState::kReversalDwell : MotionState::kStopped;
  } else if (side != r.demand) {
    status.motion = MotionState::kStopping;
  } else {
    status.motion = side == Direction::kExtend ? MotionState::kExtending : MotionState::kRetracting;
  }
}

bool Controller::all_stopped() const {
  for (std::uint8_t i = 0; i < config_->function_count; ++i) {
    if (functions_[i].side != Direction::kNone) return false;
  }
  return true;
}

void Controller::write_outputs(OutputImage& out) const {
  const MachineConfig& c = *config_;
  const bool powered = !power_removed();
  for (std::uint8_t i = 0; i < c.function_count; ++i) {
    const FunctionConfig& f = c.functions[i];
    const FunctionRuntime& r = functions_[i];
    // Never more than full scale, whatever a ramp did.
    const float cmd = r.ramp.value > 1.0f ? 1.0f : (r.ramp.value < -1.0f ? -1.0f : r.ramp.value);
    switch (f.valve) {
      case ValveKind::kSolenoid43SpringCentred:
      case ValveKind::kSolenoid42Detented:
        out.coils[f.coil_extend] = r.side == Direction::kExtend;
        out.coils[f.coil_retract] = r.side == Direction::kRetract;
        break;
      case ValveKind::kSolenoid42SpringReturn:
        out.coils[f.coil_extend] = r.side == Direction::kExtend;
        break;
      case ValveKind::kProportional43TwoSolenoid: {
        PropChannel& a = out.prop[f.prop_extend];
        PropChannel& b = out.prop[f.prop_retract];
        a.value = cmd > 0.0f ? current_for(f.current_extend, cmd) : 0.0f;
        b.value = cmd < 0.0f ? current_for(f.current_retract, -cmd) : 0.0f;
        if (a.value > 0.0f) {
          a.dither_amplitude_ma = f.dither_amplitude_ma;
          a.dither_frequency_hz = f.dither_frequency_hz;
        }
        if (b.value > 0.0f) {
          b.dither_amplitude_ma = f.dither_amplitude_ma;
          b.dither_frequency_hz = f.dither_frequency_hz;
        }
        break;
      }
      case ValveKind::kProportional43SignedCommand: {
        const float jump = f.deadband_jump_percent;
        PropChannel& ch = out.prop[f.prop_extend];
        ch.value = cmd > 0.0f   ? jump + (100.0f - jump) * cmd
                   : cmd < 0.0f ? -(jump + (100.0f - jump) * -cmd)
                                : 0.0f;
        break;
      }
    }
    if (f.enable_coil != kNoIndex8) out.coils[f.enable_coil] = powered && !r.enable_cut;
  }
  const PowerUnitConfig& pu = c.power_unit;
  if (pu.present) {
    const bool running = diag_.power_unit != PowerUnitState::kOff;
    out.coils[pu.motor_coil] = running;
    if (pu.dump_coil != kNoIndex8) {
      out.coils[pu.dump_coil] = diag_.power_unit == PowerUnitState::kLoading ||
                                diag_.power_unit == PowerUnitState::kReady;
    }
  }
}

void Controller::enforce_output_invariants(OutputImage& out, std::uint32_t now_us) {
  const MachineConfig& c = *config_;
  bool violated = false;
  for (std::uint8_t i = 0; i < c.function_count; ++i) {
    const FunctionConfig& f = c.functions[i];
    if (f.coil_extend != kNoIndex8 && f.coil_retract != kNoIndex8 && out.coils[f.coil_extend] &&
        out.coils[f.coil_retract])
      violated = true;
    if (f.valve == ValveKind::kProportional43TwoSolenoid && out.prop[f.prop_extend].value > 0.0f &&
        out.prop[f.prop_retract].value > 0.0f)
      violated = true;
  }
  if (violated) {
    out = OutputImage{};
    raise_fault(FaultCode::kOutputInvariant, 0, 0, StopCategory::kCat0, now_us);
    apply_event(MachineEvent::kFaultImmediate, now_us);
  }
}

void Controller::scan(const InputImage& in, std::uint32_t now_us, OutputImage& out) {
  out = OutputImage{};  // every channel off unless its owner drives it below
  const std::uint32_t raw_dt_us = first_scan_ ? 0 : now_us - previous_now_us_;  // modulo 2^32
  previous_now_us_ = now_us;
  diag_.last_scan_interval_us = raw_dt_us;
  if (!config_ok_ || config_ == nullptr) {
    if (diag_.fault_count == 0) raise_fault(FaultCode::kConfigInvalid, 0, 0, StopCategory::kCat0, now_us);
    diag_.state = MachineState::kFaulted;
    first_scan_ = false;
    return;
  }
  const MachineConfig& c = *config_;

  for (std::uint8_t i = 0; i < diag_.fault_count; ++i) diag_.faults[i].cause_present = false;
  overflow_this_scan_ = false;
  if (!first_scan_) {
    frozen_scans_ = raw_dt_us == 0 ? static_cast<std::uint8_t>(frozen_scans_ < 255 ? frozen_scans_ + 1 : 255) : 0;
    if (frozen_scans_ >= kMaxFrozenScans || raw_dt_us >= kMaxPlausibleIntervalUs) {
      raise_fault(FaultCode::kTimeSource, 0, 0, StopCategory::kCat0, now_us);
    }
    if (c.safety.watchdog_us != 0 && raw_dt_us > c.safety.watchdog_us) {
      // Raised for this scan only: once scans are on time again a reset may clear it.
      raise_fault(FaultCode::kScanWatchdog, 0, 0, StopCategory::kCat0, now_us);
    }
  }
  // A late scan is a fault already; timers and ramps integrate no more than
  // the watchdog interval, so nothing jumps ahead on the way to the stop.
  const std::uint32_t dt_us =
      c.safety.watchdog_us != 0 && raw_dt_us > c.safety.watchdog_us ? c.safety.watchdog_us : raw_dt_us;
  check_inputs(in, now_us);
  update_two_hand(in, dt_us, now_us);
  accept_soft_commands(in.commands, now_us);
  continuous_command_ = commands_.continuous;
  evaluate_conditions(in, dt_us);
  if (!in.digital[c.operator_panel.estop_input]) {  // normally closed: false = pressed or wire broken
    raise_fault(FaultCode::kEmergencyStop, 0, 0, c.operator_panel.estop_category, now_us);
  }
  update_interlocks(now_us);
  update_machine_state(now_us);
  run_sequence(dt_us, now_us);
  update_power_unit(dt_us, now_us);
  apply_fault_events(now_us);  // faults raised by the chain or the power unit act in this scan
  decide_demands(in, now_us);
  for (std::uint8_t i = 0; i < c.function_count; ++i) drive_function(i, dt_us);
  if (diag_.state == MachineState::kStopping) {
    // A controlled stop that does not finish in time becomes category 0,
    // counted in time and in scans so a slow clock cannot stretch it.
    stopping_us_ = saturating_add(stopping_us_, dt_us);
    ++stopping_scans_;
    const std::uint32_t period = c.safety.scan_period_us == 0 ? 1000u : c.safety.scan_period_us;
    if (stopping_us_ > stop_limit_us_ || stopping_scans_ > 4u * (stop_limit_us_ / period) + 100u) {
      raise_fault(FaultCode::kStopTimeout, 0, 0, StopCategory::kCat0, now_us);
      apply_event(MachineEvent::kFaultImmediate, now_us);
      decide_demands(in, now_us);
      for (std::uint8_t i = 0; i < c.function_count; ++i) drive_function(i, 0);
    }
  } else {
    stopping_us_ = 0;
    stopping_scans_ = 0;
  }
  if (diag_.state == MachineState::kStopping && all_stopped()) {
    apply_event(MachineEvent::kStopComplete, now_us);
    update_power_unit(0, now_us);  // category 1: power goes once the stop is complete
  }
  write_outputs(out);
  enforce_output_invariants(out, now_us);
  first_scan_ = false;
}

}  // namespace spoolstep::core
