#pragma once
/// Host-side loader for spoolstep machine files ("format": "spoolstep-machine/1").
/// It turns a JSON machine file into the core's plain-data MachineConfig, or
/// into a list of errors, each naming the file, the JSON pointer (RFC 6901),
/// the reason and what to do. Nothing is half-loaded: on any error there is
/// no machine.
#include <cstdint>
#include <memory>
#include <optional>
#include <ostream>
#include <string>
#include <string_view>
#include <vector>

#include <nlohmann/json.hpp>

#include "spoolstep/core/config.hpp"
#include "spoolstep/jsondoc/diagnostic.hpp"
#include "spoolstep/jsondoc/reader.hpp"

namespace spoolstep::machine_file {

/// The format tag every machine file must carry in "format".
inline constexpr const char* kFormatTag = "spoolstep-machine/1";

/// One problem in a machine file: the project's one diagnostic type.
using LoadError = jsondoc::Diagnostic;

/// Documented bounds on a machine file (machine-file-reference.md, "Limits"):
/// no realistic machine comes near them, and a file past them is refused in
/// milliseconds instead of being parsed and walked.
inline constexpr std::size_t kMaxMachineFileBytes = 1U << 20U;  ///< 1 MiB; the demo is 15 kB
/// Longest list anywhere in the file; the core's capacities (capacity.hpp) are far below it.
inline constexpr std::size_t kMaxMachineFileArrayItems = 1024;
inline constexpr int kMaxMachineFileDepth = 64;  ///< nesting depth, conditions included

/// The reader limits above, for the one JSON reader.
const jsondoc::ReadLimits& machine_file_limits();

/// A successfully loaded machine.
struct LoadedMachine {
  core::MachineConfig config;
  /// The raw "plant" section, or null when the file has none. The plant
  /// model (hostsim) owns and validates its contents.
  nlohmann::json plant;
  std::string source_path;
};

struct LoadResult {
  std::unique_ptr<LoadedMachine> machine;  ///< null whenever errors is non-empty
  std::vector<LoadError> errors;
  /// True when the machine loaded without any error.
  bool ok() const { return machine != nullptr && errors.empty(); }
};

/// Reads and loads a machine file. A missing or unreadable file and JSON
/// syntax errors (with line and column) are reported as errors too.
LoadResult load_machine_file(const std::string& path);

/// Loads a machine file from text; `display_name` is used as the file name
/// in errors and as source_path.
LoadResult load_machine_text(const std::string& text, const std::string& display_name);

/// Human-readable summary of a configuration: I/O points, functions with
/// valve kind, centre and ramps, interlocks with guards, two-hand devices,
/// sequence steps and transitions, conditions written out readably.
std::string summarize(const core::MachineConfig& config);

/// Warnings about a loaded configuration that is valid but weakens a safe
/// default (e.g. a two-hand start whose release does not hold every motion of
/// the cycle); one sentence each, empty when there is nothing to say.
std::vector<std::string> configuration_warnings(const core::MachineConfig& config);

/// Writes the Markdown parameter reference generated from the parameter
/// table (see parameters.hpp).
void write_parameter_reference(std::ostream& out);

/// Name lookups; each returns the index of the named item, or nullopt.
std::optional<std::uint8_t> find_digital_input(const core::MachineConfig& config, std::string_view name);
/// Index of the named analog input, or nullopt.
std::optional<std::uint8_t> find_analog_input(const core::MachineConfig& config, std::string_view name);
/// Index of the named on/off output (coil), or nullopt.
std::optional<std::uint8_t> find_coil(const core::MachineConfig& config, std::string_view name);
/// Index of the named proportional output channel, or nullopt.
std::optional<std::uint8_t> find_prop_output(const core::MachineConfig& config, std::string_view name);

/// The kinds of named item a document outside the machine file may refer to.
enum class NamedKind { kDigitalInput, kAnalogInput, kCoil, kPropOutput, kFunction, kStep };

/// Every name of one kind, in declaration order (for "did you mean" hints).
std::vector<std::string> names_of(const core::MachineConfig& config, NamedKind kind);
/// Index of the named function, or nullopt.
std::optional<std::uint8_t> find_function(const core::MachineConfig& config, std::string_view name);
/// Index of the named sequence step, or nullopt.
std::optional<std::uint8_t> find_step(const core::MachineConfig& config, std::string_view name);
/// Index of the named interlock, or nullopt.
std::optional<std::uint8_t> find_interlock(const core::MachineConfig& config, std::string_view name);
/// Index of the named two-hand device, or nullopt.
std::optional<std::uint8_t> find_two_hand(const core::MachineConfig& config, std::string_view name);
/// Index of the named ramp of function `function`, or nullopt.
std::optional<std::uint8_t> find_ramp(const core::MachineConfig& config, std::uint8_t function,
                                      std::string_view name);

/// The text of a fixed-size core name.
std::string_view name_view(const core::Name& name);

}  // namespace spoolstep::machine_file
