#pragma once
/// The one table of machine-file parameters. Every scalar the loader reads
/// (numbers, choices, names, references, conditions) has a row here with its
/// JSON key path, type, unit, default, limits and a one-line description.
/// The loader validates against it; the Markdown reference is printed from it.
#include <cstddef>
#include <optional>
#include <string_view>
#include <vector>

#include "spoolstep/core/valve_kinds.hpp"

namespace spoolstep::machine_file {

enum class ParamType {
  kInteger,      ///< whole number, checked against min/max
  kNumber,       ///< any number, checked against min/max
  kChoice,       ///< one string out of `choices` ("a|b|c")
  kText,         ///< free text
  kName,         ///< a new name: letters, digits, '_', starting with a letter, at most 23 chars
  kDigitalInput, ///< name of a declared digital input
  kAnalogInput,  ///< name of a declared analog input
  kCoil,         ///< name of a declared coil output
  kPropOutput,   ///< name of a declared proportional output
  kFunction,     ///< name of a declared function
  kStep,         ///< name of a declared step
  kRamp,         ///< name of a ramp of the action's function
  kInterlock,    ///< name of a declared interlock
  kTwoHand,      ///< name of a declared two-hand device
  kCondition,    ///< a condition (see config/README.md)
  kRange,        ///< [low, high], two numbers
  kGuardList,    ///< list of guard names
  kSoftCommandList,  ///< list of soft command names (core::kSoftCommandTable)
};

/// When a parameter must be given. The loader enforces kAlways and kInObject
/// generically; a kWhen row is enforced by the loader's code for that case,
/// and its `when` text is what the reference prints.
struct Presence {
  enum class Kind {
    kOptional,  ///< may be left out (then the default applies)
    kAlways,    ///< must be given wherever its object is (top level, or each list item)
    kInObject,  ///< its enclosing object is optional; once that object is given, this must be too
    kWhen,      ///< must be given in the case `when` describes; otherwise optional (or not allowed)
  };
  Kind kind;
  std::string_view when;  ///< kWhen: "the valve kind is proportional" and the like
  /// True when the loader's generic reading must report it missing.
  constexpr bool required_in_object() const { return kind == Kind::kAlways || kind == Kind::kInObject; }
};

struct Parameter {
  std::string_view key;  ///< JSON pointer pattern; "*" stands for an array index; "<condition>" for any condition
  ParamType type;
  std::string_view unit;  ///< "" when unitless
  Presence presence;
  std::string_view default_value;  ///< used when absent and not required; "" = none (feature off)
  double min;  ///< numeric types only
  double max;
  std::string_view choices;      ///< kChoice: "a|b|c"
  std::string_view description;  ///< one line
  std::string_view limit_note;   ///< why the limits are what they are; used as the hint on range errors
};

/// Number of rows in the parameter table.
std::size_t parameter_count();
/// Row `index` of the parameter table (index < parameter_count()).
const Parameter& parameter_at(std::size_t index);
/// The row for a key pattern, or nullptr.
const Parameter* find_parameter(std::string_view key);
/// The valve fields a kind has of its own (its outputs and settings, "centre"
/// for 4/3 kinds), from the core's kValveKinds row; every other kind-specific
/// field is not allowed on it. Read by the loader and the reference.
std::vector<std::string_view> valve_keys_of(const core::ValveKindRow& row);

/// Text name of a parameter type, as printed in the reference.
std::string_view to_string(ParamType type);

}  // namespace spoolstep::machine_file
