// The --defect SPEC language (analyzer/inject/defect_spec.*). The syntax is
// our own contract, documented in docs/inject.md; these checks hold the
// parser to that document, and to errors that name the part at fault.
#include <gtest/gtest.h>

#include "analyzer/inject/defect_spec.h"

using namespace clipwarden;
using namespace clipwarden::inject;

namespace {

// The error's one line for a spec that must fail.
std::string error_of(const std::string& spec) {
  auto parsed = parse_defect_spec(spec);
  EXPECT_FALSE(parsed.ok()) << spec << " parsed but should not";
  if (parsed.ok()) return "";
  EXPECT_EQ(parsed.error().kind, ErrorKind::usage);
  EXPECT_NE(parsed.error().message().find(spec), std::string::npos) << "the error names the spec";
  return parsed.error().message();
}

}  // namespace

TEST(DefectSpec, FramesRangeAndKeys) {
  auto d = parse_defect_spec("flicker@30-59:strength=0.1,hz=6,wave=sine");
  ASSERT_TRUE(d.ok()) << d.error().message();
  EXPECT_EQ(d->cls, DefectClass::flicker);
  EXPECT_FALSE(d->range.in_seconds);
  EXPECT_EQ(d->range.start, 30);
  EXPECT_EQ(d->range.end, 59);
  EXPECT_DOUBLE_EQ(d->strength_value(), 0.1);
  EXPECT_DOUBLE_EQ(d->hz, 6);
  EXPECT_TRUE(d->sine);
}

TEST(DefectSpec, SecondsOpenAndSingleRanges) {
  auto seconds = parse_defect_spec("colour_drift@2s-4.5s:strength=strong,region=0.4/0.3/0.2/0.2,track=fixed");
  ASSERT_TRUE(seconds.ok()) << seconds.error().message();
  EXPECT_TRUE(seconds->range.in_seconds);
  EXPECT_DOUBLE_EQ(seconds->range.start, 2);
  EXPECT_DOUBLE_EQ(*seconds->range.end, 4.5);
  EXPECT_EQ(seconds->level, StrengthLevel::strong);
  EXPECT_DOUBLE_EQ(seconds->strength_value(), strength_for_level(DefectClass::colour_drift, StrengthLevel::strong));
  ASSERT_TRUE(seconds->region.has_value());
  EXPECT_DOUBLE_EQ(seconds->region->w, 0.2);
  EXPECT_FALSE(seconds->track);

  auto open = parse_defect_spec("vanish@40-");
  ASSERT_TRUE(open.ok());
  EXPECT_FALSE(open->range.end.has_value());
  auto single = parse_defect_spec("jerk@12");
  ASSERT_TRUE(single.ok());
  EXPECT_TRUE(single->range.single_frame);
  EXPECT_EQ(single->range.end, 12);
  auto single_time = parse_defect_spec("jerk@1.5s");
  ASSERT_TRUE(single_time.ok());
  EXPECT_TRUE(single_time->range.single_frame);
  EXPECT_TRUE(single_time->range.in_seconds);
}

TEST(DefectSpec, DefaultStrengthIsModerateAndAliasesWork) {
  auto d = parse_defect_spec("color_drift@10-20");
  ASSERT_TRUE(d.ok());
  EXPECT_EQ(d->cls, DefectClass::colour_drift);
  EXPECT_DOUBLE_EQ(d->strength_value(), strength_for_level(DefectClass::colour_drift, StrengthLevel::moderate));
  for (DefectClass c : all_defect_classes()) {
    EXPECT_LT(strength_for_level(c, StrengthLevel::weak), strength_for_level(c, StrengthLevel::moderate));
    EXPECT_LT(strength_for_level(c, StrengthLevel::moderate), strength_for_level(c, StrengthLevel::strong));
  }
}

TEST(DefectSpec, ClassNamesAreTheDocumentedOnes) {
  // The names of docs/inject.md's class table, in its order, written out
  // here by hand; "color_drift" is the documented alias.
  const std::vector<std::pair<const char*, DefectClass>> documented = {
      {"flicker", DefectClass::flicker},
      {"local_flicker", DefectClass::local_flicker},
      {"boiling", DefectClass::boiling},
      {"colour_drift", DefectClass::colour_drift},
      {"shape_drift", DefectClass::shape_drift},
      {"vanish", DefectClass::vanish},
      {"freeze", DefectClass::freeze},
      {"drop", DefectClass::drop},
      {"cut", DefectClass::cut},
      {"jerk", DefectClass::jerk},
      {"strobe", DefectClass::strobe}};
  ASSERT_EQ(all_defect_classes().size(), documented.size());
  for (size_t i = 0; i < documented.size(); ++i) {
    const auto& [name, cls] = documented[i];
    EXPECT_EQ(all_defect_classes()[i], cls) << name;
    EXPECT_STREQ(to_string(cls), name);
    EXPECT_EQ(defect_class_from_string(name), cls) << name;
  }
  EXPECT_EQ(defect_class_from_string("color_drift"), DefectClass::colour_drift);
  EXPECT_FALSE(defect_class_from_string("Flicker").has_value());
  EXPECT_FALSE(defect_class_from_string("").has_value());
}

TEST(DefectSpec, PathsMayHoldCommas) {
  auto d = parse_defect_spec("cut@10-20:source=takes/a,b.mp4,source_start=3");
  ASSERT_TRUE(d.ok()) << d.error().message();
  EXPECT_EQ(d->source_path, "takes/a,b.mp4");
  EXPECT_EQ(d->source_start, 3);
}

TEST(DefectSpec, ErrorsNameTheBadPart) {
  EXPECT_NE(error_of("flicker").find("CLASS@RANGE"), std::string::npos);
  EXPECT_NE(error_of("flikker@3-4").find("unknown defect class 'flikker'"), std::string::npos);
  EXPECT_NE(error_of("flicker@").find("missing range"), std::string::npos);
  EXPECT_NE(error_of("flicker@3-x").find("'x'"), std::string::npos);
  EXPECT_NE(error_of("flicker@3.5-8").find("'3.5'"), std::string::npos);
  EXPECT_NE(error_of("flicker@9-3").find("ends before it starts"), std::string::npos);
  EXPECT_NE(error_of("flicker@2s-30").find("mixes frames and seconds"), std::string::npos);
  EXPECT_NE(error_of("flicker@3-9:colour=red").find("unknown key 'colour' for flicker"), std::string::npos);
  EXPECT_NE(error_of("flicker@3-9:region=0.1/0.1/0.2/0.2").find("unknown key 'region'"), std::string::npos);
  EXPECT_NE(error_of("flicker@3-9:strength").find("'strength' is not KEY=VALUE"), std::string::npos);
  EXPECT_NE(error_of("flicker@3-9:strength=loud").find("strength='loud'"), std::string::npos);
  EXPECT_NE(error_of("flicker@3-9:").find("nothing after ':'"), std::string::npos);
  EXPECT_NE(error_of("boiling@3-9:region=0.5/0.5/0.6/0.2").find("inside the frame"), std::string::npos);
  EXPECT_NE(error_of("boiling@3-9:region=0.5/0.5").find("X/Y/W/H"), std::string::npos);
  EXPECT_NE(error_of("boiling@3-9:track=maybe").find("flow or fixed"), std::string::npos);
  EXPECT_NE(error_of("freeze@3-9:strength=4").find("length of its range"), std::string::npos);
  EXPECT_NE(error_of("freeze@0-3").find("frame before"), std::string::npos);
  EXPECT_NE(error_of("cut@3-9:source_start=2.5").find("source_start='2.5'"), std::string::npos);
}
