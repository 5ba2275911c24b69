#pragma once
/// Speed ramps for proportional valves, as pure functions of state, target
/// and elapsed time. Values are signed fractions of full opening
/// (+1 full extend, -1 full retract); rates are per second.
#include "spoolstep/core/config.hpp"

namespace spoolstep::core {

/// Limits of one side (extend or retract) of a ramp.
struct RampLimits {
  float accel_per_s = 0.0f;  ///< while |value| grows; 0 means "jump at once"
  float decel_per_s = 0.0f;  ///< while |value| shrinks; 0 means "jump at once"
  float jerk_time_s = 0.0f;  ///< S-curve rounding; 0 = linear
};

struct RampState {
  float value = 0.0f;
  float rate = 0.0f;  ///< d(value)/dt of the last step (S-curve memory)
};

/// Limits for one side of a configured ramp (S-curve jerk only when the profile says so).
RampLimits ramp_limits(const RampConfig& ramp, Direction side);

/// Limits of a quick stop: linear deceleration over `quick_stop_us` per full scale.
RampLimits quick_stop_limits(std::uint32_t quick_stop_us);

/// Advances `state` toward `target` over dt_s. The value never crosses zero
/// in one call: a target on the other side is approached as zero, so a
/// reversal always passes through centre. A changed target continues from
/// the current value and rate (no step in value, none in rate for S-curves).
void advance_ramp(RampState& state, float target, const RampLimits& extend,
                  const RampLimits& retract, float dt_s);

}  // namespace spoolstep::core
