#include "spoolstep/core/two_hand.hpp"

namespace spoolstep::core {

TwoHandStep advance_two_hand(TwoHandStep state, bool left, bool right, std::uint32_t dt_us,
                             std::uint32_t max_sync_us, bool& became_blocked) {
  became_blocked = false;
  const bool both = left && right;
  const bool none = !left && !right;
  switch (state.phase) {
    case TwoHandPhase::kIdle:
      if (both) return {TwoHandPhase::kHeld, 0};
      if (!none) return {TwoHandPhase::kOneHand, 0};
      return state;
    case TwoHandPhase::kOneHand: {
      const std::uint32_t since = state.since_first_us + dt_us < state.since_first_us
                                      ? 0xFFFFFFFFu
                                      : state.since_first_us + dt_us;
      if (none) return {TwoHandPhase::kIdle, 0};
      if (both && since <= max_sync_us) return {TwoHandPhase::kHeld, 0};
      if (since > max_sync_us) {
        became_blocked = true;
        return {TwoHandPhase::kBlocked, 0};
      }
      return {TwoHandPhase::kOneHand, since};
    }
    case TwoHandPhase::kHeld:
      if (none) return {TwoHandPhase::kIdle, 0};
      if (!both) return {TwoHandPhase::kBlocked, 0};
      return state;
    case TwoHandPhase::kBlocked:
      if (none) return {TwoHandPhase::kIdle, 0};
      return state;
  }
  return {TwoHandPhase::kBlocked, 0};  // unknown phase: fail to "no command"
}

}  // namespace spoolstep::core
