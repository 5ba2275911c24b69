#include "spoolstep/core/status.hpp"

namespace spoolstep::core {

const char* to_string(StatusCode code) {
  switch (code) {
    case StatusCode::kOk: return "ok";
    case StatusCode::kIndexOutOfRange: return "index out of range";
    case StatusCode::kCapacityExceeded: return "capacity exceeded";
    case StatusCode::kBadOrder: return "condition reads a node evaluated after it";
    case StatusCode::kBadValue: return "value out of range";
    case StatusCode::kOutputShared: return "output channel has two owners";
    case StatusCode::kMissingOutput: return "valve lacks an output its kind needs";
  }
  return "unknown status";
}

}  // namespace spoolstep::core
