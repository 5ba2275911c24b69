// `spoolstep export` as a process: exit codes, and the atomic write (on any
// error nothing is written and an existing file is left as it was).
#include <gtest/gtest.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

namespace {

namespace fs = std::filesystem;

int run(const std::string& args) {
  const std::string command = std::string("\"") + SPOOLSTEP_CLI + "\" export " + args + " >/dev/null 2>&1";
  const int status = std::system(command.c_str());
  return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}

std::string read(const fs::path& path) {
  std::ifstream in(path, std::ios::binary);
  std::ostringstream text;
  text << in.rdbuf();
  return text.str();
}

class ExportCli : public ::testing::Test {
 protected:
  void SetUp() override {
    dir_ = fs::path(SPOOLSTEP_TEST_TMP) / ::testing::UnitTest::GetInstance()->current_test_info()->name();
    fs::remove_all(dir_);
    fs::create_directories(dir_);
  }
  std::size_t entries() const {
    return static_cast<std::size_t>(std::distance(fs::directory_iterator(dir_), fs::directory_iterator{}));
  }
  fs::path dir_;
};

TEST_F(ExportCli, WritesTheHeaderAndLeavesNoTemporaryFile) {
  const fs::path out = dir_ / "machine.hpp";
  ASSERT_EQ(run(std::string("\"") + SPOOLSTEP_DEMO_MACHINE + "\" -o \"" + out.string() + "\""), 0);
  EXPECT_NE(read(out).find("inline constexpr spoolstep::core::MachineConfig kMachine"), std::string::npos);
  EXPECT_EQ(entries(), 1u);
}

TEST_F(ExportCli, InvalidMachineFileExitsTwoAndKeepsTheOldHeader) {
  const fs::path bad = dir_ / "bad.json";
  std::ofstream(bad) << "{\"format\": \"spoolstep-machine/1\", \"machine\": ";
  const fs::path out = dir_ / "machine.hpp";
  std::ofstream(out) << "// old header\n";
  EXPECT_EQ(run("\"" + bad.string() + "\" -o \"" + out.string() + "\""), 2);
  EXPECT_EQ(read(out), "// old header\n");
  EXPECT_EQ(entries(), 2u);
}

TEST_F(ExportCli, UnwritableDestinationExitsThreeAndWritesNothing) {
  const fs::path out = dir_ / "missing_dir" / "machine.hpp";
  EXPECT_EQ(run(std::string("\"") + SPOOLSTEP_DEMO_MACHINE + "\" -o \"" + out.string() + "\""), 3);
  EXPECT_FALSE(fs::exists(out));
  EXPECT_EQ(entries(), 0u);
}

TEST_F(ExportCli, BadSymbolIsRejectedBeforeAnythingIsWritten) {
  const fs::path out = dir_ / "machine.hpp";
  EXPECT_EQ(run(std::string("\"") + SPOOLSTEP_DEMO_MACHINE + "\" --symbol 9lives -o \"" + out.string() + "\""), 2);
  EXPECT_FALSE(fs::exists(out));
}

}  // namespace
