#pragma once
/// The one strict reader for the project's JSON documents (machine files,
/// scenarios). Comments are allowed; duplicate keys, absurd nesting, number
/// overflow, over-long arrays, over-large files and a root that is not an
/// object are refused with a pointer and a reason. The parse builds the tree
/// from SAX events in one linear pass (no per-value callback over a finished
/// tree), and every limit is checked while reading, so a huge or hostile file
/// is refused in milliseconds.
#include <cstddef>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "spoolstep/jsondoc/diagnostic.hpp"

namespace spoolstep::jsondoc {

/// Bounds on one document. Each document kind documents its own values in its
/// reference (machine-file-reference.md, scenario-format.md).
struct ReadLimits {
  std::size_t max_bytes = 1U << 20U;  ///< larger files are refused before parsing
  std::size_t max_array_items = 1024;  ///< any longer array is refused where it is
  int max_depth = 64;                  ///< deeper nesting is refused; no document of ours needs it
  const char* document_kind = "document";  ///< "machine file", "scenario": used in messages
};

/// A parsed document: the tree, or null with at least one error.
struct ReadResult {
  nlohmann::json root;                  ///< an object when ok(), null otherwise
  std::vector<Diagnostic> diagnostics;  ///< errors (duplicates, limits, syntax)
  /// True when the text parsed into an object and nothing was refused.
  bool ok() const { return !has_error(diagnostics) && root.is_object(); }
};

/// Parses `text`; `display_name` is the file name used in diagnostics. Never throws.
ReadResult read_text(const std::string& text, const std::string& display_name, const ReadLimits& limits);

/// Reads and parses the file at `path`: a missing, unreadable, non-regular or
/// over-large file is a diagnostic too. Never throws.
ReadResult read_file(const std::string& path, const ReadLimits& limits);

}  // namespace spoolstep::jsondoc
