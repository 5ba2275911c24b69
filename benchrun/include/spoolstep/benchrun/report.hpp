#pragma once
/// The files a bench run leaves behind: summary.json and a self-contained
/// report.html, written into an output directory that appears whole or not
/// at all.
#include <filesystem>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "spoolstep/benchrun/fault_log.hpp"
#include "spoolstep/benchrun/sinks.hpp"
#include "spoolstep/core/config.hpp"

namespace spoolstep::benchrun {

/// The caution every report carries.
extern const char* const kSafetyCaution;

struct RunReport {
  std::string machine_path;
  std::string scenario_path;
  std::string scenario_description;
  const core::MachineConfig* machine = nullptr;
  double duration_s = 0.0;
  std::uint64_t scans = 0;
  bool completed = false;
  std::string run_error;
  std::vector<ExpectationResult> expectations;
  std::vector<FaultEntry> faults;  ///< every fault the core raised, in order
  std::vector<NoticeEntry> notices;  ///< refused starts and commands, in order
  const FigureCollector* figures = nullptr;
  const PlotCollector* plots = nullptr;
};

/// summary.json: each expectation's result and the key figures.
nlohmann::json summary_json(const RunReport& report);

/// report.html: inline SVG plots (positions, pressures, valve commands and
/// spool positions, the step timeline), the results and the caution.
std::string report_html(const RunReport& report);

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

}  // namespace spoolstep::benchrun
