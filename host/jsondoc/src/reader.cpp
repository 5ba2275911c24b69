// The strict JSON reader: nlohmann_json's SAX parser drives a small tree
// builder of ours that checks duplicates, depth and array length as it goes.
#include "spoolstep/jsondoc/reader.hpp"

#include <cerrno>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <sstream>

#include <fmt/format.h>

namespace spoolstep::jsondoc {
namespace {

using json = nlohmann::json;

/// Builds the tree from SAX events. It keeps, per open container, where it is
/// and how many items it holds, so that any refusal can name its pointer; the
/// pointer itself is only spelled out when something is refused.
class TreeBuilder : public nlohmann::json_sax<json> {
 public:
  TreeBuilder(const std::string& file, const ReadLimits& limits) : file_(file), limits_(limits) {}

  bool null() override { return put(json(nullptr)); }
  bool boolean(bool value) override { return put(json(value)); }
  bool number_integer(number_integer_t value) override { return put(json(value)); }
  bool number_unsigned(number_unsigned_t value) override { return put(json(value)); }
  bool number_float(number_float_t value, const string_t& /*text*/) override { return put(json(value)); }
  bool string(string_t& value) override { return put(json(std::move(value))); }
  bool binary(binary_t& /*value*/) override { return refuse_here("binary values are not JSON", ""); }

  bool start_object(std::size_t /*elements*/) override { return open(json::object(), true); }
  bool start_array(std::size_t /*elements*/) override { return open(json::array(), false); }
  bool end_object() override { return close(); }
  bool end_array() override { return close(); }

  bool key(string_t& name) override {
    Frame& top = frames_.back();
    top.key = name;
    if (top.value->contains(name)) {
      diagnostics_.push_back(Diagnostic{file_, pointer_of_next(),
                                        fmt::format("duplicate key '{}' in one object", printable(name)),
                                        "Remove one of them; a plain JSON reader would silently keep only the last."});
    }
    return true;
  }

  bool parse_error(std::size_t /*position*/, const std::string& /*last_token*/,
                   const nlohmann::detail::exception& ex) override {
    // nlohmann_json reports a number too large for a double (1e400) as
    // out_of_range.406 through this same hook.
    const bool overflow = ex.id == 406;
    std::string what = ex.what();
    const auto close_bracket = what.find("] ");
    if (what.rfind("[json.exception.", 0) == 0 && close_bracket != std::string::npos) what.erase(0, close_bracket + 2);
    if (overflow) {
      diagnostics_.push_back(Diagnostic{file_, pointer_of_next(), printable(what, 2 * kMaxEchoedChars),
                                        "Numbers must fit a double (about 1.8e308); give a realistic value."});
    } else {
      // Line and column say where; the pointer of the last key read is only a
      // neighbourhood (the fault may sit before it), so it goes in the text.
      std::string near;
      if (!frames_.empty()) near = " (near " + printable(pointer_of_next()) + ")";
      diagnostics_.push_back(Diagnostic{file_, "", "invalid JSON: " + printable(what, 3 * kMaxEchoedChars) + near,
                                        "Fix the JSON syntax there (a missing comma, quote or bracket is the usual cause)."});
    }
    return false;
  }

  json take_root() { return std::move(root_); }
  std::vector<Diagnostic> take_diagnostics() { return std::move(diagnostics_); }

 private:
  struct Frame {
    json* value;
    bool is_object;
    std::string key;        // the key being filled (objects)
    std::size_t items = 0;  // values so far (arrays)
  };

  /// Pointer of the value about to be placed (or of the key just read).
  std::string pointer_of_next() const {
    // An enclosing array's open item is its last one; the innermost array's
    // next item is the one about to be placed.
    std::string path;
    for (std::size_t i = 0; i < frames_.size(); ++i) {
      const Frame& frame = frames_[i];
      const bool innermost = i + 1 == frames_.size();
      path += '/';
      path += frame.is_object ? escape_token(frame.key) : std::to_string(innermost ? frame.items : frame.items - 1);
    }
    return path;
  }

  bool refuse_here(std::string reason, std::string hint) {
    diagnostics_.push_back(Diagnostic{file_, pointer_of_next(), std::move(reason), std::move(hint)});
    return false;
  }

  /// Places a value in the open container (or as the root); returns where it went.
  json* place(json&& value) {
    if (frames_.empty()) {
      root_ = std::move(value);
      return &root_;
    }
    Frame& top = frames_.back();
    if (top.is_object) {
      json& slot = (*top.value)[top.key];
      slot = std::move(value);
      return &slot;
    }
    if (top.items >= limits_.max_array_items) return nullptr;
    top.value->push_back(std::move(value));
    ++top.items;
    return &top.value->back();
  }

  bool refuse_long_array() {
    Frame& top = frames_.back();
    top.items = limits_.max_array_items;  // the pointer names the first item too many
    return refuse_here(fmt::format("more than {} items in one array", limits_.max_array_items),
                       fmt::format("A {} never needs that many; the limit keeps reading bounded.",
                                   limits_.document_kind));
  }

  bool put(json&& value) {
    if (place(std::move(value)) == nullptr) return refuse_long_array();
    return true;
  }

  bool open(json&& container, bool is_object) {
    if (static_cast<int>(frames_.size()) >= limits_.max_depth) {
      return refuse_here(fmt::format("nested deeper than {} levels", limits_.max_depth),
                         fmt::format("No part of a {} needs that; check the brackets.", limits_.document_kind));
    }
    json* slot = place(std::move(container));
    if (slot == nullptr) return refuse_long_array();
    frames_.push_back(Frame{slot, is_object, {}, 0});
    return true;
  }

  bool close() {
    frames_.pop_back();
    return true;
  }

  const std::string& file_;
  const ReadLimits& limits_;
  json root_;
  std::vector<Frame> frames_;
  std::vector<Diagnostic> diagnostics_;
};

}  // namespace

ReadResult read_text(const std::string& text, const std::string& display_name, const ReadLimits& limits) {
  ReadResult result;
  if (text.size() > limits.max_bytes) {
    result.diagnostics.push_back(Diagnostic{
        display_name, "",
        fmt::format("the {} is {} bytes, more than the limit of {} bytes", limits.document_kind, text.size(),
                    limits.max_bytes),
        "Check that this is the intended file; no realistic one is that large."});
    return result;
  }
  TreeBuilder builder(display_name, limits);
  bool parsed = false;
  try {
    parsed = json::sax_parse(text, &builder, json::input_format_t::json, /*strict=*/true, /*ignore_comments=*/true);
  } catch (const std::exception& e) {  // allocation failure and the like: still one clear message
    result.diagnostics.push_back(Diagnostic{display_name, "", std::string("could not read the JSON: ") + e.what(),
                                            "Please report this with the file."});
    return result;
  }
  result.diagnostics = builder.take_diagnostics();
  if (!parsed || has_error(result.diagnostics)) return result;
  json root = builder.take_root();
  if (!root.is_object()) {
    result.diagnostics.push_back(Diagnostic{display_name, "",
                                            fmt::format("the document is a JSON {}, not an object", root.type_name()),
                                            fmt::format("A {} is one JSON object {{ ... }}.", limits.document_kind)});
    return result;
  }
  result.root = std::move(root);
  return result;
}

ReadResult read_file(const std::string& path, const ReadLimits& limits) {
  ReadResult result;
  auto refuse = [&](std::string reason, std::string hint) {
    result.diagnostics.push_back(Diagnostic{path, "", std::move(reason), std::move(hint)});
    return result;
  };
  std::error_code ec;
  const auto status = std::filesystem::status(path, ec);
  if (!std::filesystem::exists(status)) return refuse("file not found", "Check the path and the working directory.");
  if (!std::filesystem::is_regular_file(status)) {
    return refuse("not a regular file", fmt::format("Give the path of a .json {}.", limits.document_kind));
  }
  const auto size = std::filesystem::file_size(path, ec);
  if (!ec && size > limits.max_bytes) {
    return refuse(fmt::format("the {} is {} bytes, more than the limit of {} bytes", limits.document_kind, size,
                              limits.max_bytes),
                  "Check that this is the intended file; no realistic one is that large.");
  }
  std::ifstream in(path, std::ios::binary);
  std::ostringstream text;
  if (in) text << in.rdbuf();
  if (!in || in.bad()) {
    return refuse(fmt::format("cannot read the file: {}", std::strerror(errno)), "Check the file's permissions.");
  }
  return read_text(text.str(), path, limits);
}

}  // namespace spoolstep::jsondoc
