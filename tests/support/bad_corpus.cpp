#include "support/bad_corpus.h"

#include <sys/stat.h>
#include <unistd.h>

#include <random>

#include "support/clips.h"
#include "support/gate_files.h"
#include "support/robust_run.h"

namespace clipwarden::test {
namespace fs = std::filesystem;
using nlohmann::json;

namespace {

// The base clip: 24 frames of testsrc2, 160x120 at 12 fps.
constexpr int kFrames = 24;
const char* kSource = "testsrc2=size=160x120:rate=12:duration=2";

size_t frames_in(const json& r) { return r["frames"].size(); }

std::function<std::string(const json&)> frames_exactly(size_t n) {
  return [n](const json& r) {
    return frames_in(r) == n ? ""
                             : "expected " + std::to_string(n) + " frames, report has " +
                                   std::to_string(frames_in(r));
  };
}

// A damaged copy of the base clip may be judged on what decodes, but it may
// not pass for the whole clip.
std::string fewer_than_full(const json& r) {
  if (frames_in(r) >= static_cast<size_t>(kFrames))
    return "a truncated clip reports all " + std::to_string(frames_in(r)) + " frames";
  return "";
}

// A damaged copy that yields fewer frames than the clip has may not pass as
// if nothing were wrong (mp4 header seed 2 once gave 1 frame and "pass").
std::string not_silently_short(const json& r) {
  if (frames_in(r) < static_cast<size_t>(kFrames) && r["verdict"]["status"] == "pass")
    return "passes with " + std::to_string(frames_in(r)) + " of " + std::to_string(kFrames) +
           " frames";
  return "";
}

std::string note_frames(const json& r) {
  return "frames " + std::to_string(frames_in(r)) + ", " +
         r["verdict"]["status"].get<std::string>();
}

std::string shows_freeze(const json& r) {
  const auto& s = r["summary"];
  if (!s.contains("freeze") || !s["freeze"]["mean"].is_number())
    return "no freeze statistics for identical frames";
  if (s["freeze"]["mean"].get<double>() < 0.9)
    return "identical frames but freeze mean " + s["freeze"]["mean"].dump();
  for (const auto& seg : r["segments"])
    if (seg["metric"] == "freeze") return "";
  return "identical frames but no freeze segment";
}

std::string spans_the_gap(const json& r) {
  if (frames_in(r) != static_cast<size_t>(kFrames)) return fewer_than_full(r);
  const double last_t = r["frames"].back()["t"].get<double>();
  if (last_t < 10.0) return "the 10 s gap is gone: last frame at " + std::to_string(last_t) + " s";
  if (!r["summary"]["stream"]["vfr"].get<bool>()) return "a 10 s gap is not reported as VFR";
  return "";
}

// Damage the decoder saw (errors, concealed or lost frames) must reach the
// report and keep the clip from passing: a smear that stays still looks
// perfectly coherent to every motion metric.
std::string damage_is_reported(const json& r) {
  const auto& st = r["summary"]["stream"];
  for (const char* key : {"decode_errors", "concealed_frames", "lost_frames"})
    if (!st.contains(key) || !st[key].is_number_integer()) return std::string("no stream.") + key;
  if (st["decode_errors"].get<int>() + st["concealed_frames"].get<int>() +
          st["lost_frames"].get<int>() ==
      0)
    return "the decoder's complaints are not in summary.stream";
  if (r["verdict"]["status"] == "pass") return "a clip the decoder complained about passes";
  return "";
}

std::string note_damage(const json& r) {
  const auto& st = r["summary"]["stream"];
  return note_frames(r) + ", decode_errors " + st.value("decode_errors", json(-1)).dump() +
         ", concealed " + st.value("concealed_frames", json(-1)).dump() + ", lost " +
         st.value("lost_frames", json(-1)).dump();
}

// Stray bytes after the last box: every frame, no decoder complaint, and a
// note that says so.
std::string whole_with_stray_note(const json& r) {
  if (auto e = frames_exactly(kFrames)(r); !e.empty()) return e;
  for (const auto& n : r["notes"])
    if (n.is_string() && (n.get<std::string>().find("not a box") != std::string::npos ||
                          n.get<std::string>().find("cut short") != std::string::npos))
      return "";
  return "no note about the bytes after the last box";
}

class Maker {
 public:
  explicit Maker(const fs::path& folder) {
    corpus_.folder = folder;
    fs::create_directories(folder);
  }

  std::string path(const std::string& file) const { return (corpus_.folder / file).string(); }

  // Runs ffmpeg; records a problem and returns false when it fails.
  bool lavfi(const std::string& file, const std::string& source,
             const std::vector<std::string>& extra, const std::vector<std::string>& before = {}) {
    const std::string err = make_lavfi_clip(path(file), source, extra, before);
    if (!err.empty()) corpus_.problems += file + ": ffmpeg failed: " + err + "\n";
    return err.empty();
  }

  BadCase& add(BadCase c) {
    corpus_.cases.push_back(std::move(c));
    return corpus_.cases.back();
  }

  BadCase& add(const std::string& name, const std::string& file, Expect expect,
               std::function<std::string(const json&)> check = nullptr) {
    BadCase c;
    c.name = name;
    c.path = path(file);
    c.expect = expect;
    c.check_report = std::move(check);
    c.note_report = note_frames;
    return add(std::move(c));
  }

  BadCorpus take() { return std::move(corpus_); }
  BadCorpus corpus_;
};

void add_truncations(Maker& m, const std::string& whole, const std::string& ext) {
  const std::string bytes = read_bytes(m.path(whole));
  for (int pct : {1, 40, 90}) {
    const std::string file = "trunc_" + std::to_string(pct) + "pct" + ext;
    write_bytes(m.path(file), bytes.substr(0, bytes.size() * pct / 100));
    m.add("truncated " + ext.substr(1) + " at " + std::to_string(pct) + "%", file,
          Expect::report_or_error, fewer_than_full);
  }
}

void add_bit_flips(Maker& m, const std::string& whole, const std::string& ext) {
  const std::string bytes = read_bytes(m.path(whole));
  // Header: the first 512 bytes hold the container header (and, with
  // +faststart, the start of the MP4 index). Payload: the second half.
  for (uint32_t seed : {1u, 2u}) {
    std::string header = bytes, payload = bytes;
    flip_random_bits(header, 0, 512, 8, seed);
    flip_random_bits(payload, bytes.size() / 2, bytes.size(), 32, seed);
    const std::string s = std::to_string(seed);
    write_bytes(m.path("flip_header_" + s + ext), header);
    write_bytes(m.path("flip_payload_" + s + ext), payload);
    m.add("header bits flipped " + ext.substr(1) + " seed " + s, "flip_header_" + s + ext,
          Expect::report_or_error, not_silently_short);
    m.add("payload bits flipped " + ext.substr(1) + " seed " + s, "flip_payload_" + s + ext,
          Expect::report_or_error, not_silently_short);
  }
}

// Width and height of a PNG's IHDR, big-endian, CRC left stale (FFmpeg's
// decoder does not check chunk CRCs by default: recalled, not verified).
std::string png_with_size(std::string png, uint32_t w, uint32_t h) {
  if (png.size() < 24) return png;
  for (int i = 0; i < 4; ++i) {
    png[16 + i] = static_cast<char>((w >> (24 - 8 * i)) & 0xff);
    png[20 + i] = static_cast<char>((h >> (24 - 8 * i)) & 0xff);
  }
  return png;
}

void add_frame_folders(Maker& m) {
  const std::vector<std::pair<int, int>> sizes = {{160, 120}, {200, 150}, {96, 64}, {160, 120}};
  fs::create_directories(m.path("mixed_sizes"));
  for (size_t i = 0; i < sizes.size(); ++i) {
    const std::string size = std::to_string(sizes[i].first) + "x" + std::to_string(sizes[i].second);
    m.lavfi("mixed_sizes/frame_" + std::to_string(i + 1) + ".png",
            "testsrc2=size=" + size + ":rate=12", {"-frames:v", "1"});
  }
  m.add("frame folder, mixed image sizes", "mixed_sizes", Expect::report_or_error);

  fs::create_directories(m.path("huge_png"));
  for (int i = 1; i <= 3; ++i)
    m.lavfi("huge_png/frame_" + std::to_string(i) + ".png", "testsrc2=size=160x120:rate=12",
            {"-frames:v", "1"});
  write_bytes(m.path("huge_png/frame_2.png"),
              png_with_size(read_bytes(m.path("huge_png/frame_2.png")), 0x7fffffff, 0x7fffffff));
  auto& c =
      m.add("frame folder, IHDR patched to 2^31-1 square", "huge_png", Expect::report_or_error);
  c.note = "PNG width/height fields patched";
}

void add_unreadable(Maker& m) {
  if (geteuid() != 0) {
    write_bytes(m.path("unreadable.mp4"), read_bytes(m.path("base.mp4")));
    chmod(m.path("unreadable.mp4").c_str(), 0);
    m.add("unreadable file (chmod 000)", "unreadable.mp4", Expect::error);
  }
  // As root permissions do not bite: a folder named like a clip stands in
  // (the analysis cannot open it as a file either way).
  fs::create_directories(m.path("folder_named_like_a_clip.mp4"));
  m.add("folder named like a clip", "folder_named_like_a_clip.mp4", Expect::error);
}

// Second round: a name that is not UTF-8, files that are not regular files,
// damage in the middle of the stream, and stray bytes after the last box.
void add_damage_and_odd_files(Maker& m) {
  const std::string base = read_bytes(m.path("base.mp4"));
  write_bytes(m.path("take_\xff_latin1_\xe9.mp4"), base);
  m.add("file name not UTF-8 (bytes 0xFF, 0xE9)", "take_\xff_latin1_\xe9.mp4", Expect::report,
        frames_exactly(kFrames));

  ::mkfifo(m.path("named_pipe.mp4").c_str(), 0644);
  auto& fifo = m.add("named pipe (FIFO) named like a clip", "named_pipe.mp4", Expect::error);
  fifo.found_by_folder_scan = false;  // a folder scan takes regular files only
  BadCase zero;
  zero.name = "character device (/dev/zero)";
  zero.path = "/dev/zero";
  zero.expect = Expect::error;
  zero.found_by_folder_scan = false;
  m.add(std::move(zero));

  // 8 kB of random bytes over the middle of the clip (fixed seed).
  std::string damaged = base;
  std::mt19937 random(17);
  const size_t from = damaged.size() / 2 - 4096;
  for (size_t i = from; i < from + 8192 && i < damaged.size(); ++i)
    damaged[i] = static_cast<char>(random() & 0xff);
  write_bytes(m.path("random_8k_in_middle.mp4"), damaged);
  auto& mid = m.add("8 kB of random bytes in the middle", "random_8k_in_middle.mp4",
                    Expect::report_or_error, damage_is_reported);
  mid.note_report = note_damage;

  write_bytes(m.path("trailing_binary.mp4"),
              base + std::string("\x00\x00\x00\x10\xff\xfe\x00\x01stray", 13));
  m.add("stray binary bytes after the last box", "trailing_binary.mp4", Expect::report,
        whole_with_stray_note);
  write_bytes(m.path("trailing_text.mp4"), base + "hello, these bytes follow the last box\n");
  m.add("stray text after the last box", "trailing_text.mp4", Expect::report,
        whole_with_stray_note);
}

}  // namespace

BadCorpus make_bad_corpus(const fs::path& folder) {
  Maker m(folder);
  const std::vector<std::string> h264 = {"-c:v",    "libx264",   "-pix_fmt",
                                         "yuv420p", "-movflags", "+faststart"};
  if (!m.lavfi("base.mp4", kSource, h264) || !m.lavfi("base.mkv", kSource, {"-c:v", "ffv1"}))
    return m.take();
  m.add("intact mp4 (control)", "base.mp4", Expect::report, frames_exactly(kFrames));
  m.add("intact mkv/ffv1 (control)", "base.mkv", Expect::report, frames_exactly(kFrames));
  add_truncations(m, "base.mp4", ".mp4");
  add_truncations(m, "base.mkv", ".mkv");
  add_bit_flips(m, "base.mp4", ".mp4");
  add_bit_flips(m, "base.mkv", ".mkv");

  write_bytes(m.path("zero_size.mp4"), "");
  m.add("zero-size file", "zero_size.mp4", Expect::error);
  write_bytes(m.path("not_video.mp4"), "this is a text file, not a video\n");
  m.add("text file named .mp4", "not_video.mp4", Expect::error);

  // y4m: the header is text ("YUV4MPEG2 W160 H120 ..."), so the declared
  // size can be set to anything while the frames stay 160x120.
  if (m.lavfi("base.y4m", kSource, {"-pix_fmt", "yuv420p"})) {
    m.add("intact y4m (control)", "base.y4m", Expect::report, frames_exactly(kFrames));
    for (const auto& [name, size] : std::vector<std::pair<std::string, std::string>>{
             {"huge_dims.y4m", "W100000 H100000"},
             {"zero_dims.y4m", "W0 H0"},
             {"overflow_dims.y4m", "W2147483647 H2147483647"}}) {
      std::string bytes = read_bytes(m.path("base.y4m"));
      replace_first(bytes, "W160 H120", size);
      write_bytes(m.path(name), bytes);
      m.add("y4m header declares " + size, name, Expect::report_or_error).note = "header patched";
    }
  }

  if (m.lavfi("tiny_1x1.mkv", "testsrc2=size=2x2:rate=12:duration=1",
              {"-vf", "scale=1:1", "-c:v", "ffv1"}))
    m.add("1x1 video", "tiny_1x1.mkv", Expect::report_or_error);
  if (m.lavfi("wide_16384.mkv", "testsrc2=size=16384x16:rate=4:duration=1", {"-c:v", "ffv1"}))
    m.add("16384x16 video", "wide_16384.mkv", Expect::report, frames_exactly(4));
  m.lavfi("one_frame.mp4", kSource, {"-frames:v", "1", "-c:v", "libx264", "-pix_fmt", "yuv420p"});
  m.add("single frame", "one_frame.mp4", Expect::report_or_error, frames_exactly(1));
  m.lavfi("two_frames.mp4", kSource, {"-frames:v", "2", "-c:v", "libx264", "-pix_fmt", "yuv420p"});
  m.add("two frames", "two_frames.mp4", Expect::report, frames_exactly(2));
  m.lavfi("all_black.mp4", "color=c=black:size=160x120:rate=12:duration=2",
          {"-c:v", "libx264", "-pix_fmt", "yuv420p"});
  m.add("all black", "all_black.mp4", Expect::report, frames_exactly(kFrames));
  m.lavfi("all_identical.mkv",
          "testsrc2=size=160x120:rate=12,trim=end_frame=1,loop=loop=23:size=1:start=0,"
          "setpts=N/12/TB",
          {"-c:v", "ffv1"});
  m.add("all identical (one frame repeated)", "all_identical.mkv", Expect::report, shows_freeze);
  m.lavfi("ten_bit.mkv", kSource, {"-c:v", "ffv1", "-pix_fmt", "yuv420p10le"});
  m.add("10-bit ffv1", "ten_bit.mkv", Expect::report, frames_exactly(kFrames));
  m.lavfi("yuv444.mp4", kSource, {"-c:v", "libx264", "-pix_fmt", "yuv444p"});
  m.add("4:4:4 h264", "yuv444.mp4", Expect::report, frames_exactly(kFrames));
  m.lavfi("alpha.mkv", kSource, {"-c:v", "ffv1", "-pix_fmt", "yuva420p"});
  m.add("alpha (ffv1 yuva420p)", "alpha.mkv", Expect::report, frames_exactly(kFrames));
  m.lavfi("alpha_qtrle.mov", kSource, {"-c:v", "qtrle", "-pix_fmt", "argb"});
  m.add("alpha (qtrle argb)", "alpha_qtrle.mov", Expect::report, frames_exactly(kFrames));
  m.lavfi(
      "vfr_gap.mkv", kSource,
      {"-vf", "setpts='if(gte(N,12),PTS+10/TB,PTS)'", "-fps_mode", "passthrough", "-c:v", "ffv1"});
  m.add("VFR with a 10 s gap", "vfr_gap.mkv", Expect::report, spans_the_gap);
  m.lavfi("repeated_ts.mkv", kSource,
          {"-vf", "setpts='floor(N/2)/12/TB'", "-fps_mode", "passthrough", "-c:v", "ffv1"});
  m.add("repeated timestamps", "repeated_ts.mkv", Expect::report_or_error);
  {
    const auto r =
        run_command({"ffmpeg", "-v", "error", "-y", "-itsoffset", "-1", "-i", m.path("base.mkv"),
                     "-c", "copy", "-avoid_negative_ts", "disabled", m.path("negative_ts.mkv")});
    if (r.exit_code != 0) m.corpus_.problems += "negative_ts.mkv: " + r.err + "\n";
    m.add("negative timestamps (from -1 s)", "negative_ts.mkv", Expect::report,
          frames_exactly(kFrames));
  }
  m.lavfi("audio_only.mp4", "sine=frequency=440:duration=2", {"-c:a", "aac"});
  m.add("audio only", "audio_only.mp4", Expect::error);
  write_bytes(m.path("subs.srt"), "1\n00:00:00,000 --> 00:00:01,000\nharbour lights\n");
  {
    const auto r = run_command(
        {"ffmpeg", "-v", "error", "-y", "-i", m.path("subs.srt"), m.path("subtitle_only.mkv")});
    if (r.exit_code != 0) m.corpus_.problems += "subtitle_only.mkv: " + r.err + "\n";
    fs::remove(m.path("subs.srt"));
    m.add("subtitle only", "subtitle_only.mkv", Expect::error);
  }
  add_frame_folders(m);
  add_unreadable(m);
  add_damage_and_odd_files(m);
  const std::string spaced = "take 01 \xc3\xa9t\xc3\xa9 \xe8\xa1\x97 (final).mp4";
  write_bytes(m.path(spaced), read_bytes(m.path("base.mp4")));
  m.add("path with spaces and unicode", spaced, Expect::report, frames_exactly(kFrames));
  return m.take();
}

}  // namespace clipwarden::test
