// The field lists of core/config_fields.hpp are checked against the structs
// at compile time. These probes pin that the check sees what a sizeof guard
// missed: a bool added into padding, and a field dropped from a list.
#include <gtest/gtest.h>

#include "spoolstep/core/config_fields.hpp"

namespace spoolstep::config_field_probes {

// Before: 1 + 3 padding + 4 bytes. After: the bool fits in the padding and
// sizeof stays 8, but the member count goes from 2 to 3.
struct Before {
  std::uint8_t enable_coil = 0xFF;
  float limit = 0.0f;
};
struct AfterBoolInPadding {
  std::uint8_t enable_coil = 0xFF;
  bool new_flag = false;
  float limit = 0.0f;
};
static_assert(sizeof(Before) == sizeof(AfterBoolInPadding), "the probe must fit in padding to mean anything");

// Both structs list the same two fields (found by argument-dependent lookup).
template <typename V> constexpr void each(V&& v, core::fields::Of<Before>) {
  v("enable_coil", &Before::enable_coil);
  v("limit", &Before::limit);
}
template <typename V> constexpr void each(V&& v, core::fields::Of<AfterBoolInPadding>) {
  v("enable_coil", &AfterBoolInPadding::enable_coil);
  v("limit", &AfterBoolInPadding::limit);
}

static_assert(core::fields::lists_every_member<Before>());
static_assert(!core::fields::lists_every_member<AfterBoolInPadding>(),
              "a bool added into padding and left out of the list must be caught");

TEST(ConfigFields, EveryConfigStructListsEveryMember) {
  // The header's own static_asserts hold these; here they are visible as tests.
  EXPECT_TRUE(core::fields::lists_every_member<core::FunctionConfig>());
  EXPECT_TRUE(core::fields::lists_every_member<core::MachineConfig>());
  EXPECT_EQ(core::fields::listed_field_count<core::MachineConfig>(), core::fields::member_count<core::MachineConfig>());
  EXPECT_EQ(core::fields::member_count<AfterBoolInPadding>(), 3u);
  EXPECT_EQ(core::fields::listed_field_count<AfterBoolInPadding>(), 2u);
}

}  // namespace spoolstep::config_field_probes
