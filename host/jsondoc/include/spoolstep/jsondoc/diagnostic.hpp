#pragma once
/// One diagnostic type for every document the host reads (machine file, its
/// plant section, scenarios): where (file and RFC 6901 pointer), what is wrong,
/// what to do, and how serious it is.
#include <cstddef>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace spoolstep::jsondoc {

/// How serious a diagnostic is. Only an error stops a document from loading.
enum class Severity {
  kError,    ///< the document is refused
  kWarning,  ///< valid, but it weakens a safe default or looks unintended
  kNote,     ///< information that helps read another diagnostic
};

/// "error", "warning" or "note".
const char* severity_word(Severity severity);

/// One problem (or remark) in one document.
struct Diagnostic {
  std::string file;       ///< the file name as given (or the display name)
  std::string json_path;  ///< RFC 6901 pointer, "" for the whole document
  std::string reason;     ///< what is wrong, with the offending value
  std::string hint;       ///< what to do about it
  Severity severity = Severity::kError;

  /// "file: /json/path: reason. hint" (path left out when empty); warnings and
  /// notes carry their severity word after the file name.
  std::string to_string() const;
};

/// True when any diagnostic in `list` is an error.
bool has_error(const std::vector<Diagnostic>& list);

/// Longest piece of a document's text echoed into a message; a longer name is
/// cut there and says how long it was.
inline constexpr std::size_t kMaxEchoedChars = 80;

/// `text` made safe to print on a terminal: control characters and DEL become
/// \n, \t or \xHH escapes, and text past `max_chars` bytes is cut (on a UTF-8
/// character boundary) with "... (N bytes)" appended.
std::string printable(std::string_view text, std::size_t max_chars = kMaxEchoedChars);

/// The candidate closest to `word` by edit distance, if it is close enough to
/// be a likely typo (at most max(2, len/3) edits); nullopt otherwise. Words
/// longer than kMaxEchoedChars are never compared (the cost is quadratic).
std::optional<std::string> closest(std::string_view word, const std::vector<std::string>& candidates);

/// "Did you mean 'x'?" for the closest candidate, else `otherwise`.
std::string did_you_mean(std::string_view word, const std::vector<std::string>& candidates,
                         std::string_view otherwise);

/// One JSON pointer reference token, escaped per RFC 6901 ("~" -> "~0", "/" -> "~1").
std::string escape_token(std::string_view token);

}  // namespace spoolstep::jsondoc
