#include "support/html_fixtures.h"

#include <cmath>

#include <opencv2/imgproc.hpp>

#include "analyzer/inspect/page_pictures.h"
#include "analyzer/inspect/panels.h"
#include "analyzer/core/object_boxes.h"

namespace clipwarden::fixtures {
namespace {

cv::Point2d ball_centre(const SyntheticScene& s, int64_t frame) {
  return s.ball_start + s.ball_px_per_frame * double(frame);
}

// The static world, wider than the frame so the camera can pan over it.
cv::Mat world(const SyntheticScene& s) {
  const int w = s.width + int(std::ceil(s.pan_px_per_frame * s.frame_count)) + 8;
  cv::Mat m(s.height, w, CV_8UC3);
  for (int y = 0; y < s.height; ++y)
    for (int x = 0; x < w; ++x)
      m.at<cv::Vec3b>(y, x) =
          cv::Vec3b(uint8_t(150 + 60 * y / s.height), uint8_t(120 + 40 * std::sin(x / 90.0)),
                    uint8_t(90 + 50 * x / w));
  cv::RNG rng(7);
  for (int i = 0; i < w / 18; ++i) {
    const cv::Point c(rng.uniform(0, w), rng.uniform(s.height / 3, s.height));
    const cv::Scalar colour(rng.uniform(30, 230), rng.uniform(30, 230), rng.uniform(30, 230));
    if (i % 2)
      cv::rectangle(m, cv::Rect(c.x, c.y, rng.uniform(12, 40), rng.uniform(12, 50)), colour,
                    cv::FILLED);
    else
      cv::circle(m, c, rng.uniform(6, 22), colour, cv::FILLED, cv::LINE_AA);
  }
  return m;
}

}  // namespace

cv::Mat SyntheticScene::render(int64_t frame) const {
  if (world_cache_.empty()) world_cache_ = world(*this);
  const double offset = pan_px_per_frame * double(frame);
  cv::Mat out;
  const cv::Matx23d shift(1, 0, -offset, 0, 1, 0);
  cv::warpAffine(world_cache_, out, shift, {width, height}, cv::INTER_LINEAR, cv::BORDER_REPLICATE);
  const cv::Point2d c = ball_centre(*this, frame);
  // The ball's colour drifts in the last third of the clip (what the
  // report's drift segment describes).
  const double drift =
      frame > 2 * frame_count / 3 ? double(frame - 2 * frame_count / 3) / (frame_count / 3.0) : 0;
  cv::circle(out, c, ball_radius, cv::Scalar(40 + 150 * drift, 60, 220 - 120 * drift), cv::FILLED,
             cv::LINE_AA);
  cv::circle(out, c + cv::Point2d(-8, -8), ball_radius / 4, cv::Scalar(230, 230, 240), cv::FILLED,
             cv::LINE_AA);
  // Frames 118-136 carry a defect that motion cannot explain (what the
  // report's warp_error segment describes): a patch whose texture boils,
  // strongest at frame 127.
  if (frame >= 118 && frame <= 136) {
    const double strength = std::exp(-std::pow((frame - 127) / 4.0, 2));
    const cv::Rect patch(300, 170, 90, 70);
    cv::RNG rng(uint64_t(frame) * 7919);
    cv::Mat noise(patch.size(), CV_8UC3);
    rng.fill(noise, cv::RNG::UNIFORM, 0, 255);
    cv::GaussianBlur(noise, noise, {0, 0}, 1.5);
    cv::addWeighted(out(patch), 1 - 0.8 * strength, noise, 0.8 * strength, 0, out(patch));
  }
  return out;
}

cv::Rect SyntheticScene::ball_box(int64_t frame) const {
  const cv::Point2d c = ball_centre(*this, frame);
  return cv::Rect(int(std::lround(c.x)) - ball_radius, int(std::lround(c.y)) - ball_radius,
                  2 * ball_radius, 2 * ball_radius);
}

void SyntheticScene::make_pair(int64_t frame, FramePlanes& prev, FramePlanes& cur,
                               FramePair& pair) const {
  prev.index = frame - 1;
  prev.t_s = double(frame - 1) / fps;
  prev.bgr = render(frame - 1);
  cur.index = frame;
  cur.t_s = double(frame) / fps;
  cur.bgr = render(frame);
  pair.prev = &prev;
  pair.cur = &cur;
  pair.dt_s = cur.t_s - prev.t_s;
  pair.flow_backward.create(height, width, CV_32FC2);
  pair.flow_forward.create(height, width, CV_32FC2);
  pair.valid.create(height, width, CV_8UC1);
  const cv::Point2d c_prev = ball_centre(*this, frame - 1), c_cur = ball_centre(*this, frame);
  const double r2 = double(ball_radius) * ball_radius;
  auto in_ball = [&](double x, double y, cv::Point2d c) {
    return (x - c.x) * (x - c.x) + (y - c.y) * (y - c.y) <= r2;
  };
  for (int y = 0; y < height; ++y)
    for (int x = 0; x < width; ++x) {
      const bool ball_now = in_ball(x, y, c_cur), ball_before = in_ball(x, y, c_prev);
      // Background moves left by the pan; the ball moves by its velocity.
      const cv::Vec2f back =
          ball_now ? cv::Vec2f(-float(ball_px_per_frame.x), -float(ball_px_per_frame.y))
                   : cv::Vec2f(float(pan_px_per_frame), 0.f);
      const cv::Vec2f fwd = ball_before
                                ? cv::Vec2f(float(ball_px_per_frame.x), float(ball_px_per_frame.y))
                                : cv::Vec2f(-float(pan_px_per_frame), 0.f);
      pair.flow_backward.at<cv::Vec2f>(y, x) = back;
      pair.flow_forward.at<cv::Vec2f>(y, x) = fwd;
      // Occluded: background that the ball covered a frame ago, and the
      // strip that entered at the right edge.
      const bool uncovered = !ball_now && in_ball(x + pan_px_per_frame, y, c_prev);
      const bool entered = x + pan_px_per_frame >= width;
      pair.valid.at<uint8_t>(y, x) = (uncovered || entered) ? 0 : 255;
    }
  cv::Mat map(height, width, CV_32FC2);
  for (int y = 0; y < height; ++y)
    for (int x = 0; x < width; ++x)
      map.at<cv::Vec2f>(y, x) =
          cv::Vec2f(float(x), float(y)) + pair.flow_backward.at<cv::Vec2f>(y, x);
  cv::remap(prev.bgr, pair.warped_prev_bgr, map, cv::noArray(), cv::INTER_LINEAR,
            cv::BORDER_REPLICATE);
  pair.valid_fraction = cv::countNonZero(pair.valid) / double(width * height);
}

Report synthetic_report(const SyntheticScene& scene, const std::string& clip_path) {
  Report r;
  r.tool_version = "test";
  r.clip.path = clip_path;
  r.clip.sha256 = std::string(64, 'a');
  r.clip.container = "mov,mp4";
  r.clip.codec = "h264";
  r.clip.width = 1024;
  r.clip.height = 576;
  r.clip.fps = scene.fps;
  r.clip.frame_count = scene.frame_count;
  r.clip.duration_s = scene.frame_count / scene.fps;
  r.clip.pix_fmt = "yuv420p";
  r.settings = {{"preset", "balanced"}, {"working_long_side_px", scene.width}};
  const int n = scene.frame_count;
  MetricSeries warp{"warp_error", {}}, occl{"occluded_pct", {}}, flicker{"flicker", {}},
      drift{"drift", {}}, flash{"flash", {}};
  for (int i = 0; i < n; ++i) {
    r.frame_times_s.push_back(i / scene.fps);
    const double wiggle = 0.5 + 0.5 * std::sin(i * 0.7);
    warp.values.push_back(
        i == 0 ? kUndefined
               : 0.004 + 0.002 * wiggle +
                     (i >= 118 && i <= 136 ? 0.05 * std::exp(-std::pow((i - 127) / 4.0, 2)) : 0));
    occl.values.push_back(i == 0 ? kUndefined : 3 + wiggle);
    flicker.values.push_back(
        i == 0 ? kUndefined
               : 0.002 * std::sin(i * 0.3) +
                     (i >= 200 && i <= 228 ? 0.02 * std::sin((i - 200) * 0.9) : 0));
    drift.values.push_back(i > 2 * n / 3 ? 8.0 * (i - 2 * n / 3) / (n / 3.0) : 0.3 * wiggle);
    flash.values.push_back(i >= 58 && i <= 66 ? 4 : 0);
  }
  r.series = {warp, occl, flicker, drift, flash};
  auto seg = [&](const char* metric, int a, int b, int peak_frame, double peak, Severity s) {
    r.segments.push_back({metric, a, b, a / scene.fps, b / scene.fps, peak, peak_frame, s});
  };
  seg("warp_error", 118, 136, 127, 0.056, Severity::reject);
  seg("warp_error", 40, 42, 41, 0.0075, Severity::info);
  seg("flicker", 200, 228, 214, 0.021, Severity::review);
  seg("drift", 250, 299, 290, 7.3, Severity::reject);
  seg("flash", 58, 66, 60, 4, Severity::review);
  for (const auto& s : r.series) {
    MetricSummary m{s.metric};
    double sum = 0, mx = -1e300;
    int count = 0;
    for (double v : s.values)
      if (is_defined(v)) sum += v, mx = std::max(mx, v), ++count;
    m.mean = sum / count;
    m.p50 = m.mean;
    m.p95 = mx * 0.9;
    m.max = mx;
    r.summary.metrics.push_back(m);
  }
  r.summary.coherence = 41.5;
  r.summary.details["flash"] = {{"max_flashes_per_s", 4},
                                {"general_max_flashes_per_s", 4},
                                {"red_max_flashes_per_s", 0},
                                {"hazard", true},
                                {"limit_flashes_per_s", 3}};
  r.summary.details["flicker"] = {
      {"percent_flicker", 2.1}, {"flicker_index", 0.004}, {"dominant_hz", 4.3}};
  TrackedObject ball;
  ball.id = 1;
  ball.first_frame = 0;
  ball.last_frame = n - 1;
  ball.end_reason = "clip_end";
  // Sampled every 5 frames, as the drift metric samples objects.
  ball.kind = TrackedKind::moving;
  for (int i = 0; i < n; i += 5) {
    const cv::Rect b = scene.ball_box(i);
    TrackedSample look;
    look.frame = i;
    look.box_px = {double(b.x), double(b.y), double(b.width), double(b.height)};
    look.drift = drift.values[i];
    ball.samples.push_back(look);
  }
  ball.peak_drift = 7.3;
  ball.drift_rate_per_s = 0.61;
  r.objects.push_back(ball);
  r.verdict.status = Verdict::reject;
  r.verdict.reasons = {"warp_error peak 0.056 >= 0.03 (reject) at 3.93-4.53 s",
                       "drift 7.3 >= 5 (reject) at 8.33-9.97 s",
                       "flash: 4 flashes in one second > 3 (review)"};
  r.notes = {"Invented report for tests; the note's <tags> & \"quotes\" must stay text."};
  return r;
}

HtmlAssets synthetic_assets(const Report& report, const SyntheticScene& scene,
                            const HtmlOptions& options) {
  HtmlAssets assets;
  ThumbnailCollector thumbs;
  for (int i = 0; i < scene.frame_count; i += 1) {
    DecodedFrame f{i, i / scene.fps, cv::Mat()};
    // Rendering every frame is cheap but not free: only frames the
    // collector could keep are drawn (it keeps multiples of its interval).
    if (i % thumbs.interval_frames() == 0) f.bgr = scene.render(i);
    thumbs.add(f);
  }
  assets.thumbnails = thumbs.thumbnails();
  assets.legends = make_panel_legends();
  for (int64_t frame : panel_frames(report, options)) {
    FramePlanes prev, cur;
    FramePair pair;
    scene.make_pair(frame, prev, cur, pair);
    PanelImages p = encode_panels(make_pair_panels(pair), report, options);
    for (auto& look : p.objects) {
      const TrackedObject* o = nullptr;
      for (const auto& obj : report.objects)
        if (obj.id == look.object_id) o = &obj;
      if (auto first = o ? object_first_box(*o, {scene.width, scene.height}) : std::nullopt) {
        const cv::Mat frame0 = scene.render(first->frame);
        cv::Mat crop;
        cv::resize(frame0(first->box_px & cv::Rect(0, 0, frame0.cols, frame0.rows)), crop,
                   {112, 112});
        look.first_look = encode_jpeg(crop, options.jpeg_quality);
      }
    }
    assets.panels.push_back(std::move(p));
  }
  return assets;
}

}  // namespace clipwarden::fixtures
