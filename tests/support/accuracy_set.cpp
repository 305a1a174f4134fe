#include "support/accuracy_set.h"

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <optional>

#include "clipwarden/clip_source.h"
#include "analyzer/encode/clip_writer.h"
#include "analyzer/inject/defect_spec.h"
#include "clipwarden/inject.h"
#include "support/clips.h"
#include "support/opencv_doc.h"

namespace clipwarden::accuracy {
namespace fs = std::filesystem;
using inject::DefectClass;
using inject::StrengthLevel;

namespace {

const char* kOpencvData = "/usr/share/doc/opencv-doc/examples/data";

void say(const SetOptions& o, const std::string& line) {
  if (o.log) o.log(line);
}

// Renders a lavfi test source with the ffmpeg command-line tool (FFV1).
Expected<std::string> render_lavfi(const SetOptions& o, const BaseSource& s, int frames) {
  const std::string out = o.work_dir + "/sources/" + s.name + "-" + std::to_string(frames) + ".mkv";
  if (fs::exists(out)) return out;
  fs::create_directories(o.work_dir + "/sources");
  const std::string tmp = o.work_dir + "/sources/.part-" + s.name + ".mkv";
  const std::string failed =
      test::make_lavfi_clip(tmp, s.path, {"-frames:v", std::to_string(frames), "-c:v", "ffv1", "-pix_fmt", "bgr0"});
  if (!failed.empty()) return input_error(s.path, "ffmpeg could not render this lavfi source: " + failed);
  fs::rename(tmp, out);
  return out;
}

// Copies frames [first, first + count) of `source` at `long_side`, times
// shifted to start at 0, losslessly.
Expected<BaseClip> cut_window(const SetOptions& o, const BaseSource& s, const std::string& full_path) {
  BaseClip clip{s, full_path, o.work_dir + "/bases/" + s.name + ".mkv", 0, 0, 0};
  SourceOptions options;
  options.working_long_side = o.long_side;
  auto source = ClipSource::open(full_path, options);
  if (!source) return source.error();
  const std::string tmp = o.work_dir + "/bases/.part-" + s.name + ".mkv";
  std::unique_ptr<ClipWriter> writer;
  DecodedFrame frame;
  double t0 = 0;
  const int limit = s.max_frames > 0 ? std::min(s.max_frames, o.max_frames) : o.max_frames;
  for (int i = 0; clip.frames < limit; ++i) {
    auto got = (*source)->read(frame);
    if (!got) return got.error();
    if (*got == FrameRead::end_of_clip) break;
    if (i < s.first_frame) continue;
    if (!writer) {
      t0 = frame.t_s;
      ClipWriterOptions wo;
      wo.codec = VideoCodec::ffv1;
      wo.nominal_fps = (*source)->info().fps > 0 ? (*source)->info().fps : 25;
      auto w = ClipWriter::create(tmp, frame.bgr.cols, frame.bgr.rows, wo);
      if (!w) return w.error();
      writer = std::move(*w);
    }
    if (Status st = writer->write(frame.bgr, frame.t_s - t0); !st) return st.error();
    ++clip.frames;
  }
  if (!writer) return input_error(full_path, "no frames after frame " + std::to_string(s.first_frame));
  if (Status st = writer->finish(); !st) return st.error();
  fs::rename(writer->path(), clip.path);
  clip.fps = (*source)->info().fps > 0 ? (*source)->info().fps : 25;
  clip.full_frames = static_cast<int>((*source)->info().frame_count);  // the container's estimate
  return clip;
}

}  // namespace

std::string base_kind(const BaseSource& s) { return s.real ? "camera" : s.lavfi ? "synthetic" : "generated"; }

std::vector<BaseSource> available_sources(const SetOptions& o) {
  const std::string data = kOpencvData;
  // Windows avoid the trailer's own scene cuts and its black opening
  // (Megamind: cuts near 4.1, 6.5 and 8.4 s found with FFmpeg's scdet).
  std::vector<BaseSource> all = {
      {"vtest", data + "/vtest.avi", true, false, 0, true},
      {"megamind", data + "/Megamind.avi", true, false, 15, true, 80},  // frames 15-94
      {"box", "box.mp4", true, false, 0, true},
      {"cup", "cup.mp4", true, false, 0, true},
      {"tree", data + "/tree.avi", true, false, 0, false},  // ~2 fps, irregular: checked clean only
      {"testsrc2", "testsrc2=size=" + std::to_string(o.long_side) + "x" + std::to_string(o.long_side * 3 / 4) +
                       ":rate=25",
       false, true, 0, true},
      {"mandelbrot", "mandelbrot=size=" + std::to_string(o.long_side) + "x" + std::to_string(o.long_side * 3 / 4) +
                         ":rate=25",
       false, true, 0, true},
  };
  // Model outputs of the corpus: short and at low frame rates as generated
  // clips are (8 fps, 16-49 frames), and longer ones at 24-29 fps (the
  // parrot GIF stores periodic repeats). Not real footage: no false alarm
  // is counted on them (the corpus tables count the model outputs).
  if (!o.corpus_dir.empty())
    for (const auto& [name, file] : {std::pair{"gen_svd", "gen_animatelcm_svd_000002.mp4"},
                                     std::pair{"gen_easyanimate", "gen_easyanimate_asset1.mp4"},
                                     std::pair{"gen_instructvideo", "gen_vgen_instructvideo_0001.mp4"},
                                     std::pair{"gen_parrot", "gen_opensora_v1.3_demo_parrot.gif"},
                                     std::pair{"gen_coast", "gen_opensora_v2.0_motion_score_1.gif"},
                                     std::pair{"gen_aurora", "gen_allegro_demo_video.mp4"}})
      all.push_back({.name = name, .path = o.corpus_dir + "/clips/" + file, .real = false});
  const auto wanted = [&](const BaseSource& s) {
    return o.base_names.empty() || std::any_of(o.base_names.begin(), o.base_names.end(), [&](const std::string& n) {
             return n == s.name || n == base_kind(s);
           });
  };
  std::vector<BaseSource> out;
  for (auto s : all) {
    if (!wanted(s)) continue;
    if (s.lavfi) {
      if (!test::have_tool("ffmpeg")) {
        say(o, "skipping " + s.name + ": the ffmpeg tool is not installed");
        continue;
      }
    } else if (s.path.find('/') == std::string::npos) {
      s.path = test::unpacked_opencv_doc_clip(o.work_dir + "/sources", s.path);
      if (s.path.empty()) {
        say(o, "skipping " + s.name + ": opencv-doc's gzipped clip (or gzip) is missing");
        continue;
      }
    } else if (!fs::exists(s.path)) {
      say(o, "skipping " + s.name + ": " + s.path + " is missing (Debian package opencv-doc)");
      continue;
    }
    out.push_back(s);
  }
  return out;
}

Expected<std::vector<BaseClip>> prepare_base_clips(const SetOptions& o) {
  fs::create_directories(o.work_dir + "/bases");
  std::vector<BaseClip> clips;
  for (const auto& s : available_sources(o)) {
    std::string full = s.path;
    if (s.lavfi) {
      // Rendered longer than the window so cuts can splice from 4+ s away.
      auto rendered = render_lavfi(o, s, o.max_frames + 150);
      if (!rendered) return rendered.error();
      full = *rendered;
    }
    auto clip = cut_window(o, s, full);
    if (!clip) return clip.error();
    say(o, "base " + s.name + ": " + std::to_string(clip->frames) + " frames at " + std::to_string(clip->fps) +
               " fps");
    clips.push_back(std::move(*clip));
  }
  return clips;
}

namespace {

// Deterministic per-case numbers from the run seed and the case's name
// (FNV-1a, then a splitmix64 step; common practice for seed derivation).
uint64_t case_seed(uint64_t seed, const std::string& id) {
  uint64_t h = 1469598103934665603ULL ^ seed;
  for (unsigned char ch : id) h = (h ^ ch) * 1099511628211ULL;
  h = (h ^ (h >> 30)) * 0xbf58476d1ce4e5b9ULL;
  h = (h ^ (h >> 27)) * 0x94d049bb133111ebULL;
  return (h ^ (h >> 31)) & 0x7fffffffULL;
}

std::string range_spec(DefectClass cls, StrengthLevel level, int start, const BaseClip& b) {
  const int n = b.frames;
  // About a second of pulsing, at least 6 frames, at most a quarter of the
  // clip (which wins in a clip of under 24 frames).
  const int pulse_len = std::min(std::max(static_cast<int>(std::lround(b.fps)), 6), std::max(n / 4, 1));
  switch (cls) {
    case DefectClass::flicker:
    case DefectClass::local_flicker:
    case DefectClass::boiling:
      return std::to_string(start) + "-" + std::to_string(start + pulse_len - 1);
    case DefectClass::strobe: {
      // A strobe is a hazard, and `flash` is to find it, only with more than
      // three flashes in one second (WCAG 2.x, 2.3.1). The injector draws at
      // most one flash per two frames (every other frame when its rate is
      // at or above half the frame rate), so four flashes need 4 * fps /
      // min(6 Hz, fps / 2) frames: 8 at 8 fps. A quarter of a 16-frame clip
      // (4 frames) held two flashes, which no screening should flag.
      const double flashes_per_s = std::min(inject::default_pulse_hz(DefectClass::strobe), b.fps / 2);
      const int hazard_len = static_cast<int>(std::ceil(4 * b.fps / flashes_per_s - 1e-9));
      const int len = std::min(std::max(pulse_len, hazard_len), n - 1 - start);
      return std::to_string(start) + "-" + std::to_string(start + len - 1);
    }
    case DefectClass::freeze:
    case DefectClass::drop: {
      const int len = static_cast<int>(inject::strength_for_level(cls, level));
      return std::to_string(start) + "-" + std::to_string(start + len - 1);
    }
    case DefectClass::jerk: return std::to_string(start);
    default: return std::to_string(start) + "-";  // drift classes and cuts run to the end
  }
}

// Where a cut's frames come from, as spec keys; nullopt when the source is
// too short to splice from the level's distance.
std::optional<std::string> cut_source(StrengthLevel level, int start, const BaseClip& b,
                                      const std::vector<BaseClip>& bases) {
  if (level == StrengthLevel::strong) {
    // Another base clip: a different scene altogether.
    const auto it = std::find_if(bases.begin(), bases.end(), [&](const BaseClip& o) {
      return o.source.name != b.source.name && o.source.inject_into;
    });
    if (it != bases.end()) return ",source=" + it->path + ",source_start=0";
  }
  const double seconds = inject::strength_for_level(DefectClass::cut, level);
  const int offset = static_cast<int>(std::lround(seconds * b.fps));
  const int here = b.source.first_frame + start;
  const int remaining = b.frames - start;  // the cut runs to the end
  // After the range if the source is long enough, else before it.
  int from = here + offset;
  if (from + remaining > b.full_frames) from = here - offset;
  if (from < 0) return std::nullopt;
  return ",source=" + b.full_path + ",source_start=" + std::to_string(from);
}

}  // namespace

std::vector<PlannedCase> plan_cases(const std::vector<BaseClip>& bases, const std::vector<DefectClass>& classes,
                                    const std::vector<StrengthLevel>& levels, int placements, uint64_t seed,
                                    const std::string& work_dir) {
  std::vector<PlannedCase> cases;
  fs::create_directories(work_dir + "/cases");
  for (const auto& b : bases) {
    if (!b.source.inject_into) continue;
    for (DefectClass cls : classes)
      for (StrengthLevel level : levels)
        for (int p = 0; p < placements; ++p) {
          PlannedCase c;
          c.base = &b;
          c.cls = cls;
          c.level = level;
          c.placement = p;
          c.id = b.source.name + "/" + inject::to_string(cls) + "/" + inject::to_string(level) + "/" +
                 std::to_string(p);
          c.seed = case_seed(seed, c.id);
          const int start = static_cast<int>(b.frames * (0.30 + 0.15 * static_cast<double>(c.seed % 1000) / 1000.0));
          c.spec = std::string(inject::to_string(cls)) + "@" + range_spec(cls, level, start, b);
          if (!inject::strength_is_range_length(cls))
            c.spec += std::string(":strength=") + inject::to_string(level);
          if (cls == DefectClass::cut) {
            const auto source = cut_source(level, start, b, bases);
            if (!source) continue;
            c.spec += *source;
          }
          std::string file = c.id;
          std::replace(file.begin(), file.end(), '/', '-');
          c.clip_path = work_dir + "/cases/" + file + ".mkv";
          cases.push_back(std::move(c));
        }
  }
  return cases;
}

Expected<nlohmann::json> inject_case(const PlannedCase& c) {
  InjectOptions options;
  options.defect_specs = {c.spec};
  options.output_path = c.clip_path;
  options.seed = c.seed;
  options.writer.codec = VideoCodec::ffv1;
  return inject_defects(c.base->path, options);
}

}  // namespace clipwarden::accuracy
