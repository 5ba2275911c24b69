#pragma once
/// Ports between the control core's images and whatever sits behind them:
/// the plant model on the bench, a simulated rack, a real Modbus rack. Each
/// port does one thing (an input port cannot write outputs), and every method
/// that can fail returns a PortStatus the scan loop must look at: a backend
/// that failed must never leave the core running on stale data.
#include <cstdint>
#include <string>
#include <utility>

#include "spoolstep/core/io_image.hpp"

namespace spoolstep::io {

/// Why a port failed, for callers that react differently (a Modbus runtime
/// reconnects after kDisconnected; a bench run ends on kModelFailed).
enum class PortError : std::uint8_t {
  kNone = 0,
  kTimeout,       ///< the device did not answer in time
  kDisconnected,  ///< the connection is gone
  kProtocol,      ///< a malformed or exception reply
  kDeviceFault,   ///< the device reported a fault of its own
  kModelFailed,   ///< a simulated backend failed (integrator gave up, non-finite state)
  kScript,        ///< a scripted event could not be applied
};

/// Short lower-case name of an error kind ("timeout", "model failed", ...).
const char* to_string(PortError error);

/// The result of one port operation: ok, or an error kind with a sentence
/// in words that names what failed. Dropping one is a bug: call ignore().
class [[nodiscard]] PortStatus {
 public:
  /// The operation succeeded.
  static PortStatus ok() { return PortStatus(); }
  /// The operation failed; `what` is a sentence for the user.
  static PortStatus failed(PortError error, std::string what) { return PortStatus(error, std::move(what)); }

  bool is_ok() const { return error_ == PortError::kNone; }
  PortError error() const { return error_; }
  const std::string& what() const { return what_; }
  /// Drops the status on purpose (say why at the call).
  void ignore() const {}

 private:
  PortStatus() = default;
  PortStatus(PortError error, std::string what) : error_(error), what_(std::move(what)) {}
  PortError error_ = PortError::kNone;
  std::string what_;
};

/// Fills the part of the input image its backend owns. The image persists
/// across scans: a port writes only the slots it owns and leaves the rest.
class InputPort {
 public:
  virtual ~InputPort() = default;
  /// Writes this port's inputs (values, health, age) for the scan scheduled
  /// at `scan_time_us`; returns an error if the inputs cannot be trusted.
  PortStatus read(core::InputImage& inputs, std::uint64_t scan_time_us) { return do_read(inputs, scan_time_us); }

 private:
  virtual PortStatus do_read(core::InputImage& inputs, std::uint64_t scan_time_us) = 0;
};

/// Takes the outputs of a scan to its backend.
class OutputPort {
 public:
  virtual ~OutputPort() = default;
  /// Sends `outputs` (the whole image) at `scan_time_us`; returns an error
  /// if they did not reach the backend.
  PortStatus write(const core::OutputImage& outputs, std::uint64_t scan_time_us) {
    return do_write(outputs, scan_time_us);
  }

 private:
  virtual PortStatus do_write(const core::OutputImage& outputs, std::uint64_t scan_time_us) = 0;
};

/// A simulated backend that moves on in time between scans (the plant model).
class Steppable {
 public:
  virtual ~Steppable() = default;
  /// Advances the model by `dt_us` under the last outputs written; returns an
  /// error naming the time and the cause if the model cannot go on.
  PortStatus advance(std::uint64_t dt_us) { return do_advance(dt_us); }

 private:
  virtual PortStatus do_advance(std::uint64_t dt_us) = 0;
};

/// An output port that discards everything (a run of the core alone).
class DiscardingOutputPort final : public OutputPort {
 private:
  PortStatus do_write(const core::OutputImage&, std::uint64_t) override { return PortStatus::ok(); }
};

/// An input port that changes nothing (every input then comes from a decorator).
class UnchangedInputPort final : public InputPort {
 private:
  PortStatus do_read(core::InputImage&, std::uint64_t) override { return PortStatus::ok(); }
};

/// The safe output image: every coil and every current off, so spring-centred
/// valves centre and the pump unloads (what IEC 60204-1 stop category 0 asks of
/// the outputs).
inline core::OutputImage safe_outputs() { return core::OutputImage{}; }

}  // namespace spoolstep::io
