#include "analyzer/flow/pair_builder.h"

#include <opencv2/imgproc.hpp>
#include <opencv2/video/tracking.hpp>

#include "analyzer/color/relative_luminance.h"
#include "analyzer/flow/camera_motion.h"
#include "analyzer/flow/occlusion.h"

namespace clipwarden {

void prepare_gray(int64_t index, double t_s, const cv::Mat& bgr, FramePlanes& planes) {
  planes.index = index;
  planes.t_s = t_s;
  if (planes.bgr.data != bgr.data) bgr.copyTo(planes.bgr);
  cv::cvtColor(planes.bgr, planes.gray, cv::COLOR_BGR2GRAY);
}

void prepare_luminance(FramePlanes& planes) { relative_luminance(planes.bgr, planes.luminance); }

void prepare_planes(int64_t index, double t_s, const cv::Mat& bgr, FramePlanes& planes) {
  prepare_gray(index, t_s, bgr, planes);
  prepare_luminance(planes);
}

namespace {
int dis_preset(Preset preset) {
  switch (preset) {
    case Preset::fast: return cv::DISOpticalFlow::PRESET_ULTRAFAST;
    case Preset::balanced: return cv::DISOpticalFlow::PRESET_FAST;
    case Preset::thorough: return cv::DISOpticalFlow::PRESET_MEDIUM;
  }
  return cv::DISOpticalFlow::PRESET_FAST;
}
}  // namespace

// OpenCV's DIS asserts on small pictures ("width or height >= 12"), and a
// working picture can be that small: a 16384x16 clip at a 512 px working
// width is 512x1, a 1x1 clip stays 1x1. Such pictures are padded by
// replicating their edges and the flow is cropped back (32 px: twice the
// largest patch of the presets used, with margin).
constexpr int kMinFlowSidePx = 32;

static void dis_flow(cv::DISOpticalFlow& dis, const cv::Mat& from, const cv::Mat& to, cv::Mat& flow) {
  if (from.cols >= kMinFlowSidePx && from.rows >= kMinFlowSidePx) {
    dis.calc(from, to, flow);
    return;
  }
  const int pad_x = std::max(0, kMinFlowSidePx - from.cols);
  const int pad_y = std::max(0, kMinFlowSidePx - from.rows);
  cv::Mat from_padded, to_padded, flow_padded;
  cv::copyMakeBorder(from, from_padded, 0, pad_y, 0, pad_x, cv::BORDER_REPLICATE);
  cv::copyMakeBorder(to, to_padded, 0, pad_y, 0, pad_x, cv::BORDER_REPLICATE);
  dis.calc(from_padded, to_padded, flow_padded);
  flow_padded(cv::Rect(0, 0, from.cols, from.rows)).copyTo(flow);
}

// Rows of the float map made at a time (build()).
constexpr int kBandRows = 32;

struct PairBuilder::Impl {
  cv::Ptr<cv::DISOpticalFlow> dis;
  cv::Mat map;                   // x + flow_backward(x), one band of rows
  cv::Mat map_xy, map_fraction;  // the whole map in cv::remap's fixed-point form
  cv::Mat forward_at_target;     // flow_forward sampled at x + flow_backward(x), one band
};

PairBuilder::PairBuilder(Preset preset) : impl_(std::make_unique<Impl>()) {
  impl_->dis = cv::DISOpticalFlow::create(dis_preset(preset));
}

PairBuilder::~PairBuilder() = default;

void PairBuilder::build(const FramePlanes& prev, const FramePlanes& cur, FramePair& pair) {
  pair.prev = &prev;
  pair.cur = &cur;
  pair.dt_s = cur.t_s - prev.t_s;
  // DIS starts from the flow it is given when that has the right size and
  // type: pairs are recycled, so their flow buffers may hold another pair's
  // flow; they are released first and every pair is computed from scratch
  // (results do not depend on which pair a worker did before).
  pair.flow_forward.release();
  pair.flow_backward.release();
  dis_flow(*impl_->dis, prev.gray, cur.gray, pair.flow_forward);
  dis_flow(*impl_->dis, cur.gray, prev.gray, pair.flow_backward);

  // One sampling map serves the occlusion check and both warps, so each
  // plane of frame t-1 is read once (bilinear, as the warping error expects).
  // cv::remap turns a float map into 1/32-pixel fixed point block by block
  // on every call; converting it once for the three planes gives the same
  // bytes (checked by a unit test) for a third of the conversions.
  // The float map and the forward flow sampled through it are needed only
  // on the way (to the fixed-point map, to the check), so they are made a
  // band of rows at a time: every value depends only on its own pixel's map,
  // and the builder holds two bands instead of two whole float planes.
  const cv::Size size = pair.flow_backward.size();
  impl_->map_xy.create(size, CV_16SC2);
  impl_->map_fraction.create(size, CV_16UC1);
  pair.valid.create(size, CV_8UC1);
  size_t valid_count = 0;
  for (int y = 0; y < size.height; y += kBandRows) {
    const cv::Range rows(y, std::min(size.height, y + kBandRows));
    flow_to_map(pair.flow_backward.rowRange(rows), impl_->map, y);
    cv::Mat map_xy = impl_->map_xy.rowRange(rows),
            map_fraction = impl_->map_fraction.rowRange(rows);
    cv::convertMaps(impl_->map, cv::noArray(), map_xy, map_fraction, CV_16SC2);
    cv::remap(pair.flow_forward, impl_->forward_at_target, map_xy, map_fraction, cv::INTER_LINEAR,
              cv::BORDER_REPLICATE);
    valid_count +=
        forward_backward_rows(pair.flow_backward, impl_->forward_at_target, y, pair.valid);
  }
  pair.valid_fraction =
      static_cast<double>(valid_count) / (static_cast<double>(size.width) * size.height);
  const auto warp = [&](const cv::Mat& from, cv::Mat& to) {
    cv::remap(from, to, impl_->map_xy, impl_->map_fraction, cv::INTER_LINEAR, cv::BORDER_REPLICATE);
  };
  warp(prev.bgr, pair.warped_prev_bgr);
  warp(prev.luminance, pair.warped_prev_luminance);

  const CameraMotion camera = fit_camera_motion(pair.flow_backward, pair.valid);
  pair.camera_homography = camera.homography;
  pair.camera_inlier_fraction = camera.inlier_fraction;
}

}  // namespace clipwarden
