// Replays the generated golden vectors on the host core, configured from the
// exported header (not the loader): every scan's digest must equal the one
// the generator recorded. This is the host half of the bit-for-bit check the
// QEMU replay program does on the target with the same vectors and header.
#include <gtest/gtest.h>

#include "golden_vectors.hpp"     // generated: spoolstep::golden
#include "press_cell_config.hpp"  // generated: spoolstep::demo::kPressCell
#include "spoolstep/firmware/golden.hpp"

namespace {

namespace fw = spoolstep::firmware;
namespace golden = spoolstep::golden;

TEST(FirmwareGolden, HostReplayOfTheExportedDemoMatchesTheRecordedDigests) {
  spoolstep::core::Controller controller;
  ASSERT_TRUE(controller.init(spoolstep::demo::kPressCell).is_ok());
  std::uint32_t mismatches = 0;
  fw::Fnv1a total;
  const std::uint32_t scans = fw::replay(
      golden::kFrames, std::size(golden::kFrames), golden::kStartUs,
      [&](const spoolstep::core::InputImage& in, std::uint32_t now, spoolstep::core::OutputImage& out) {
        controller.scan(in, now, out);
      },
      [&](std::uint32_t index, std::uint32_t, const spoolstep::core::OutputImage& out) {
        const std::uint32_t digest = fw::scan_digest(spoolstep::demo::kPressCell, out, controller.diagnostics());
        total.u32(digest);
        if (index < golden::kScanCount && digest != golden::kDigests[index] && ++mismatches <= 5) {
          ADD_FAILURE() << "scan " << index << " differs";
        }
      });
  EXPECT_EQ(scans, golden::kScanCount);
  EXPECT_EQ(mismatches, 0u);
  EXPECT_EQ(total.value(), golden::kTotalDigest);
}

TEST(FirmwareGolden, VectorsRunTheDemoThroughACycleAndFaults) {
  // Guards against vectors that exercise nothing: replay and look at what happened.
  spoolstep::core::Controller controller;
  ASSERT_TRUE(controller.init(spoolstep::demo::kPressCell).is_ok());
  bool saw_estop = false, saw_trip = false, saw_cycle = false;
  fw::replay(
      golden::kFrames, std::size(golden::kFrames), golden::kStartUs,
      [&](const spoolstep::core::InputImage& in, std::uint32_t now, spoolstep::core::OutputImage& out) {
        controller.scan(in, now, out);
      },
      [&](std::uint32_t, std::uint32_t, const spoolstep::core::OutputImage&) {
        const auto& d = controller.diagnostics();
        saw_cycle = saw_cycle || d.completed_cycles >= 1;
        for (std::uint8_t i = 0; i < d.fault_count; ++i) {
          saw_estop = saw_estop || d.faults[i].code == spoolstep::core::FaultCode::kEmergencyStop;
          saw_trip = saw_trip || d.faults[i].code == spoolstep::core::FaultCode::kTrip;
        }
      });
  EXPECT_TRUE(saw_cycle);
  EXPECT_TRUE(saw_estop);
  EXPECT_TRUE(saw_trip);
  EXPECT_EQ(controller.diagnostics().state, spoolstep::core::MachineState::kManual);
}

}  // namespace
