#include "staged_directory.hpp"

#include <fstream>
#include <system_error>

namespace spoolstep::cli {
namespace {

namespace fs = std::filesystem;

// Marks a directory as a spoolstep output: only such a directory is ever
// replaced, so a mistyped --out cannot wipe someone's files.
constexpr const char* kMarker = ".spoolstep-run";

}  // namespace

StagedDirectory::StagedDirectory(fs::path target) : target_(std::move(target)) {
  std::error_code ec;
  if (target_.empty()) {
    error_ = "--out names no directory; give the folder for the results";
    return;
  }
  const fs::path absolute = fs::absolute(target_, ec);
  if (ec) { error_ = "cannot resolve " + target_.string() + ": " + ec.message(); return; }
  target_ = absolute.lexically_normal();
  if (target_.filename().empty()) target_ = target_.parent_path();
  if (fs::exists(target_) && !fs::is_directory(target_)) {
    error_ = target_.string() + " exists and is not a directory";
    return;
  }
  if (fs::exists(target_) && !fs::is_empty(target_) && !fs::exists(target_ / kMarker)) {
    error_ = target_.string() + " exists and holds files that are not a spoolstep run; choose another --out";
    return;
  }
  // Replacing the directory the user stands in (or one above it) would pull
  // the floor from under the shell.
  const fs::path cwd = fs::current_path(ec);
  if (!ec) {
    const fs::path here = cwd.lexically_normal();
    const auto rel = here.lexically_relative(target_);
    if (!rel.empty() && *rel.begin() != "..") {
      error_ = target_.string() + " is the current directory or above it; choose a subdirectory for --out";
      return;
    }
  }
  fs::create_directories(target_.parent_path(), ec);
  staging_ = target_;
  staging_ += ".partial";
  if (fs::exists(staging_) && !fs::exists(staging_ / kMarker)) {
    error_ = staging_.string() + " exists and is not a spoolstep staging directory; move it away";
    staging_.clear();
    return;
  }
  fs::remove_all(staging_, ec);
  if (!fs::create_directory(staging_, ec) || ec) {
    error_ = "cannot create " + staging_.string() + ": " + ec.message();
    write_failed_ = true;
    staging_.clear();
    return;
  }
  std::ofstream(staging_ / kMarker) << "spoolstep bench run output\n";
}

StagedDirectory::~StagedDirectory() {
  if (!committed_ && !staging_.empty()) {
    std::error_code ec;
    fs::remove_all(staging_, ec);
  }
}

bool StagedDirectory::commit() {
  if (!error_.empty()) return false;
  std::error_code ec;
  if (fs::exists(target_)) {
    fs::remove_all(target_, ec);
    if (ec) { error_ = "cannot replace " + target_.string() + ": " + ec.message(); return false; }
  }
  fs::rename(staging_, target_, ec);
  if (ec) { error_ = "cannot move the results into " + target_.string() + ": " + ec.message(); return false; }
  committed_ = true;
  return true;
}

}  // namespace spoolstep::cli
