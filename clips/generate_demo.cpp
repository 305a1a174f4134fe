// clipwarden_demo_clips OUT_DIR: renders the demo clips of clips/README.md.
//
// Lanternfish Studio (an invented animation studio) reviews generated shots
// of a paper lantern drifting across a harbour at dusk. Four 5-second clips,
// 480x270 at 24 fps, H.264:
//   lanternfish_clean.mp4    the shot as it should be
//   lanternfish_flicker.mp4  the light pulses for one second (clipwarden inject)
//   lanternfish_drift.mp4    the lantern slowly changes colour (rendered)
//   lanternfish_jump.mp4     the shot jumps to another take at 3 s (clipwarden inject)
// plus a truth file for each defect clip. Rendering and encoding are
// deterministic: running it again writes the same files.
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <string>

#include "analyzer/inject/frame_effects.h"
#include "analyzer/encode/clip_writer.h"
#include "clipwarden/inject.h"
#include "lantern_scene.h"

namespace fs = std::filesystem;
using namespace clipwarden;

namespace {

constexpr int kFrames = 120;  // 5 s at 24 fps
constexpr double kFps = 24;

ClipWriterOptions writer_options(VideoCodec codec) {
  ClipWriterOptions o;
  o.codec = codec;
  o.crf = 23;
  o.nominal_fps = kFps;
  o.threads = 1;  // one encoder thread: byte-identical output on every run
  return o;
}

Expected<std::string> render_clip(const lanternfish::HarbourScene& scene, const std::string& path, VideoCodec codec) {
  auto writer = ClipWriter::create(path, 480, 270, writer_options(codec));
  if (!writer) return writer.error();
  for (int i = 0; i < kFrames; ++i)
    if (Status s = (*writer)->write(scene.render(i / kFps), i / kFps); !s) return s.error();
  if (Status s = (*writer)->finish(); !s) return s.error();
  return (*writer)->path();
}

// Truth files name the clips by file name, not by this run's folders.
void write_truth(nlohmann::json truth, const std::string& path, const std::string& source_name) {
  truth.erase("truth_path");
  truth["source"]["path"] = source_name;
  truth["output"]["path"] = fs::path(truth["output"]["path"].get<std::string>()).filename().string();
  for (auto& d : truth["defects"])
    if (d["details"].contains("source"))
      d["details"]["source"] = fs::path(d["details"]["source"].get<std::string>()).filename().string();
  std::ofstream(path) << truth.dump(1) << "\n";
}

Expected<nlohmann::json> inject_into(const std::string& clean, const std::string& spec, const std::string& out) {
  InjectOptions options;
  options.defect_specs = {spec};
  options.output_path = out;
  options.truth_path = out + ".truth.tmp";
  options.writer = writer_options(VideoCodec::h264);
  auto truth = inject_defects(clean, options);
  fs::remove(options.truth_path);
  return truth;
}

// The drift clip's truth: the lantern's mean colour difference (CIEDE2000)
// between the clean and the drifting render at the last frame.
nlohmann::json drift_truth(const lanternfish::ShotParams& drift) {
  const lanternfish::HarbourScene clean_scene({}), drift_scene(drift);
  const double t = (kFrames - 1) / kFps;
  const cv::Rect2d box = clean_scene.lantern_box(t);
  const inject::SoftMask body = inject::feathered_ellipse({480, 270}, box, 0.15);
  const double de = color::ciede2000(inject::as_lab(inject::mean_lab(clean_scene.render(t), body)),
                                     inject::as_lab(inject::mean_lab(drift_scene.render(t), body)));
  const int first = static_cast<int>(drift.drift_start_s * kFps) + 1;
  nlohmann::json track = nlohmann::json::array();
  for (int i = first; i < kFrames; ++i) {
    const cv::Rect2d b = drift_scene.lantern_box(i / kFps);
    track.push_back({i, std::round(b.x * 10) / 10, std::round(b.y * 10) / 10, b.width, b.height});
  }
  nlohmann::json d = {{"class", "colour_drift"},
                      {"spec", "rendered: the lantern's hue turns " + std::to_string(int(drift.drift_end_deg)) +
                                   " degrees from " + std::to_string(drift.drift_start_s).substr(0, 3) + " s"},
                      {"frames", {first, kFrames - 1}},
                      {"times_s", {first / kFps, (kFrames - 1) / kFps}},
                      {"strength", std::round(de * 100) / 100},
                      {"strength_unit", "CIEDE2000 of the region's mean colour at the end"},
                      {"level", nullptr},
                      {"region", {{"x", track[0][1]}, {"y", track[0][2]}, {"w", box.width}, {"h", box.height}}},
                      {"region_track", track},
                      {"details", nlohmann::json::object()}};
  return {{"schema", kInjectTruthSchema},
          {"source", {{"path", "lanternfish_clean (rendered)"}, {"frame_count", kFrames}, {"fps", kFps},
                      {"width", 480}, {"height", 270}}},
          {"output", {{"path", "lanternfish_drift.mp4"}, {"codec", "h264"}, {"frame_count", kFrames}}},
          {"seed", 1},
          {"defects", {d}}};
}

int fail(const Error& e) {
  std::fprintf(stderr, "clipwarden_demo_clips: %s\n", e.message().c_str());
  return 1;
}

}  // namespace

int main(int argc, char** argv) {
  if (argc != 2) {
    std::fprintf(stderr, "usage: clipwarden_demo_clips OUT_DIR   (writes the demo clips of clips/README.md)\n");
    return 2;
  }
  const fs::path out(argv[1]);
  const fs::path work = out / ".demo-work";
  fs::create_directories(work);
  if (!h264_encoder_available()) std::fprintf(stderr, "note: no libx264; writing lossless FFV1 .mkv instead\n");

  const lanternfish::HarbourScene clean({});
  auto clean_lossless = render_clip(clean, (work / "clean.mkv").string(), VideoCodec::ffv1);
  if (!clean_lossless) return fail(clean_lossless.error());
  auto clean_mp4 = render_clip(clean, (out / "lanternfish_clean.mp4").string(), VideoCodec::automatic);
  if (!clean_mp4) return fail(clean_mp4.error());

  // Another take: a close-up of the lantern further along the harbour,
  // later in its flight.
  lanternfish::ShotParams other;
  other.camera_start_px = 150;
  other.lantern_start_x = 300;
  other.time_offset_s = 4;
  other.close_up = 2.2;
  auto other_take = render_clip(lanternfish::HarbourScene(other), (work / "other_take.mkv").string(), VideoCodec::ffv1);
  if (!other_take) return fail(other_take.error());

  auto flicker = inject_into(*clean_lossless, "flicker@48-71:strength=0.08,hz=6",
                             (out / "lanternfish_flicker.mp4").string());
  if (!flicker) return fail(flicker.error());
  write_truth(*flicker, (out / "lanternfish_flicker.truth.json").string(), "lanternfish_clean.mp4");

  auto jump = inject_into(*clean_lossless, "cut@72-:source=" + *other_take + ",source_start=0",
                          (out / "lanternfish_jump.mp4").string());
  if (!jump) return fail(jump.error());
  write_truth(*jump, (out / "lanternfish_jump.truth.json").string(), "lanternfish_clean.mp4");

  lanternfish::ShotParams drift;
  drift.drift_start_s = 1.5;
  drift.drift_end_deg = 110;
  auto drift_mp4 = render_clip(lanternfish::HarbourScene(drift), (out / "lanternfish_drift.mp4").string(),
                               VideoCodec::automatic);
  if (!drift_mp4) return fail(drift_mp4.error());
  std::ofstream((out / "lanternfish_drift.truth.json").string()) << drift_truth(drift).dump(1) << "\n";

  fs::remove_all(work);
  for (const char* name : {"lanternfish_clean", "lanternfish_flicker", "lanternfish_drift", "lanternfish_jump"})
    std::printf("%s\n", (out / (std::string(name) + (h264_encoder_available() ? ".mp4" : ".mkv"))).c_str());
  return 0;
}
