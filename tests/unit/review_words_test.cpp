// The queue's headline reason in words (analyzer/review/review_folder.h),
// on reasons worded as the policy writes them (docs/gate.md).
#include <gtest/gtest.h>

#include "analyzer/review/review_folder.h"

using clipwarden::review::reason_in_words;
using clipwarden::review::reason_metric;

TEST(ReviewWords, PlainWordsLeadWithLevelAndPlace) {
  EXPECT_EQ(reason_in_words("freeze mean 0.4 >= review 0.3 (frames 12-40, 0.50-1.67 s): the picture stands still "
                            "for 1.2 s"),
            "The picture stands still for 1.2 s: review level, frames 12-40, 0.50-1.67 s");
  EXPECT_EQ(reason_in_words("cut segment peak 0.9 >= review 0.4 (frame 72, 3.00 s), 2 review segments in all: "
                            "the shot changes"),
            "The shot changes: review level, frame 72, 3.00 s");
}

TEST(ReviewWords, WithoutWordsTheMetricsDescriptionLeads) {
  const std::string words = reason_in_words("flicker p95 0.12 >= reject 0.1 (frames 12-40, 0.50-1.67 s)");
  EXPECT_NE(words.find(": reject level, frames 12-40, 0.50-1.67 s"), std::string::npos) << words;
  EXPECT_EQ(words.find("p95"), std::string::npos) << words;
}

TEST(ReviewWords, HardRulesStayAsTheyAre) {
  const std::string flash = "flash hazard: 5 flashes in one second > 3 (WCAG 2.x three-flash threshold)";
  EXPECT_EQ(reason_in_words(flash), flash);
  EXPECT_EQ(reason_metric(flash), "");
  EXPECT_EQ(reason_metric("coherence 42 < review floor 50 (whole clip, 0.00-2.00 s)"), "");
  EXPECT_EQ(reason_metric("flicker p95 0.12 >= reject 0.1"), "flicker");
}
