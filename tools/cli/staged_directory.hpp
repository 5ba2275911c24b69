#pragma once
// The output directory of a command (sim, replay): built beside its target
// and renamed into place whole, so a failed run leaves no half-written result
// and the previous one stays.
#include <filesystem>
#include <string>

namespace spoolstep::cli {

/// An output directory built in a staging folder beside the target and
/// renamed into place by commit(); dropped without a trace otherwise.
class StagedDirectory {
 public:
  /// Prepares `target`'s staging folder; check error() afterwards.
  explicit StagedDirectory(std::filesystem::path target);
  ~StagedDirectory();
  StagedDirectory(const StagedDirectory&) = delete;
  StagedDirectory& operator=(const StagedDirectory&) = delete;
  /// Empty when the staging folder is ready.
  const std::string& error() const { return error_; }
  /// Whether error() is a failure to write (permissions, read-only or full
  /// file system) rather than an unsuitable target the user named.
  bool write_failed() const { return write_failed_; }
  /// Path of a file inside the staging folder.
  std::filesystem::path file(const std::string& name) const { return staging_ / name; }
  /// Replaces `target` with the staged folder. A target that exists must be
  /// an earlier spoolstep output (it holds the marker file); returns false
  /// and sets error() otherwise.
  bool commit();

 private:
  std::filesystem::path target_;
  std::filesystem::path staging_;
  std::string error_;
  bool write_failed_ = false;
  bool committed_ = false;
};

}  // namespace spoolstep::cli
