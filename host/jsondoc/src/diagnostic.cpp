#include "spoolstep/jsondoc/diagnostic.hpp"

#include <algorithm>

#include <fmt/format.h>

namespace spoolstep::jsondoc {

const char* severity_word(Severity severity) {
  switch (severity) {
    case Severity::kError:
      return "error";
    case Severity::kWarning:
      return "warning";
    case Severity::kNote:
      return "note";
  }
  return "error";
}

std::string Diagnostic::to_string() const {
  std::string out = file + ": ";
  if (severity != Severity::kError) out += std::string(severity_word(severity)) + ": ";
  if (!json_path.empty()) out += printable(json_path, 2 * kMaxEchoedChars) + ": ";
  out += reason + ".";
  if (!hint.empty()) {
    // A hint is a sentence, however its writer spelled it.
    std::string sentence = hint;
    if (sentence[0] >= 'a' && sentence[0] <= 'z') sentence[0] = static_cast<char>(sentence[0] - 'a' + 'A');
    const char last = sentence.back();
    if (last != '.' && last != '?' && last != '!' && last != ')') sentence += '.';
    out += " " + sentence;
  }
  return out;
}

bool has_error(const std::vector<Diagnostic>& list) {
  return std::any_of(list.begin(), list.end(), [](const Diagnostic& d) { return d.severity == Severity::kError; });
}

std::string printable(std::string_view text, std::size_t max_chars) {
  std::size_t keep = std::min(text.size(), max_chars);
  // Never cut a UTF-8 sequence in half: back up over continuation bytes.
  if (keep < text.size()) {
    while (keep > 0 && (static_cast<unsigned char>(text[keep]) & 0xC0U) == 0x80U) --keep;
  }
  std::string out;
  out.reserve(keep + 16);
  for (std::size_t i = 0; i < keep; ++i) {
    const auto c = static_cast<unsigned char>(text[i]);
    const auto next = i + 1 < keep ? static_cast<unsigned char>(text[i + 1]) : 0U;
    const auto third = i + 2 < keep ? static_cast<unsigned char>(text[i + 2]) : 0U;
    // UTF-8 (RFC 3629) encodings of the C1 controls U+0080..U+009F, and of
    // the separators and bidirectional controls that can reorder or break a
    // terminal line: U+2028/2029, U+202A..U+202E, U+2066..U+2069.
    const bool c1 = c == 0xC2U && next >= 0x80U && next <= 0x9FU;
    const bool format = c == 0xE2U && ((next == 0x80U && third >= 0xA8U && third <= 0xAEU) ||
                                       (next == 0x81U && third >= 0xA6U && third <= 0xA9U));
    if (c1 || format) {
      const unsigned code = c1 ? next : (next == 0x80U ? 0x2000U : 0x2040U) + (third & 0x3FU);
      out += fmt::format("\\u{:04X}", code);
      i += c1 ? 1 : 2;
      continue;
    }
    if (c == '\n') {
      out += "\\n";
    } else if (c == '\t') {
      out += "\\t";
    } else if (c < 0x20U || c == 0x7FU) {
      out += fmt::format("\\x{:02X}", c);
    } else {
      out += static_cast<char>(c);
    }
  }
  if (keep < text.size()) out += fmt::format("... ({} bytes)", text.size());
  return out;
}

namespace {

std::size_t edit_distance(std::string_view a, std::string_view b) {
  std::vector<std::size_t> row(b.size() + 1);
  for (std::size_t j = 0; j <= b.size(); ++j) row[j] = j;
  for (std::size_t i = 1; i <= a.size(); ++i) {
    std::size_t diagonal = row[0];
    row[0] = i;
    for (std::size_t j = 1; j <= b.size(); ++j) {
      const std::size_t up = row[j];
      row[j] = std::min({row[j] + 1, row[j - 1] + 1, diagonal + (a[i - 1] == b[j - 1] ? 0U : 1U)});
      diagonal = up;
    }
  }
  return row[b.size()];
}

std::vector<std::string_view> words_of(std::string_view name) {
  std::vector<std::string_view> words;
  std::size_t start = 0;
  while (start <= name.size()) {
    const std::size_t end = std::min(name.find('_', start), name.size());
    words.push_back(name.substr(start, end - start));
    start = end + 1;
  }
  return words;
}

/// Word pairs of opposite meaning in signal names (common practice, no
/// source). Suggesting "guard_door_closed" for "guard_door_open" would turn
/// a typo into the opposite signal, so such a pair is never a suggestion.
bool opposite_words(std::string_view a, std::string_view b) {
  static constexpr std::string_view kPairs[][2] = {
      {"open", "closed"}, {"open", "close"}, {"ok", "nok"}, {"on", "off"}, {"extend", "retract"},
      {"extended", "retracted"}, {"up", "down"}, {"high", "low"}, {"in", "out"}, {"left", "right"},
      {"start", "stop"}, {"enable", "disable"}, {"enabled", "disabled"}, {"min", "max"}, {"top", "bottom"},
      {"forward", "reverse"}, {"raise", "lower"}, {"lock", "unlock"}, {"clamp", "unclamp"}, {"true", "false"}};
  for (const auto& pair : kPairs) {
    if ((a == pair[0] && b == pair[1]) || (a == pair[1] && b == pair[0])) return true;
  }
  return false;
}

/// True when `a` and `b` differ only in words of opposite meaning.
bool means_the_opposite(std::string_view a, std::string_view b) {
  const auto wa = words_of(a);
  const auto wb = words_of(b);
  if (wa.size() != wb.size()) return false;
  bool opposite = false;
  for (std::size_t i = 0; i < wa.size(); ++i) {
    if (wa[i] == wb[i]) continue;
    if (!opposite_words(wa[i], wb[i])) return false;
    opposite = true;
  }
  return opposite;
}

}  // namespace

std::optional<std::string> closest(std::string_view word, const std::vector<std::string>& candidates) {
  if (word.size() > kMaxEchoedChars) return std::nullopt;
  std::optional<std::string> best;
  std::size_t best_distance = std::max<std::size_t>(2, word.size() / 3) + 1;
  for (const auto& candidate : candidates) {
    if (candidate.size() > kMaxEchoedChars || means_the_opposite(word, candidate)) continue;
    const std::size_t d = edit_distance(word, candidate);
    if (d < best_distance) {
      best_distance = d;
      best = candidate;
    }
  }
  return best;
}

std::string did_you_mean(std::string_view word, const std::vector<std::string>& candidates,
                         std::string_view otherwise) {
  const auto suggestion = closest(word, candidates);
  return suggestion ? fmt::format("Did you mean '{}'?", *suggestion) : std::string(otherwise);
}

std::string escape_token(std::string_view token) {
  std::string out;
  out.reserve(token.size());
  for (const char c : token) {
    if (c == '~') {
      out += "~0";
    } else if (c == '/') {
      out += "~1";
    } else {
      out += c;
    }
  }
  return out;
}

}  // namespace spoolstep::jsondoc
