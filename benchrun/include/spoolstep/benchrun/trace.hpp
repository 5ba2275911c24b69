#pragma once
/// A bench run produces one row of named signals per scan. Writers, the
/// expectation checker and the report all consume the same rows through the
/// TraceSink interface, so a run is streamed once and never held whole.
#include <string>
#include <vector>

namespace spoolstep::benchrun {

enum class SignalKind {
  kDigital,  ///< 0 or 1
  kInteger,  ///< a state or step index
  kAnalog,   ///< a real value in `unit`
};

/// What a signal measures; the report groups its plots by this.
enum class SignalGroup {
  kInput,
  kOutput,
  kCommand,   ///< a function's ramped command, -1..1
  kState,     ///< machine state, step, fault count
  kPressure,  ///< plant pressures
  kPosition,  ///< plant positions
  kVelocity,  ///< plant velocities
  kSpool,     ///< plant spool positions
  kOther,
};

struct Signal {
  std::string name;  ///< column name, e.g. "di.guard_door_closed", "p.press_cyl.A"
  std::string unit;  ///< "" for digital and integer signals
  SignalKind kind = SignalKind::kAnalog;
  SignalGroup group = SignalGroup::kOther;
  /// Names of an integer signal's values, by value ("state": the machine
  /// states; "step": the machine file's step names); empty otherwise.
  std::vector<std::string> value_names = {};
};

/// Receives the rows of a run.
class TraceSink {
 public:
  virtual ~TraceSink() = default;
  /// Called once before the first row.
  virtual void begin(const std::vector<Signal>& signals) = 0;
  /// One scan: time in seconds and one value per signal.
  virtual void row(double t_s, const std::vector<double>& values) = 0;
  /// Called once after the last row (also after an aborted run).
  virtual void end(double t_end_s) = 0;
};

/// Index of the named signal, or -1.
int find_signal(const std::vector<Signal>& signals, const std::string& name);

}  // namespace spoolstep::benchrun
