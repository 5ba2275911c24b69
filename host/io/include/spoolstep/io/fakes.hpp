#pragma once
/// Recording fakes for tests of the core and of the runtime: a scripted input
/// port and an output port that records every change with the clock's time
/// stamp. Both can be told to fail, so fault paths get tests of their own.
#include <cstdint>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "spoolstep/io/clock.hpp"
#include "spoolstep/io/ports.hpp"

namespace spoolstep::io {

/// Plays scripted changes into the input image: each change runs once, in
/// the first scan at or after its time, in the order the changes were added.
class ScriptedInputPort final : public InputPort {
 public:
  using Change = std::function<void(core::InputImage&)>;
  /// Adds a change that applies from `at_us` on (scan times).
  void at(std::uint64_t at_us, Change change);
  /// Makes every read from `at_us` on fail with `error` and `what`.
  void fail_from(std::uint64_t at_us, PortError error, std::string what);
  /// Reads made so far (failed ones included).
  std::uint64_t reads() const { return reads_; }

 private:
  struct Scripted {
    std::uint64_t at_us;
    Change change;
    bool done;
  };
  PortStatus do_read(core::InputImage& inputs, std::uint64_t scan_time_us) override;
  std::vector<Scripted> changes_;
  std::optional<std::uint64_t> fail_from_us_;
  PortError fail_error_ = PortError::kNone;
  std::string fail_what_;
  std::uint64_t reads_ = 0;
};

/// One output that changed, stamped with the clock's time.
struct OutputChange {
  enum class Channel : std::uint8_t { kCoil, kProp };
  std::uint64_t time_us = 0;
  Channel channel = Channel::kCoil;
  std::uint8_t index = 0;
  float value = 0.0f;  ///< 0 or 1 for a coil; mA or percent for a proportional channel
  bool operator==(const OutputChange& o) const {
    return time_us == o.time_us && channel == o.channel && index == o.index && value == o.value;
  }
};

/// Records every change of a coil or a proportional channel's value against
/// the last image written (the first write is compared with all off).
class RecordingOutputPort final : public OutputPort {
 public:
  explicit RecordingOutputPort(const Clock& clock) : clock_(clock) {}
  /// Makes every write from `at_us` on fail (the image is still recorded:
  /// a rack that fails may have taken it).
  void fail_from(std::uint64_t at_us, PortError error, std::string what);
  const std::vector<OutputChange>& changes() const { return changes_; }
  /// The last image written.
  const core::OutputImage& last() const { return last_; }
  std::uint64_t writes() const { return writes_; }
  /// True when every coil and every channel of the last image is off.
  bool last_is_all_off() const;

 private:
  PortStatus do_write(const core::OutputImage& outputs, std::uint64_t scan_time_us) override;
  const Clock& clock_;
  core::OutputImage last_{};
  std::vector<OutputChange> changes_;
  std::optional<std::uint64_t> fail_from_us_;
  PortError fail_error_ = PortError::kNone;
  std::string fail_what_;
  std::uint64_t writes_ = 0;
};

}  // namespace spoolstep::io
