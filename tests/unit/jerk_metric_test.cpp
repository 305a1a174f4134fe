// The jerk metric on camera paths with a known acceleration: the centred
// second difference of positions over real time (camera_path.h), checked
// against the values it must take by elementary kinematics.
#include <gtest/gtest.h>

#include <cmath>
#include <functional>

#include "analyzer/metrics/camera_path.h"
#include "support/detectors_metrics.h"

using namespace clipwarden;
using namespace clipwarden::testing;

namespace {

const cv::Size kFrame{320, 240};  // diagonal 400 px
const double kDiagonal = 400;

// Frames at fps whose pair (t-1, t) moves the camera by step(t) (a
// homography); inlier(t) is its fit quality.
Report run_path(double fps, int n, const std::function<cv::Matx33d(int)>& step,
                const std::function<double(int)>& inlier = [](int) { return 1.0; },
                const std::function<void(Report&)>& before_finish = {}) {
  std::vector<FramePlanes> frames;
  for (int i = 0; i < n; ++i) frames.push_back(planes_of(i, i / fps, cv::Mat(kFrame, CV_8UC3, cv::Scalar::all(80))));
  auto metric = registered_metric("jerk");
  EXPECT_NE(metric, nullptr);
  return run_metric(*metric, frames, [&](const FramePlanes&, const FramePlanes& cur, FramePair& p) {
    p.camera_homography = step(static_cast<int>(cur.index));
    p.camera_inlier_fraction = inlier(static_cast<int>(cur.index));
    p.valid_fraction = 0.9;
  }, before_finish);
}

cv::Matx33d shift(double dx, double dy) { return {1, 0, dx, 0, 1, dy, 0, 0, 1}; }

// Position of a pan at frame t, with frame k displaced by `offset` px.
double pan_position(int t, double speed_px, int k, double offset) {
  return speed_px * t + (t == k ? offset : 0);
}

}  // namespace

TEST(JerkMetric, SteadyPanHasNoAcceleration) {
  const Report r = run_path(24, 30, [](int) { return shift(4, -1); });
  const auto& v = r.find_series("jerk")->values;
  EXPECT_TRUE(std::isnan(v.front()));
  EXPECT_TRUE(std::isnan(v.back()));
  for (size_t i = 1; i + 1 < v.size(); ++i) EXPECT_NEAR(v[i], 0, 1e-9) << i;
}

TEST(JerkMetric, OneDisplacedFrameIsASpikeAtThatFrame) {
  // Frame 12 sits 6 px further along the pan: velocities +6 and -6 px per
  // frame around it, so |a| = 2 * 6 * fps^2 at frame 12 and 6 * fps^2 at 11
  // and 13 (px/s^2), divided by the 400 px diagonal.
  const double fps = 24, offset = 6;
  const Report r = run_path(fps, 30, [&](int t) {
    return shift(pan_position(t, 3, 12, offset) - pan_position(t - 1, 3, 12, offset), 0);
  });
  const auto& v = r.find_series("jerk")->values;
  EXPECT_NEAR(v[12], 2 * offset * fps * fps / kDiagonal, 1e-9);
  EXPECT_NEAR(v[11], offset * fps * fps / kDiagonal, 1e-9);
  EXPECT_NEAR(v[13], offset * fps * fps / kDiagonal, 1e-9);
  EXPECT_NEAR(v[5], 0, 1e-9);
  const auto& d = r.summary.details.at("jerk");
  EXPECT_EQ(d.at("peak_frame"), 12);
  EXPECT_EQ(d.at("units"), "frame diagonals per second squared");
}

TEST(JerkMetric, SmoothAccelerationReadsTheSameAtAnyFrameRate) {
  // x(t) = A t^2 / 2 with A = 100 px/s^2: jerk = A / diagonal = 0.25 at
  // 8 fps and at 60 fps alike (exact for a quadratic path).
  for (double fps : {8.0, 60.0}) {
    const double a = 100;
    const Report r = run_path(fps, static_cast<int>(2 * fps), [&](int t) {
      const double t1 = t / fps, t0 = (t - 1) / fps;
      return shift(a * (t1 * t1 - t0 * t0) / 2, 0);
    });
    const auto& v = r.find_series("jerk")->values;
    for (size_t i = 1; i + 1 < v.size(); ++i) EXPECT_NEAR(v[i], a / kDiagonal, 1e-6) << fps << " " << i;
  }
}

TEST(JerkMetric, SteadyRotationAndZoomHaveNoAcceleration) {
  // The same rotation about the centre (1 degree) and zoom (1%) every pair.
  const double c = std::cos(M_PI / 180) * 1.01, s = std::sin(M_PI / 180) * 1.01;
  const double cx = kFrame.width / 2.0, cy = kFrame.height / 2.0;
  const cv::Matx33d about_centre(c, -s, cx - c * cx + s * cy, s, c, cy - s * cx - c * cy, 0, 0, 1);
  const Report r = run_path(30, 20, [&](int) { return about_centre; });
  const auto& v = r.find_series("jerk")->values;
  for (size_t i = 1; i + 1 < v.size(); ++i) EXPECT_NEAR(v[i], 0, 1e-9);
  // A change of rotation speed does register, through the corners.
  const Report turn = run_path(30, 20, [&](int t) { return t == 10 ? about_centre : shift(0, 0); });
  EXPECT_GT(turn.find_series("jerk")->values[10], 0.5);
}

TEST(JerkMetric, WeakCameraFitsLeaveFramesUndefined) {
  const Report r = run_path(24, 20, [](int) { return shift(2, 0); },
                            [](int t) { return t == 8 ? 0.2 : 0.9; });
  const auto& v = r.find_series("jerk")->values;
  EXPECT_TRUE(std::isnan(v[7]));  // needs pair 8
  EXPECT_TRUE(std::isnan(v[8]));  // needs pair 8
  EXPECT_FALSE(std::isnan(v[9]));
  EXPECT_EQ(r.summary.details.at("jerk").at("camera_fit_pairs"), 18);
}

TEST(JerkMetric, PairsTheCutMetricCallsACutLeaveFramesUndefined) {
  // A jump between two blank frames can fit an identity homography with
  // every sample an inlier; a shot boundary (cut >= kShotBoundaryCut) rules
  // it out.
  const Report r = run_path(24, 20, [](int t) { return t == 10 ? shift(0, 0) : shift(3, 0); },
                            [](int) { return 1.0; }, [](Report& report) {
                              std::vector<double> cut(20, 0.01);
                              cut[10] = 0.7;
                              report.series.push_back({"cut", cut});
                            });
  const auto& v = r.find_series("jerk")->values;
  EXPECT_TRUE(std::isnan(v[9]));
  EXPECT_TRUE(std::isnan(v[10]));
  EXPECT_NEAR(v[11], 0, 1e-9);
}

TEST(CameraPath, HomographyToInfinityIsInvalid) {
  const cv::Matx33d bad(1, 0, 0, 0, 1, 0, -1, 0, 1);  // w = 1 - x <= 0 on most points
  EXPECT_FALSE(camera_step(bad, kFrame, 0.04, true).valid);
  EXPECT_TRUE(camera_step(shift(1, 1), kFrame, 0.04, true).valid);
}
