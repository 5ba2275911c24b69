#pragma once
/// Scenarios ("format": "spoolstep-scenario/1"): a timeline of operator
/// actions, input changes and plant faults, plus expectations checked
/// against the run. Loaded against a machine so every name is resolved
/// once, with errors that name the file, the JSON path and the reason.
#include <cstdint>
#include <functional>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "spoolstep/core/config.hpp"
#include "spoolstep/core/soft_command.hpp"
#include "spoolstep/jsondoc/reader.hpp"

namespace spoolstep::benchrun {

inline constexpr const char* kScenarioFormatTag = "spoolstep-scenario/1";

struct TimelineEvent {
  enum class Kind {
    kSetDigital,    ///< index, value
    kSetAnalog,     ///< index, value in engineering units (converted to mA for 4-20 mA inputs)
    kSetAnalogMa,   ///< index, raw loop current in mA
    kAnalogHealth,  ///< index, healthy flag
    kCommand,       ///< operator command by name (HMI), level
    kJog,           ///< function index, direction (HMI hold-to-run)
    kPlantFault,    ///< raw JSON handed to the plant
    kDelayScan,     ///< stall the next scan by `value` microseconds (scan watchdog tests)
  };
  std::uint64_t at_us = 0;
  Kind kind = Kind::kSetDigital;
  std::uint8_t index = 0;
  double value = 0.0;
  core::SoftCommand command = core::SoftCommand::kReset;  ///< kCommand: an on/off soft command (core::kSoftCommandTable)
  core::Direction direction = core::Direction::kNone;
  nlohmann::json plant_fault;
  std::string json_path;      ///< where it came from, for run-time errors
};

struct Expectation {
  enum class Kind {
    kStepReached,  ///< step reached before before_s
    kStateAt,      ///< machine state equals `state` at at_s
    kStaysWithin,  ///< signal within [min, max] over [from_s, to_s]
    kStillWhileOff,///< |signal| <= tolerance whenever digital input `input` has been false for grace_ms
    kSafeWithin,   ///< every valve output off within within_ms after at_s, and off for hold_ms after
    kFinalWithin,  ///< signal within [min, max] at the end
  };
  std::string name;
  Kind kind = Kind::kStepReached;
  std::string signal;
  std::uint8_t step = 0;
  std::uint8_t state = 0;
  std::uint8_t input = 0;
  double min = -1e300;
  double max = 1e300;
  double tolerance = 0.0;
  double at_s = 0.0;
  double before_s = 0.0;
  double from_s = 0.0;
  double to_s = 1e300;
  double within_ms = 0.0;
  double grace_ms = 0.0;  ///< still_while_off: stopping allowance after the input goes off
  double hold_ms = 100.0; ///< safe_within: the outputs must then stay off this long
  std::string json_path;
};

struct Scenario {
  std::string source_path;
  std::string description;
  double duration_s = 0.0;
  std::vector<TimelineEvent> events;  ///< sorted by time, stable
  std::vector<Expectation> expectations;
};

/// One problem in a scenario: the project's one diagnostic type.
using ScenarioError = jsondoc::Diagnostic;

/// Documented bounds on a scenario (docs/scenario-format.md, "Limits").
inline constexpr std::size_t kMaxScenarioBytes = 4U << 20U;  ///< 4 MiB
/// Longest list (timeline, expectations); a bench scenario with more events
/// than this is a recording, and belongs in a replay trace.
inline constexpr std::size_t kMaxScenarioArrayItems = 20000;

/// The reader limits above, for the one JSON reader.
const jsondoc::ReadLimits& scenario_limits();

/// What the scenario loader needs to know about the plant, if there is one.
struct PlantFacts {
  /// Digital inputs the plant drives (a scenario may not set them).
  std::vector<bool> plant_digital;
  /// Analog inputs the plant drives.
  std::vector<bool> plant_analog;
  /// Signal names the plant adds to the trace (for expectation checks).
  std::vector<std::string> signal_names;
  /// A problem in a plant fault object: the field at fault ("" for the
  /// object itself) and the reason.
  struct FaultProblem {
    std::string field;
    std::string reason;
  };
  /// Checks one plant fault object; returns the problem or nullopt.
  std::function<std::optional<FaultProblem>(const nlohmann::json&)> check_fault;
};

struct ScenarioLoad {
  std::unique_ptr<Scenario> scenario;  ///< null whenever errors is non-empty
  std::vector<ScenarioError> errors;
  bool ok() const { return scenario != nullptr && errors.empty(); }
};

/// Reads a scenario file and resolves it against `machine`. `plant` is null
/// for runs without a plant model (then plant faults are errors).
ScenarioLoad load_scenario_file(const std::string& path, const core::MachineConfig& machine,
                                const PlantFacts* plant);

/// Same, from text; `display_name` stands for the file in errors.
ScenarioLoad load_scenario_text(const std::string& text, const std::string& display_name,
                                const core::MachineConfig& machine, const PlantFacts* plant);

}  // namespace spoolstep::benchrun
