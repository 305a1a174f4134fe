// The CLI argument parser (analyzer/cli/args.*): behaviour is our own
// contract, so these checks are against docs/cli.md's command synopses.
#include <gtest/gtest.h>

#include "analyzer/cli/args.h"
#include "analyzer/cli/output_names.h"

using namespace clipwarden::cli;

TEST(Args, ValuesFlagsAndPositionals) {
  std::vector<OptionSpec> specs = {{"out", true, ""}, {"quiet", false, ""}, {"defect", true, "", "", true}};
  auto p = parse_args({"a.mp4", "--out", "dir", "--quiet", "--defect=x", "--defect", "y", "b.mp4"}, specs);
  ASSERT_TRUE(p.ok());
  EXPECT_EQ(p->positionals, (std::vector<std::string>{"a.mp4", "b.mp4"}));
  EXPECT_EQ(p->get("out"), "dir");
  EXPECT_TRUE(p->has("quiet"));
  EXPECT_EQ(p->get_all("defect"), (std::vector<std::string>{"x", "y"}));
}

TEST(Args, ErrorsNameTheArgument) {
  std::vector<OptionSpec> specs = {{"width", true, ""}};
  auto unknown = parse_args({"--wdth", "3"}, specs);
  ASSERT_FALSE(unknown.ok());
  EXPECT_EQ(unknown.error().subject, "--wdth");
  auto missing = parse_args({"--width"}, specs);
  ASSERT_FALSE(missing.ok());
  auto p = parse_args({"--width", "abc"}, specs);
  ASSERT_TRUE(p.ok());
  auto w = p->get_int("width", 1, 10);
  ASSERT_FALSE(w.ok());
  EXPECT_EQ(w.error().subject, "--width");
}

TEST(OutputNames, HostileNamesStayInsideTheFolder) {
  EXPECT_EQ(safe_stem("shots/take 01.mp4"), "take_01");
  EXPECT_EQ(safe_stem("../../etc/passwd"), "passwd");
  EXPECT_EQ(safe_stem("<img src=x onerror=alert(1)>.mp4"), "_img_src_x_onerror_alert_1__");
  EXPECT_EQ(safe_stem(".."), "clip");
  EXPECT_EQ(safe_stem("x\xe2\x80\xaegnp.exe.mp4"), "x_gnp.exe");  // U+202E right-to-left override
  EXPECT_EQ(safe_stem("frames/"), "frames");
  OutputNamer namer;
  EXPECT_EQ(namer.unique_name("a/x.mp4"), "x");
  EXPECT_EQ(namer.unique_name("b/x.mp4"), "x-2");
}
