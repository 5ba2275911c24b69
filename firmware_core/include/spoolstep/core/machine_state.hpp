#pragma once
/// The machine lifecycle as a transition table that can be reviewed row by
/// row. What each state lets the outputs do is written at MachineState in
/// io_image.hpp. Any (state, event) pair without a row is ignored: the
/// state stays as it is.
#include <array>
#include <cstdint>

#include "spoolstep/core/io_image.hpp"

namespace spoolstep::core {

enum class MachineEvent : std::uint8_t {
  kFaultImmediate = 0,  ///< a category 0 fault (or e-stop) is active
  kFaultControlled,     ///< a category 1 or 2 fault is active
  kStopComplete,        ///< every function has come to rest
  kReset,               ///< reset pressed with no fault cause left
  kSelectAuto,          ///< selector in automatic (level)
  kSelectManual,        ///< selector in manual (level)
  kCycleStart,          ///< rising edge
  kCycleStop,           ///< stop at end of cycle
  kCycleComplete,       ///< the chain is back at its initial step, single cycle
  kCycleRepeat,         ///< the chain is back at its initial step, continuous
  kPermissiveHold,      ///< a permissive blocked a motion the chain demanded
  kStopRequest,         ///< the operator stop is pressed (level)
};
inline constexpr std::size_t kMachineEventCount = 12;

struct StateTransition {
  MachineState from;
  MachineEvent event;
  MachineState to;
};

// clang-format off
inline constexpr StateTransition kStateTable[] = {
  {MachineState::kPowerUp,      MachineEvent::kFaultImmediate,  MachineState::kFaulted},
  {MachineState::kPowerUp,      MachineEvent::kFaultControlled, MachineState::kFaulted},   // nothing moves yet
  {MachineState::kPowerUp,      MachineEvent::kReset,           MachineState::kManual},
  {MachineState::kManual,       MachineEvent::kFaultImmediate,  MachineState::kFaulted},
  {MachineState::kManual,       MachineEvent::kFaultControlled, MachineState::kStopping},
  {MachineState::kManual,       MachineEvent::kSelectAuto,      MachineState::kAutoIdle},
  {MachineState::kAutoIdle,     MachineEvent::kFaultImmediate,  MachineState::kFaulted},
  {MachineState::kAutoIdle,     MachineEvent::kFaultControlled, MachineState::kStopping},
  {MachineState::kAutoIdle,     MachineEvent::kSelectManual,    MachineState::kManual},
  {MachineState::kAutoIdle,     MachineEvent::kCycleStart,      MachineState::kAutoCycle},
  {MachineState::kAutoCycle,    MachineEvent::kFaultImmediate,  MachineState::kFaulted},
  {MachineState::kAutoCycle,    MachineEvent::kFaultControlled, MachineState::kStopping},
  {MachineState::kAutoCycle,    MachineEvent::kSelectManual,    MachineState::kManual},
  {MachineState::kAutoCycle,    MachineEvent::kCycleStop,       MachineState::kAutoEndCycle},
  {MachineState::kAutoCycle,    MachineEvent::kCycleComplete,   MachineState::kAutoIdle},
  {MachineState::kAutoCycle,    MachineEvent::kCycleRepeat,     MachineState::kAutoCycle},
  {MachineState::kAutoCycle,    MachineEvent::kPermissiveHold,  MachineState::kAutoHeld},
  {MachineState::kAutoCycle,    MachineEvent::kStopRequest,     MachineState::kAutoHeld},
  {MachineState::kAutoEndCycle, MachineEvent::kStopRequest,     MachineState::kAutoHeld},
  {MachineState::kAutoEndCycle, MachineEvent::kFaultImmediate,  MachineState::kFaulted},
  {MachineState::kAutoEndCycle, MachineEvent::kFaultControlled, MachineState::kStopping},
  {MachineState::kAutoEndCycle, MachineEvent::kSelectManual,    MachineState::kManual},
  {MachineState::kAutoEndCycle, MachineEvent::kCycleComplete,   MachineState::kAutoIdle},
  {MachineState::kAutoEndCycle, MachineEvent::kCycleRepeat,     MachineState::kAutoIdle},
  {MachineState::kAutoEndCycle, MachineEvent::kPermissiveHold,  MachineState::kAutoHeld},  // the end-of-cycle request is dropped
  {MachineState::kAutoHeld,     MachineEvent::kFaultImmediate,  MachineState::kFaulted},
  {MachineState::kAutoHeld,     MachineEvent::kFaultControlled, MachineState::kStopping},
  {MachineState::kAutoHeld,     MachineEvent::kSelectManual,    MachineState::kManual},
  {MachineState::kAutoHeld,     MachineEvent::kCycleStart,      MachineState::kAutoCycle},  // resumes the kept step
  {MachineState::kStopping,     MachineEvent::kFaultImmediate,  MachineState::kFaulted},
  {MachineState::kStopping,     MachineEvent::kStopComplete,    MachineState::kFaulted},
  {MachineState::kFaulted,      MachineEvent::kReset,           MachineState::kManual},
  // A controlled fault while already faulted changes nothing; listed so the
  // table states it rather than leaving it to the default.
  {MachineState::kFaulted,      MachineEvent::kFaultControlled, MachineState::kFaulted},
  {MachineState::kFaulted,      MachineEvent::kFaultImmediate,  MachineState::kFaulted},
  {MachineState::kStopping,     MachineEvent::kFaultControlled, MachineState::kStopping},
};
// clang-format on

struct TransitionResult {
  MachineState next;
  bool handled;  ///< false: no row, the event is ignored in this state
};

/// kStateTable as a direct lookup, built at compile time, so the scan pays
/// one index instead of a search: entry = next state + 1, 0 = no row.
struct StateLookup {
  std::array<std::array<std::uint8_t, kMachineEventCount>, kMachineStateCount> next{};
};

constexpr StateLookup make_state_lookup() {
  StateLookup lookup{};
  for (const StateTransition& row : kStateTable) {
    lookup.next[static_cast<std::size_t>(row.from)][static_cast<std::size_t>(row.event)] =
        static_cast<std::uint8_t>(static_cast<std::uint8_t>(row.to) + 1u);
  }
  return lookup;
}

inline constexpr StateLookup kStateLookup = make_state_lookup();

/// Looks up (state, event) in kStateTable.
constexpr TransitionResult next_state(MachineState state, MachineEvent event) {
  const auto s = static_cast<std::size_t>(state);
  const auto e = static_cast<std::size_t>(event);
  if (s >= kMachineStateCount || e >= kMachineEventCount) return {state, false};
  const std::uint8_t entry = kStateLookup.next[s][e];
  if (entry == 0) return {state, false};
  return {static_cast<MachineState>(entry - 1u), true};
}

/// True in the states where the step chain may run.
constexpr bool chain_running(MachineState state) {
  return state == MachineState::kAutoCycle || state == MachineState::kAutoEndCycle;
}

/// True in the states where the pump may be started.
constexpr bool pump_may_start(MachineState state) {
  return state == MachineState::kManual || state == MachineState::kAutoIdle ||
         state == MachineState::kAutoCycle || state == MachineState::kAutoEndCycle ||
         state == MachineState::kAutoHeld;
}

}  // namespace spoolstep::core
