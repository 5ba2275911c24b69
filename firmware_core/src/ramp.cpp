#include "spoolstep/core/ramp.hpp"

#include <cmath>

namespace spoolstep::core {
namespace {

constexpr float kSettled = 1e-6f;  // closer than this to the target counts as there

float per_second(std::uint32_t full_scale_us) {
  return full_scale_us == 0 ? 0.0f : 1e6f / static_cast<float>(full_scale_us);
}

float clampf(float x, float lo, float hi) { return x < lo ? lo : (x > hi ? hi : x); }

// Linear rate limit on the magnitude m toward mt (both >= 0).
float linear_step(float m, float mt, const RampLimits& limits, float dt_s) {
  const float rate = mt > m ? limits.accel_per_s : limits.decel_per_s;
  if (rate <= 0.0f) return mt;  // no ramp configured: jump
  const float step = rate * dt_s;
  return mt > m ? (m + step > mt ? mt : m + step) : (m - step < mt ? mt : m - step);
}

}  // namespace

RampLimits ramp_limits(const RampConfig& ramp, Direction side) {
  RampLimits limits;
  const bool extend = side != Direction::kRetract;
  limits.accel_per_s = per_second(extend ? ramp.extend_accel_us : ramp.retract_accel_us);
  limits.decel_per_s = per_second(extend ? ramp.extend_decel_us : ramp.retract_decel_us);
  limits.jerk_time_s = ramp.profile == RampProfile::kSCurve
                           ? static_cast<float>(ramp.jerk_us) * 1e-6f
                           : 0.0f;
  return limits;
}

RampLimits quick_stop_limits(std::uint32_t quick_stop_us) {
  RampLimits limits;
  limits.accel_per_s = 0.0f;  // a stop never accelerates
  limits.decel_per_s = per_second(quick_stop_us);
  return limits;
}

void advance_ramp(RampState& state, float target, const RampLimits& extend,
                  const RampLimits& retract, float dt_s) {
  // Work on the magnitude of one side; a target across zero becomes zero.
  const float side_sign = state.value > 0.0f   ? 1.0f
                          : state.value < 0.0f ? -1.0f
                          : (target >= 0.0f ? 1.0f : -1.0f);
  const RampLimits& limits = side_sign > 0.0f ? extend : retract;
  const float m = side_sign * state.value;
  const float mt = side_sign * target > 0.0f ? side_sign * target : 0.0f;
  float q = side_sign * state.rate;

  if (dt_s <= 0.0f) return;

  const bool s_curve = limits.jerk_time_s > 0.0f && limits.accel_per_s > 0.0f &&
                       limits.decel_per_s > 0.0f;
  float m_next = m;
  if (!s_curve) {
    m_next = linear_step(m, mt, limits, dt_s);
    q = (m_next - m) / dt_s;
  } else {
    const float d = mt - m;
    if (std::fabs(d) < kSettled && std::fabs(q) < kSettled) {
      m_next = mt;
      q = 0.0f;
    } else {
      // Rate may change by at most jerk*dt per step. The largest rate that
      // still lets the rate fall back to zero exactly at the target with that
      // jerk solves q^2 + j*dt*q - 2*j*|d| = 0 (v advances by q*dt per step).
      const bool growing = d > 0.0f;
      const float a_max = growing ? limits.accel_per_s : limits.decel_per_s;
      const float jerk = a_max / limits.jerk_time_s;
      // The rate may come from another ramp (or a linear one): never carry
      // more than this ramp allows, and never keep growing once the target
      // is below the value -- a jerk limit must not delay slowing down.
      if (!growing && q > 0.0f) q = 0.0f;
      q = clampf(q, -limits.decel_per_s, limits.accel_per_s);
      const float jdt = jerk * dt_s;
      const float q_cap = 0.5f * (std::sqrt(jdt * jdt + 8.0f * jerk * std::fabs(d)) - jdt);
      const float q_wanted = growing ? (q_cap < a_max ? q_cap : a_max)
                                     : -(q_cap < a_max ? q_cap : a_max);
      q = q + clampf(q_wanted - q, -jdt, jdt);
      m_next = m + q * dt_s;
      // Arrived (or would pass it): settle exactly on the target.
      if ((growing && m_next >= mt) || (!growing && m_next <= mt)) {
        m_next = mt;
        q = 0.0f;
      }
    }
  }
  if (m_next <= 0.0f) {  // reached centre: stop there, never cross in one call
    m_next = 0.0f;
    if (q < 0.0f) q = 0.0f;
  }
  if (m_next > 1.0f) {  // never beyond full opening
    m_next = 1.0f;
    if (q > 0.0f) q = 0.0f;
  }
  state.value = side_sign * m_next;
  state.rate = side_sign * q;
}

}  // namespace spoolstep::core
