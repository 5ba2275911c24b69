// The header `spoolstep export` wrote for the demo machine (at build time,
// see CMakeLists.txt) is compiled into this test and compared with what the
// host loader builds from the same file: field by field, floats by bits.
#include <gtest/gtest.h>

#include "config_compare.hpp"
#include "press_cell_config.hpp"  // generated: spoolstep::demo::kPressCell
#include "spoolstep/core/controller.hpp"
#include "spoolstep/machine_file/machine_file.hpp"

namespace {

using spoolstep::demo::kPressCell;

// The exported configuration is a constant expression: it needs no
// start-up code and lands in flash (.rodata) on the target.
constexpr std::uint8_t kExportedFunctions = kPressCell.function_count;
static_assert(kExportedFunctions > 0, "the exported demo machine has functions");

TEST(FirmwareExport, ExportedHeaderEqualsTheLoadersConfigurationFieldByField) {
  const auto loaded = spoolstep::machine_file::load_machine_file(SPOOLSTEP_DEMO_MACHINE);
  ASSERT_TRUE(loaded.ok()) << (loaded.errors.empty() ? "" : loaded.errors.front().to_string());
  const auto differences = spoolstep::firmware::testing::config_differences(loaded.machine->config, kPressCell);
  for (const auto& difference : differences) ADD_FAILURE() << difference;
  EXPECT_TRUE(differences.empty());
}

TEST(FirmwareExport, ComparisonCatchesAOneBitFloatDifference) {
  spoolstep::core::MachineConfig changed = kPressCell;
  std::uint32_t bits = 0;
  std::memcpy(&bits, &changed.functions[1].current_extend.max_ma, 4);
  bits ^= 1u;
  std::memcpy(&changed.functions[1].current_extend.max_ma, &bits, 4);
  const auto differences = spoolstep::firmware::testing::config_differences(kPressCell, changed);
  ASSERT_EQ(differences.size(), 1u);
  EXPECT_NE(differences.front().find("functions[1].current_extend.max_ma"), std::string::npos);
}

TEST(FirmwareExport, ExportedConfigurationPassesTheCoresValidation) {
  const auto status = spoolstep::core::validate_config(kPressCell);
  EXPECT_TRUE(status.is_ok()) << spoolstep::core::to_string(status.code()) << " in " << status.where() << "["
                              << status.index() << "]";
}

}  // namespace
