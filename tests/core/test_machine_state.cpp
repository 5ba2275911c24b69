// The machine lifecycle table, row by row.
#include <gtest/gtest.h>

#include "spoolstep/core/machine_state.hpp"

namespace spoolstep::core {
namespace {

struct Row {
  MachineState from;
  MachineEvent event;
  MachineState expected;
  bool handled;
  const char* why;
};

using S = MachineState;
using E = MachineEvent;

// clang-format off
const Row kRows[] = {
  {S::kPowerUp, E::kCycleStart, S::kPowerUp, false, "power-up ignores cycle start: no unexpected start-up (IEC 60204-1 7.5, from memory)"},
  {S::kPowerUp, E::kSelectAuto, S::kPowerUp, false, "power-up needs a reset before any mode"},
  {S::kPowerUp, E::kReset, S::kManual, true, "reset after power-up arms the machine in manual"},
  {S::kPowerUp, E::kFaultImmediate, S::kFaulted, true, "an e-stop at power-up latches"},
  {S::kManual, E::kSelectAuto, S::kAutoIdle, true, "selector to automatic"},
  {S::kManual, E::kCycleStart, S::kManual, false, "cycle start does nothing in manual"},
  {S::kManual, E::kFaultImmediate, S::kFaulted, true, "category 0 stops at once"},
  {S::kManual, E::kFaultControlled, S::kStopping, true, "category 1/2 ramps down first"},
  {S::kAutoIdle, E::kCycleStart, S::kAutoCycle, true, "cycle start runs the chain"},
  {S::kAutoIdle, E::kSelectManual, S::kManual, true, "selector to manual"},
  {S::kAutoIdle, E::kReset, S::kAutoIdle, false, "reset without a fault does nothing"},
  {S::kAutoCycle, E::kCycleStop, S::kAutoEndCycle, true, "cycle stop finishes the cycle"},
  {S::kAutoCycle, E::kCycleComplete, S::kAutoIdle, true, "single cycle ends in idle"},
  {S::kAutoCycle, E::kCycleRepeat, S::kAutoCycle, true, "continuous keeps cycling"},
  {S::kAutoCycle, E::kSelectManual, S::kManual, true, "selector to manual leaves the cycle"},
  {S::kAutoCycle, E::kCycleStart, S::kAutoCycle, false, "a second start while running is ignored"},
  {S::kAutoEndCycle, E::kCycleRepeat, S::kAutoIdle, true, "cycle stop wins over continuous"},
  {S::kAutoEndCycle, E::kCycleComplete, S::kAutoIdle, true, "end of the last cycle"},
  {S::kStopping, E::kStopComplete, S::kFaulted, true, "category 1: after the ramp, power off and latch"},
  {S::kStopping, E::kFaultImmediate, S::kFaulted, true, "a category 0 fault cuts a controlled stop short"},
  {S::kStopping, E::kReset, S::kStopping, false, "reset during a stop is ignored"},
  {S::kFaulted, E::kReset, S::kManual, true, "reset returns to manual, never to motion"},
  {S::kAutoCycle, E::kPermissiveHold, S::kAutoHeld, true, "a lost permissive holds the chain"},
  {S::kAutoEndCycle, E::kPermissiveHold, S::kAutoHeld, true, "also while ending the cycle"},
  {S::kAutoHeld, E::kCycleStart, S::kAutoCycle, true, "only a new start resumes"},
  {S::kAutoHeld, E::kReset, S::kAutoHeld, false, "reset does not resume a held cycle"},
  {S::kAutoHeld, E::kSelectManual, S::kManual, true, "selector to manual"},
  {S::kAutoHeld, E::kCycleComplete, S::kAutoHeld, false, "a held chain does not advance"},
  {S::kAutoCycle, E::kStopRequest, S::kAutoHeld, true, "the operator stop holds a running cycle"},
  {S::kAutoEndCycle, E::kStopRequest, S::kAutoHeld, true, "also while it ends"},
  {S::kManual, E::kStopRequest, S::kManual, false, "in manual the stop acts on the jogs, not the state"},
  {S::kFaulted, E::kCycleStart, S::kFaulted, false, "faulted ignores cycle start"},
  {S::kFaulted, E::kSelectAuto, S::kFaulted, false, "faulted ignores the selector"},
};
// clang-format on

TEST(MachineStateTable, EveryRowBehavesAsSpecified) {
  for (const Row& row : kRows) {
    const TransitionResult result = next_state(row.from, row.event);
    EXPECT_EQ(result.next, row.expected) << row.why;
    EXPECT_EQ(result.handled, row.handled) << row.why;
  }
}

TEST(MachineStateTable, NoStateLeadsToMotionFromFaultedExceptViaReset) {
  for (std::size_t e = 0; e < kMachineEventCount; ++e) {
    const auto event = static_cast<MachineEvent>(e);
    const TransitionResult result = next_state(MachineState::kFaulted, event);
    if (event == MachineEvent::kReset) continue;
    EXPECT_EQ(result.next, MachineState::kFaulted) << "event " << e;
  }
}

TEST(MachineStateTable, EveryRunningStateHandlesBothFaultKinds) {
  for (std::size_t s = 0; s < kMachineStateCount; ++s) {
    const auto state = static_cast<MachineState>(s);
    EXPECT_TRUE(next_state(state, MachineEvent::kFaultImmediate).handled) << "state " << s;
    EXPECT_EQ(next_state(state, MachineEvent::kFaultImmediate).next, MachineState::kFaulted);
    EXPECT_TRUE(next_state(state, MachineEvent::kFaultControlled).handled) << "state " << s;
  }
}

TEST(MachineStateTable, NoDuplicateRows) {
  const std::size_t rows = sizeof(kStateTable) / sizeof(kStateTable[0]);
  for (std::size_t i = 0; i < rows; ++i) {
    for (std::size_t j = i + 1; j < rows; ++j) {
      EXPECT_FALSE(kStateTable[i].from == kStateTable[j].from &&
                   kStateTable[i].event == kStateTable[j].event)
          << "rows " << i << " and " << j;
    }
  }
}

}  // namespace
}  // namespace spoolstep::core
