#pragma once
/// Error values of the core: no exceptions, and a dropped error is a compile
/// warning (and so an error in the core's own build).
#include <cstdint>

namespace spoolstep::core {

enum class StatusCode : std::uint8_t {
  kOk = 0,
  kIndexOutOfRange,   ///< a table refers to an I/O point, node, step or function that does not exist
  kCapacityExceeded,  ///< a count is above its compile-time capacity
  kBadOrder,          ///< a condition node reads a node that is not evaluated before it
  kBadValue,          ///< a value outside its range (negative time, crack above max, ...)
  kOutputShared,      ///< two owners for one output channel
  kMissingOutput,     ///< a valve kind lacks the output it needs
};

/// Result of a check; `where` names the table and `index` the row at fault.
class [[nodiscard]] Status {
 public:
  static constexpr Status ok() { return Status(StatusCode::kOk, "", 0); }
  static constexpr Status error(StatusCode code, const char* where, std::uint16_t index) {
    return Status(code, where, index);
  }
  constexpr bool is_ok() const { return code_ == StatusCode::kOk; }
  constexpr StatusCode code() const { return code_; }
  /// Static string naming the table at fault, e.g. "functions".
  constexpr const char* where() const { return where_; }
  constexpr std::uint16_t index() const { return index_; }
  /// Explicitly drop the status where ignoring it is correct.
  constexpr void ignore() const {}

 private:
  constexpr Status(StatusCode code, const char* where, std::uint16_t index)
      : code_(code), where_(where), index_(index) {}
  StatusCode code_;
  const char* where_;
  std::uint16_t index_;
};

/// Short static text for a status code.
const char* to_string(StatusCode code);

}  // namespace spoolstep::core
