// The accuracy set's injected strobe must be a strobe that flash screening
// is meant to flag: WCAG 2.x success criterion 2.3.1 fails more than three
// flashes (pairs of opposing changes) within any one second, and allows
// three. The injector draws a flash every other frame when its rate (6 Hz)
// is at or above half the frame rate, so at 8 fps four flashes need 8
// frames; a pulsing defect's usual span, a quarter of a 16-frame clip,
// held two (measured 2026-12-05: `flash` had no segment on those cases).
#include <gtest/gtest.h>

#include <string>

#include "support/accuracy_set.h"

using namespace clipwarden;
using namespace clipwarden::accuracy;
using inject::DefectClass;
using inject::StrengthLevel;

namespace {

// "strobe@A-B" -> B - A + 1.
int span_frames(const std::string& spec) {
  const size_t at = spec.find('@'), dash = spec.find('-', at);
  return std::stoi(spec.substr(dash + 1)) - std::stoi(spec.substr(at + 1, dash - at - 1)) + 1;
}

BaseClip base(int frames, double fps) {
  BaseClip b;
  b.source.name = "short";
  b.path = "short.mkv";
  b.frames = frames;
  b.fps = fps;
  b.full_frames = frames;
  return b;
}

}  // namespace

TEST(AccuracyStrobeSpan, AShortLowRateClipGetsFourFlashes) {
  for (const auto& [frames, fps] : {std::pair{16, 8.0}, std::pair{25, 8.0}, std::pair{20, 10.0}}) {
    const std::vector<BaseClip> bases = {base(frames, fps)};
    const auto cases = plan_cases(bases, {DefectClass::strobe}, {StrengthLevel::moderate}, 2, 1, "/tmp");
    ASSERT_EQ(cases.size(), 2u);
    for (const PlannedCase& c : cases) {
      const int n = span_frames(c.spec);
      // Every other frame is a flash's bright half: n frames hold n / 2
      // flashes (the drop back after the last lies past the span).
      EXPECT_GE(n / 2, 4) << c.spec << " in " << frames << " frames at " << fps << " fps";
      EXPECT_LT(span_frames(c.spec) + std::stoi(c.spec.substr(c.spec.find('@') + 1)), frames) << c.spec;
    }
  }
}

TEST(AccuracyStrobeSpan, ALongClipKeepsItsSecondOfStrobe) {
  const std::vector<BaseClip> bases = {base(150, 25.0)};
  const auto cases = plan_cases(bases, {DefectClass::strobe}, {StrengthLevel::moderate}, 1, 1, "/tmp");
  ASSERT_EQ(cases.size(), 1u);
  EXPECT_EQ(span_frames(cases[0].spec), 25) << cases[0].spec;
}
