#pragma once
/// Where the scan loop takes its time from. The bench runs on a simulated
/// clock (nothing reads the wall clock, so a run is repeatable bit for bit);
/// a rack runtime runs on the steady clock.
#include <cstdint>

namespace spoolstep::io {

class Clock {
 public:
  virtual ~Clock() = default;
  /// Microseconds since the clock started; never goes backwards on its own.
  std::uint64_t now_us() const { return do_now_us(); }
  /// Waits until now_us() >= `deadline_us` (returns at once if it already is).
  void sleep_until(std::uint64_t deadline_us) { do_sleep_until(deadline_us); }

 private:
  virtual std::uint64_t do_now_us() const = 0;
  virtual void do_sleep_until(std::uint64_t deadline_us) = 0;
};

/// Simulated time: sleep_until jumps to the deadline at once. A skew can be
/// added to model a late scan: every later time stamp then comes that much
/// later while the schedule (and a plant stepped by it) keeps its period.
class SimulatedClock final : public Clock {
 public:
  /// Adds `us` to every time stamp from now on.
  void add_skew(std::uint64_t us) { skew_us_ += us; }
  /// The schedule's time, without the skew.
  std::uint64_t schedule_us() const { return base_us_; }

 private:
  std::uint64_t do_now_us() const override { return base_us_ + skew_us_; }
  void do_sleep_until(std::uint64_t deadline_us) override {
    if (deadline_us > base_us_) base_us_ = deadline_us;
  }
  std::uint64_t base_us_ = 0;
  std::uint64_t skew_us_ = 0;
};

/// The host's monotonic clock, counted from construction.
class SteadyClock final : public Clock {
 public:
  SteadyClock();

 private:
  std::uint64_t do_now_us() const override;
  void do_sleep_until(std::uint64_t deadline_us) override;
  std::int64_t origin_ns_;
};

}  // namespace spoolstep::io
