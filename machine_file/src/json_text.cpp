// Strict JSON parsing shared by the machine-file and scenario loaders.
#include "spoolstep/machine_file/json_text.hpp"

#include <set>

namespace spoolstep::machine_file {
namespace {

using json = nlohmann::json;

/// Tracks object keys while parsing to catch duplicates, which nlohmann_json
/// would otherwise accept silently (the last one winning).
struct DuplicateKeyWatcher {
  struct Frame {
    bool is_object;
    std::set<std::string> keys;
    std::string key;
    long index = -1;
  };
  std::vector<Frame> frames;
  std::vector<std::pair<std::string, std::string>> duplicates;  // path, key

  std::string path_to_top() const {
    std::string path;
    for (std::size_t i = 0; i + 1 < frames.size(); ++i) {
      path = frames[i].is_object ? path + "/" + escape_token(frames[i].key) : path + "/" + std::to_string(frames[i].index);
    }
    return path;
  }

  void element() {
    if (!frames.empty() && !frames.back().is_object) ++frames.back().index;
  }

  bool too_deep = false;
  std::string too_deep_at;

  bool operator()(int depth, json::parse_event_t event, json& parsed) {
    if (depth > kMaxJsonDepth &&
        (event == json::parse_event_t::object_start || event == json::parse_event_t::array_start)) {
      if (!too_deep) too_deep_at = path_to_top();
      too_deep = true;
    }
    switch (event) {
      case json::parse_event_t::object_start:
        element();
        frames.push_back(Frame{true, {}, {}, -1});
        break;
      case json::parse_event_t::array_start:
        element();
        frames.push_back(Frame{false, {}, {}, -1});
        break;
      case json::parse_event_t::key: {
        auto& top = frames.back();
        top.key = parsed.get<std::string>();
        if (!top.keys.insert(top.key).second) duplicates.emplace_back(path_to_top() + "/" + escape_token(top.key), top.key);
        break;
      }
      case json::parse_event_t::value:
        element();
        break;
      case json::parse_event_t::object_end:
      case json::parse_event_t::array_end:
        frames.pop_back();
        break;
    }
    return true;
  }
};

/// "[json.exception.parse_error.101] parse error at line 3, ..." -> "parse error at line 3, ...".
std::string strip_exception_id(const std::string& what) {
  const auto close = what.find("] ");
  return what.rfind("[json.exception.", 0) == 0 && close != std::string::npos ? what.substr(close + 2) : what;
}

}  // namespace

std::string escape_token(std::string_view token) {
  std::string out;
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

ParsedJson parse_json_text(const std::string& text) {
  ParsedJson result;
  DuplicateKeyWatcher watcher;
  try {
    result.doc = json::parse(text, std::ref(watcher), /*allow_exceptions=*/true, /*ignore_comments=*/true);
  } catch (const json::exception& e) {
    result.syntax_error = strip_exception_id(e.what());
    result.doc = json();
    return result;
  }
  result.duplicates = std::move(watcher.duplicates);
  result.too_deep = watcher.too_deep;
  result.too_deep_at = watcher.too_deep_at;
  if (result.too_deep) result.doc = json();  // never walk a document that deep
  return result;
}

}  // namespace spoolstep::machine_file
