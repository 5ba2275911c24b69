// The one diagnostic type: its wording, its severity, the escaping of text
// echoed from a document, and the "did you mean" hint.
#include <string>

#include <gtest/gtest.h>

#include "spoolstep/jsondoc/diagnostic.hpp"

namespace spoolstep::jsondoc {
namespace {

TEST(Diagnostic, ErrorReadsFilePointerReasonAndHint) {
  const Diagnostic d{"m.json", "/functions/0/valve", "unknown valve kind", "Did you mean 'prop_4_3'?"};
  EXPECT_EQ(d.to_string(), "m.json: /functions/0/valve: unknown valve kind. Did you mean 'prop_4_3'?");
}

TEST(Diagnostic, WholeDocumentHasNoPointer) {
  EXPECT_EQ((Diagnostic{"m.json", "", "file not found", ""}).to_string(), "m.json: file not found.");
}

TEST(Diagnostic, WarningCarriesItsSeverityWord) {
  Diagnostic d{"m.json", "/two_hand/0", "releasing does not hold every motion", "Hold them all."};
  d.severity = Severity::kWarning;
  EXPECT_EQ(d.to_string(), "m.json: warning: /two_hand/0: releasing does not hold every motion. Hold them all.");
  EXPECT_FALSE(has_error({d}));
  d.severity = Severity::kError;
  EXPECT_TRUE(has_error({d}));
}

TEST(Printable, EscapesControlCharactersAndDelete) {
  EXPECT_EQ(printable("a\nb\tc\x1b[0m\x7f"), "a\\nb\\tc\\x1B[0m\\x7F");
}

TEST(Printable, EscapesC1ControlsSeparatorsAndBidiOverrides) {
  // U+0085 (NEL) and U+009B (CSI) are C1 controls; U+2028 breaks a line;
  // U+202E reverses the text after it (UTF-8 encodings per RFC 3629).
  EXPECT_EQ(printable("a\xC2\x85" "b\xC2\x9B" "c\xE2\x80\xA8" "d\xE2\x80\xAE" "e\xE2\x81\xA6" "f"),
            "a\\u0085b\\u009Bc\\u2028d\\u202Ee\\u2066f");
  // Ordinary non-ASCII text stays as it is.
  EXPECT_EQ(printable("Pr\xC3\xBC" "fdruck \xE2\x80\x93 ok"), "Pr\xC3\xBC" "fdruck \xE2\x80\x93 ok");
}

TEST(Printable, CutsLongTextAndSaysHowLongItWas) {
  const std::string name(1'000'000, 'x');
  const std::string shown = printable(name);
  EXPECT_EQ(shown, std::string(kMaxEchoedChars, 'x') + "... (1000000 bytes)");
}

TEST(Printable, NeverCutsAUtf8CharacterInHalf) {
  // "ü" is the two bytes C3 BC (UTF-8, RFC 3629): a cut that would fall
  // inside one backs up to the character's start, never leaving a lone C3.
  const std::string text = "a\xC3\xBC\xC3\xBC";
  EXPECT_EQ(printable(text, 4), "a\xC3\xBC... (5 bytes)");
  EXPECT_EQ(printable(text, 2), "a... (5 bytes)");
}

TEST(DidYouMean, SuggestsTheClosestNameForATypo) {
  EXPECT_EQ(did_you_mean("gaurd_closed", {"guard_closed", "press_down", "estop_ok"}, "none"),
            "Did you mean 'guard_closed'?");
}

TEST(DidYouMean, NeverSuggestsTheSignalOfOppositeMeaning) {
  // A typo must not be "corrected" into the opposite signal.
  EXPECT_EQ(did_you_mean("guard_door_open", {"guard_door_closed"}, "none"), "none");
  EXPECT_EQ(did_you_mean("estop_nok", {"estop_ok"}, "none"), "none");
  EXPECT_EQ(did_you_mean("press_up", {"press_down"}, "none"), "none");
  EXPECT_EQ(did_you_mean("guard_door_clsoed", {"guard_door_closed"}, "none"), "Did you mean 'guard_door_closed'?");
}

TEST(DidYouMean, FallsBackWhenNothingIsClose) {
  EXPECT_EQ(did_you_mean("pump_pressure", {"guard_closed", "estop_ok"}, "Use a declared name."),
            "Use a declared name.");
}

TEST(DidYouMean, NeverComparesAnOverlongWord) {
  EXPECT_FALSE(closest(std::string(100'000, 'a'), {std::string(100'000, 'a')}).has_value());
}

TEST(EscapeToken, FollowsRfc6901) {
  // RFC 6901 section 3: '~' -> "~0", '/' -> "~1".
  EXPECT_EQ(escape_token("a/b~c"), "a~1b~0c");
}

}  // namespace
}  // namespace spoolstep::jsondoc
