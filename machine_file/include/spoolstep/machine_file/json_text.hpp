#pragma once
/// Strict parsing of the project's JSON files (machine files, scenarios):
/// comments allowed, duplicate keys reported (a plain parser keeps the last
/// one silently), nesting bounded, syntax errors with line and column.
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include <nlohmann/json.hpp>

namespace spoolstep::machine_file {

/// Deeper nesting than this is refused: no file of ours needs it, and deep
/// documents would make every recursive walk over them unbounded.
inline constexpr int kMaxJsonDepth = 64;

struct ParsedJson {
  nlohmann::json doc;
  std::string syntax_error;  ///< "parse error at line 3, column 5: ..." or empty
  std::vector<std::pair<std::string, std::string>> duplicates;  ///< JSON pointer, key
  std::string too_deep_at;   ///< JSON pointer of the first value nested too deep, or empty
  bool too_deep = false;
  /// True when the text parsed with no duplicate and nothing too deep.
  bool ok() const { return syntax_error.empty() && duplicates.empty() && !too_deep; }
};

/// One JSON pointer reference token, escaped per RFC 6901 ("~" -> "~0", "/" -> "~1").
std::string escape_token(std::string_view token);

/// Parses `text`; never throws.
ParsedJson parse_json_text(const std::string& text);

}  // namespace spoolstep::machine_file
