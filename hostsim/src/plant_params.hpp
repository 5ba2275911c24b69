#pragma once
// The plant parameter table: every field of the "plant" section with its
// type, unit, default, range and a one-line description. The loader
// validates against it and the docs are generated from it.
#include <cstddef>

namespace spoolstep::hostsim {

enum class ParamType { kNumber, kBool, kString, kObject, kArray, kStringOrObject };

struct ParamSpec {
  const char* section;      // "oil", "valves[]", "cylinders[].load", "" = the plant object itself
  const char* key;
  ParamType type;
  const char* unit;         // "" if none
  double default_value;     // numbers and bools (1 = true); ignored when required
  double min;
  double max;
  bool required;
  const char* choices;      // strings: "a|b|c", else nullptr; also the default is the first choice
  const char* description;
};

/// The table, in document order.
const ParamSpec* plant_params(std::size_t& count);

}  // namespace spoolstep::hostsim
