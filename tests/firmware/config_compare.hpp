#pragma once
// Field-by-field comparison of two machine configurations, floats by their
// bits, names by all their bytes, every row of every table (used or not).
// It walks the same field lists as the exporter (core/config_fields.hpp),
// which the build checks against the structs themselves, so a field added
// to a struct is compared here without anyone remembering to add it.
#include <array>
#include <cstdint>
#include <cstring>
#include <sstream>
#include <string>
#include <vector>

#include "spoolstep/core/config.hpp"
#include "spoolstep/core/config_fields.hpp"

namespace spoolstep::firmware::testing {

using namespace spoolstep::core;

class ConfigDiff {
 public:
  std::vector<std::string> differences;

  template <typename T>
  void same(const std::string& path, const T& a, const T& b) {
    if constexpr (std::is_same_v<T, float>) {
      std::uint32_t x = 0, y = 0;
      std::memcpy(&x, &a, 4);
      std::memcpy(&y, &b, 4);
      if (x != y) note(path, a, b);
    } else if constexpr (std::is_enum_v<T>) {
      if (a != b) note(path, static_cast<unsigned>(a), static_cast<unsigned>(b));
    } else if constexpr (std::is_same_v<T, Name>) {
      if (std::memcmp(a.text.data(), b.text.data(), a.text.size()) != 0) note(path, a.text.data(), b.text.data());
    } else {
      if (a != b) note(path, +a, +b);
    }
  }

 private:
  template <typename V>
  void note(const std::string& path, const V& a, const V& b) {
    std::ostringstream o;
    o << path << ": " << a << " vs " << b;
    differences.push_back(o.str());
  }
};

template <typename T>
struct is_std_array : std::false_type {};
template <typename T, std::size_t N>
struct is_std_array<std::array<T, N>> : std::true_type {};

template <typename T>
void compare(ConfigDiff& d, const std::string& p, const T& a, const T& b) {
  if constexpr (is_std_array<T>::value) {
    for (std::size_t i = 0; i < a.size(); ++i) compare(d, p + "[" + std::to_string(i) + "]", a[i], b[i]);
  } else if constexpr (std::is_same_v<T, Name> || !fields::has_fields<T>::value) {
    d.same(p, a, b);
  } else {
    fields::each([&](const char* name, auto member) { compare(d, p + "." + name, a.*member, b.*member); },
                 fields::Of<T>{});
  }
}

/// Every field of every row (used or not) that differs, as "path: a vs b".
inline std::vector<std::string> config_differences(const MachineConfig& a, const MachineConfig& b) {
  ConfigDiff d;
  compare(d, "config", a, b);
  return d.differences;
}

}  // namespace spoolstep::firmware::testing
