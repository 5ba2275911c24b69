#include "spoolstep/io/clock.hpp"

#include <chrono>
#include <thread>

#include "spoolstep/io/ports.hpp"

namespace spoolstep::io {
namespace {

std::int64_t steady_ns() {
  return std::chrono::duration_cast<std::chrono::nanoseconds>(std::chrono::steady_clock::now().time_since_epoch())
      .count();
}

}  // namespace

const char* to_string(PortError error) {
  switch (error) {
    case PortError::kNone: return "ok";
    case PortError::kTimeout: return "timeout";
    case PortError::kDisconnected: return "disconnected";
    case PortError::kProtocol: return "protocol error";
    case PortError::kDeviceFault: return "device fault";
    case PortError::kModelFailed: return "model failed";
    case PortError::kScript: return "script error";
  }
  return "unknown error";
}

SteadyClock::SteadyClock() : origin_ns_(steady_ns()) {}

std::uint64_t SteadyClock::do_now_us() const {
  return static_cast<std::uint64_t>((steady_ns() - origin_ns_) / 1000);
}

void SteadyClock::do_sleep_until(std::uint64_t deadline_us) {
  // sleep_until on the steady clock itself: an absolute deadline does not
  // drift when one wait comes back late.
  const auto deadline = std::chrono::steady_clock::time_point(
      std::chrono::nanoseconds(origin_ns_ + static_cast<std::int64_t>(deadline_us) * 1000));
  std::this_thread::sleep_until(deadline);
}

}  // namespace spoolstep::io
