// Frames handed over from memory (clipwarden/frame_feed.h): the pictures
// arrive unchanged at native size (RGB in, the pipeline's BGR out), floating
// point maps to round(255 v), and bad pictures are usage errors naming the
// frame.
#include <gtest/gtest.h>

#include <limits>

#include <opencv2/imgproc.hpp>

#include "clipwarden/frame_feed.h"
#include "support/synthetic_source.h"

using namespace clipwarden;

namespace {

// A feed over a fixed list of pictures.
FrameFeed feed_of(std::vector<cv::Mat> pictures) {
  auto next = std::make_shared<size_t>(0);
  return [pictures = std::move(pictures), next](cv::Mat& rgb) -> Expected<FrameRead> {
    if (*next >= pictures.size()) return FrameRead::end_of_clip;
    rgb = pictures[(*next)++];
    return FrameRead::frame;
  };
}

std::unique_ptr<ClipSource> open_native(FrameFeed feed, double fps = 24) {
  SourceOptions options;
  options.working_long_side = 0;  // native size: no scaling
  auto source = open_frame_feed(std::move(feed), {"mem", fps, 0}, options);
  EXPECT_TRUE(source.ok()) << (source.ok() ? "" : source.error().message());
  return source.ok() ? std::move(source.value()) : nullptr;
}

std::string read_error(ClipSource& source) {
  DecodedFrame frame;
  while (true) {
    auto more = source.read(frame);
    if (!more) return more.error().message();
    if (*more == FrameRead::end_of_clip) return "";
  }
}

}  // namespace

TEST(FrameFeed, PicturesArriveUnchangedAtNativeSize) {
  const cv::Mat a = fixtures::smooth_texture({33, 17}, 3),
                b = fixtures::smooth_texture({33, 17}, 4);
  auto source = open_native(feed_of({a, b}), 10);
  ASSERT_TRUE(source);
  EXPECT_EQ(source->info().width, 33);
  EXPECT_EQ(source->info().height, 17);
  DecodedFrame frame;
  for (int i = 0; i < 2; ++i) {
    ASSERT_EQ(source->read(frame).value(), FrameRead::frame);
    EXPECT_EQ(frame.index, i);
    EXPECT_DOUBLE_EQ(frame.t_s, i / 10.0);
    cv::Mat expected_bgr;
    cv::cvtColor(i == 0 ? a : b, expected_bgr, cv::COLOR_RGB2BGR);
    EXPECT_EQ(cv::norm(frame.bgr, expected_bgr, cv::NORM_INF), 0.0);
  }
  EXPECT_EQ(source->read(frame).value(), FrameRead::end_of_clip);
  EXPECT_EQ(source->info().frame_count, 2);
  EXPECT_DOUBLE_EQ(source->info().duration_s, 0.2);
}

TEST(FrameFeed, FloatingPointIsRoundedTo255Levels) {
  cv::Mat levels(1, 256, CV_8UC3);
  for (int v = 0; v < 256; ++v) levels.at<cv::Vec3b>(0, v) = cv::Vec3b(v, 255 - v, v / 2);
  cv::Mat as_float;
  levels.convertTo(as_float, CV_64F, 1.0 / 255);
  auto back = rgb8_picture(as_float, "f");
  ASSERT_TRUE(back.ok());
  EXPECT_EQ(cv::norm(*back, levels, cv::NORM_INF), 0.0);
  cv::Mat near(1, 1, CV_32FC3, cv::Scalar(0.5 / 255 + 1e-4, 1.0, 0.0));
  EXPECT_EQ(rgb8_picture(near, "f")->at<cv::Vec3b>(0, 0), cv::Vec3b(1, 255, 0));
}

TEST(FrameFeed, BadPicturesAreUsageErrorsNamingTheFrame) {
  const cv::Mat ok(8, 8, CV_8UC3, cv::Scalar::all(9));
  EXPECT_EQ(read_error(*open_native(feed_of({ok, cv::Mat(8, 9, CV_8UC3)}))),
            "mem: frame 1: size 9x8 differs from the first frame's 8x8");
  auto wide = rgb8_picture(cv::Mat(2, 2, CV_32FC3, cv::Scalar(0, 255, 0)), "mem: frame 0");
  ASSERT_FALSE(wide.ok());
  EXPECT_EQ(wide.error().kind, ErrorKind::usage);
  EXPECT_NE(wide.error().message().find("[0, 1]"), std::string::npos);
  cv::Mat nan(2, 2, CV_32FC3, cv::Scalar::all(0));
  nan.at<cv::Vec3f>(1, 0)[2] = std::numeric_limits<float>::quiet_NaN();
  EXPECT_EQ(rgb8_picture(nan, "f").error().message(), "f: holds NaN or infinity at x=0 y=1");
  EXPECT_FALSE(rgb8_picture(cv::Mat(2, 2, CV_8UC1), "f").ok());
  EXPECT_FALSE(rgb8_picture(cv::Mat(2, 2, CV_16UC3), "f").ok());
  auto none = open_frame_feed(feed_of({}), {"mem", 24, 0}, {});
  ASSERT_FALSE(none.ok());
  EXPECT_EQ(none.error().message(), "mem: no frames given");
  EXPECT_FALSE(open_frame_feed(feed_of({ok}), {"mem", 0, 0}, {}).ok());
}
