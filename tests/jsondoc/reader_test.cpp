// The strict JSON reader: every refusal names a pointer and a reason, and
// every limit is checked while reading. JSON syntax per RFC 8259, pointers per
// RFC 6901 (both from the RFC texts).
#include <string>

#include <gtest/gtest.h>

#include "spoolstep/jsondoc/reader.hpp"

namespace spoolstep::jsondoc {
namespace {

ReadLimits small_limits() {
  ReadLimits limits;
  limits.max_bytes = 4096;
  limits.max_array_items = 4;
  limits.max_depth = 5;
  limits.document_kind = "test file";
  return limits;
}

const Diagnostic& only_error(const ReadResult& r) {
  EXPECT_EQ(r.diagnostics.size(), 1U);
  static const Diagnostic none{};
  return r.diagnostics.empty() ? none : r.diagnostics.front();
}

TEST(JsonReader, ReadsAnObjectWithCommentsAndKeepsEveryValue) {
  const auto r = read_text("{ // a comment\n \"a\": [1, 2.5, \"x\", null], \"b\": {\"c\": -3} }", "t.json",
                           small_limits());
  ASSERT_TRUE(r.ok());
  EXPECT_EQ(r.root.at("a").size(), 4U);
  EXPECT_DOUBLE_EQ(r.root.at("a").at(1).get<double>(), 2.5);
  EXPECT_EQ(r.root.at("b").at("c").get<int>(), -3);
}

TEST(JsonReader, DuplicateKeyIsRefusedAtItsPointer) {
  const auto r = read_text(R"({"list": [{"x": 1}, {"y": 2, "y": 3}]})", "t.json", small_limits());
  EXPECT_FALSE(r.ok());
  const Diagnostic& d = only_error(r);
  EXPECT_EQ(d.json_path, "/list/1/y");
  EXPECT_NE(d.reason.find("duplicate key 'y'"), std::string::npos);
}

TEST(JsonReader, KeysWithSlashAndTildeAreEscapedInPointers) {
  // RFC 6901 section 3: "~" is written "~0" and "/" is written "~1".
  const auto r = read_text(R"({"a/b": {"m~n": 1, "m~n": 2}})", "t.json", small_limits());
  EXPECT_EQ(only_error(r).json_path, "/a~1b/m~0n");
}

TEST(JsonReader, NumberOverflowNamesThePointerOfTheNumber) {
  const auto r = read_text(R"({"pump": {"speed_rpm": 1e400}})", "t.json", small_limits());
  EXPECT_FALSE(r.ok());
  const Diagnostic& d = only_error(r);
  EXPECT_EQ(d.json_path, "/pump/speed_rpm");
  EXPECT_NE(d.reason.find("number overflow"), std::string::npos) << d.reason;
  EXPECT_NE(d.reason.find("1e400"), std::string::npos) << d.reason;
}

TEST(JsonReader, OverflowInsideAnArrayNamesTheItem) {
  const auto r = read_text(R"({"a": [[0], [1, -1e999]]})", "t.json", small_limits());
  EXPECT_EQ(only_error(r).json_path, "/a/1/1");
}

TEST(JsonReader, RootThatIsNotAnObjectIsRefused) {
  for (const char* text : {"[1, 2]", "42", "\"text\"", "null"}) {
    const auto r = read_text(text, "t.json", small_limits());
    EXPECT_FALSE(r.ok()) << text;
    EXPECT_NE(only_error(r).reason.find("not an object"), std::string::npos) << text;
    EXPECT_TRUE(r.root.is_null()) << text;
  }
}

TEST(JsonReader, ArrayLongerThanTheLimitIsRefusedAtTheFirstItemTooMany) {
  const auto r = read_text(R"({"inputs": [1, 2, 3, 4, 5, 6, 7]})", "t.json", small_limits());
  EXPECT_FALSE(r.ok());
  const Diagnostic& d = only_error(r);
  EXPECT_EQ(d.json_path, "/inputs/4");
  EXPECT_NE(d.reason.find("more than 4 items"), std::string::npos) << d.reason;
}

TEST(JsonReader, ArrayOfObjectsCountsItsObjectsToo) {
  const auto r = read_text(R"({"inputs": [{}, {}, {}, {}, {}]})", "t.json", small_limits());
  EXPECT_EQ(only_error(r).json_path, "/inputs/4");
}

TEST(JsonReader, NestingDeeperThanTheLimitIsRefused) {
  const auto r = read_text(R"({"a": {"b": {"c": {"d": {"e": {}}}}}})", "t.json", small_limits());
  EXPECT_FALSE(r.ok());
  const Diagnostic& d = only_error(r);
  EXPECT_EQ(d.json_path, "/a/b/c/d/e");
  EXPECT_NE(d.reason.find("deeper than 5"), std::string::npos);
}

TEST(JsonReader, TextLargerThanTheLimitIsRefusedBeforeParsing) {
  // Invalid JSON past the limit: a size refusal, not a syntax error, proves
  // the parser never saw it.
  const std::string text(5000, '{');
  const auto r = read_text(text, "big.json", small_limits());
  const Diagnostic& d = only_error(r);
  EXPECT_EQ(d.file, "big.json");
  EXPECT_NE(d.reason.find("5000 bytes, more than the limit of 4096 bytes"), std::string::npos) << d.reason;
}

TEST(JsonReader, SyntaxErrorGivesLineAndColumnAndTheNeighbourhood) {
  const auto r = read_text("{\n  \"format\": \"x\"\n  \"next\": 1\n}", "t.json", small_limits());
  const Diagnostic& d = only_error(r);
  EXPECT_EQ(d.json_path, "");
  EXPECT_NE(d.reason.find("line 3, column"), std::string::npos) << d.reason;
  EXPECT_NE(d.reason.find("near /format"), std::string::npos) << d.reason;
}

TEST(JsonReader, EmptyTextIsASyntaxError) {
  const auto r = read_text("", "t.json", small_limits());
  EXPECT_NE(only_error(r).reason.find("invalid JSON"), std::string::npos);
}

TEST(JsonReader, MissingFileAndDirectoryAreDiagnostics) {
  const auto missing = read_file("/nonexistent/spoolstep/x.json", small_limits());
  EXPECT_EQ(only_error(missing).reason, "file not found");
  const auto dir = read_file("/", small_limits());
  EXPECT_EQ(only_error(dir).reason, "not a regular file");
}

TEST(JsonReader, ControlCharactersInAKeyAreEscapedInTheMessage) {
  const auto r = read_text("{\"a\\u001b[2Jb\": 1, \"a\\u001b[2Jb\": 2}", "t.json", small_limits());
  const std::string message = only_error(r).to_string();
  EXPECT_EQ(message.find('\x1b'), std::string::npos) << message;
  EXPECT_NE(message.find("a\\x1B[2Jb"), std::string::npos) << message;
}

}  // namespace
}  // namespace spoolstep::jsondoc
