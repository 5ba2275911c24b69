#pragma once
/// Faults of a run in words: each fault the core raises, when, and what it
/// names (the step and the unmet condition of a supervision fault, the
/// interlock of a trip, the input and the reason of an input fault).
#include <cstdint>
#include <string>
#include <vector>

#include "spoolstep/core/config.hpp"
#include "spoolstep/core/io_image.hpp"
#include "spoolstep/runtime/scan_loop.hpp"

namespace spoolstep::benchrun {

/// One sentence for a fault of `machine`, e.g. "step 'press_force' supervision:
/// 'press_pressure > 180' did not come true".
std::string describe_fault(const core::MachineConfig& machine, const core::Fault& fault);

struct FaultEntry {
  double t_s = 0.0;
  std::string text;
  std::uint8_t category = 0;
};

/// An operator action the core did not act on (a refused cycle start or soft
/// command, a late second hand, a hand released that held the cycle).
struct NoticeEntry {
  double t_s = 0.0;
  std::string text;
};

/// One sentence for an event of `machine` an operator should see, or "" for
/// events that are not notices (state and step changes, faults: those are
/// in the trace and the fault list).
std::string describe_notice(const core::MachineConfig& machine, const core::Event& event);

/// Collects each fault once, when it first appears (again after a reset),
/// and every notice from the core's event log.
class FaultLog final : public runtime::ScanObserver {
 public:
  FaultLog(const core::MachineConfig& machine, double period_s) : machine_(machine), period_s_(period_s) {}
  /// Call after every scan, in order.
  void observe(const core::Diagnostics& diagnostics);
  const std::vector<FaultEntry>& entries() const { return entries_; }
  void after_scan(const runtime::ScanView& scan) override { observe(scan.diagnostics); }
  /// Refused starts and commands and the like, in the order they happened.
  const std::vector<NoticeEntry>& notices() const { return notices_; }

 private:
  const core::MachineConfig& machine_;
  double period_s_;
  std::uint64_t scans_ = 0;
  std::vector<std::uint32_t> active_;  // code << 16 | subject of the faults seen in the previous scan
  std::vector<FaultEntry> entries_;
  std::uint32_t events_seen_ = 0;
  std::vector<NoticeEntry> notices_;
};

}  // namespace spoolstep::benchrun
