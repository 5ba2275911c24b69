#pragma once
/// Two-hand control device, ISO 13851 type III behaviour: the output is true
/// only while both hands act, both having started within the synchronous
/// time; releasing either ends it; both must be released before it can be
/// given again.
#include <cstdint>

namespace spoolstep::core {

enum class TwoHandPhase : std::uint8_t {
  kIdle = 0,  ///< both released: ready for a new actuation
  kOneHand,   ///< one pressed, the synchronous time is running
  kHeld,      ///< both pressed in time: output true
  kBlocked,   ///< too late, or one released: waits for both to be released
};

struct TwoHandStep {
  TwoHandPhase phase = TwoHandPhase::kIdle;
  std::uint32_t since_first_us = 0;  ///< time since the first hand, in kOneHand
};

/// Next phase of one device. `dt_us` is the time since the previous call.
/// Returns the new state; `became_blocked` reports a late second hand.
TwoHandStep advance_two_hand(TwoHandStep state, bool left, bool right, std::uint32_t dt_us,
                             std::uint32_t max_sync_us, bool& became_blocked);

}  // namespace spoolstep::core
