// Expanding gate INPUT arguments into clips: plain clips, folders searched
// recursively, and JSON-lines manifests.
#include <algorithm>
#include <filesystem>
#include <fstream>
#include <map>
#include <set>

#include "analyzer/core/byte_text.h"
#include "analyzer/core/json_text.h"
#include "clipwarden/gate.h"

namespace clipwarden {
namespace {

namespace fs = std::filesystem;
using nlohmann::json;

std::string lower_extension(const fs::path& p) {
  std::string ext = p.extension().string();
  std::transform(ext.begin(), ext.end(), ext.begin(),
                 [](unsigned char c) { return std::tolower(c); });
  return ext;
}

// Containers FFmpeg reads that generation tools emit (common practice).
bool is_video_file(const fs::path& p) {
  static const std::set<std::string> kVideo = {".mp4",  ".m4v",  ".mov", ".mkv",  ".webm", ".avi",
                                               ".gif",  ".webp", ".mpg", ".mpeg", ".ts",   ".mts",
                                               ".m2ts", ".flv",  ".wmv", ".ogv",  ".y4m",  ".apng"};
  return kVideo.count(lower_extension(p)) > 0;
}

bool is_frame_image(const fs::path& p) {
  static const std::set<std::string> kImage = {".png", ".jpg",  ".jpeg", ".bmp",
                                               ".tif", ".tiff", ".webp"};
  const std::string name = p.filename().string();
  return kImage.count(lower_extension(p)) > 0 &&
         std::any_of(name.begin(), name.end(), [](unsigned char c) { return std::isdigit(c); });
}

bool hidden(const fs::path& p) {
  const std::string name = p.filename().string();
  return !name.empty() && name[0] == '.';
}

std::vector<fs::directory_entry> sorted_entries(const fs::path& dir) {
  std::vector<fs::directory_entry> entries;
  std::error_code ec;
  for (const auto& e :
       fs::directory_iterator(dir, fs::directory_options::skip_permission_denied, ec))
    if (!hidden(e.path())) entries.push_back(e);
  std::sort(entries.begin(), entries.end(),
            [](const auto& a, const auto& b) { return a.path() < b.path(); });
  return entries;
}

// A folder of numbered frames: two or more numbered images.
bool is_frame_folder(const fs::path& dir) {
  int images = 0;
  for (const auto& e : sorted_entries(dir)) {
    std::error_code ec;
    if (e.is_regular_file(ec) && is_frame_image(e.path()) && ++images >= 2) return true;
  }
  return false;
}

// Frame folders are clips (not searched further); other folders are searched.
// Symbolic links to folders are not followed, so a link loop cannot hang us;
// links to files are. What is passed over is said (a warning each), never
// dropped silently: a link to a folder, a dangling link, and an entry named
// like a video that is not a regular file (a pipe, a device).
void scan_folder(const fs::path& dir, std::vector<std::string>& clips,
                 std::vector<std::string>& warnings) {
  if (is_frame_folder(dir)) {
    clips.push_back(dir.string());
    return;
  }
  const size_t before = clips.size();
  for (const auto& e : sorted_entries(dir)) {
    std::error_code ec;
    const bool link = e.is_symlink(ec);
    const std::string shown = printable(e.path().string());
    if (link && !fs::exists(e.path(), ec)) {
      warnings.push_back(shown + ": dangling symbolic link, skipped");
    } else if (e.is_directory(ec)) {
      if (link)
        warnings.push_back(shown +
                           ": symbolic link to a folder, not followed (name it as an INPUT "
                           "to include it)");
      else
        scan_folder(e.path(), clips, warnings);
    } else if (is_video_file(e.path())) {
      if (e.is_regular_file(ec))
        clips.push_back(e.path().string());
      else
        warnings.push_back(shown + ": not a regular file (a pipe or a device), skipped");
    }
  }
  // A folder named like a clip ("take.mp4/") that holds no clips was meant
  // as one: it gets a queue row (an input error) instead of vanishing.
  if (clips.size() == before && is_video_file(dir)) clips.push_back(dir.string());
}

std::string scalar_text(const json& v) {
  if (v.is_string()) return v.get<std::string>();
  // Unsigned first: 18446744073709551615 read as int64_t would be "-1".
  if (v.is_number_unsigned()) return std::to_string(v.get<uint64_t>());
  if (v.is_number_integer()) return std::to_string(v.get<int64_t>());
  return v.dump();
}

struct ManifestLine {
  GateInput input;
  bool explicit_id = false;
};

Expected<ManifestLine> parse_manifest_line(const std::string& text, const fs::path& base,
                                           const std::string& where) {
  auto parsed = parse_json_text(text, where, ErrorKind::usage);
  if (!parsed) return parsed.error();
  json& j = *parsed;
  if (!j.is_object()) return usage_error(where, "each line must be a JSON object");
  if (!j.contains("path")) return usage_error(where, "missing \"path\"");
  if (!j["path"].is_string() || j["path"].get<std::string>().empty())
    return usage_error(where, "\"path\" must be a non-empty string");
  ManifestLine out;
  GateInput& in = out.input;
  const fs::path path = fs::path(j["path"].get<std::string>());
  in.path = (path.is_absolute() ? path : (base / path)).lexically_normal().string();
  in.origin = where;
  for (const char* key : {"id", "prompt_id", "model"})
    if (j.contains(key) && !(j[key].is_string() || j[key].is_number_integer()))
      return usage_error(where, std::string("\"") + key + "\" must be a string or a whole number");
  out.explicit_id = j.contains("id");
  in.id = out.explicit_id ? scalar_text(j["id"]) : in.path;
  if (in.id.empty()) return usage_error(where, "\"id\" must not be empty");
  if (j.contains("prompt_id")) in.prompt_id = scalar_text(j["prompt_id"]);
  if (j.contains("model")) in.model = scalar_text(j["model"]);
  if (j.contains("seed")) in.seed = j["seed"];
  for (const auto& [key, value] : j.items())
    if (key != "path" && key != "id" && key != "prompt_id" && key != "model" && key != "seed")
      in.metadata[key] = value;
  return out;
}

Status read_manifest(const std::string& manifest, std::vector<ManifestLine>& out) {
  std::ifstream in(manifest, std::ios::binary);
  if (!in) return usage_error(manifest, "cannot open manifest");
  const fs::path base = fs::path(manifest).parent_path();
  std::string line;
  for (int number = 1; std::getline(in, line); ++number) {
    if (!line.empty() && line.back() == '\r') line.pop_back();
    if (line.find_first_not_of(" \t") == std::string::npos) continue;  // blank lines are allowed
    auto parsed = parse_manifest_line(line, base, manifest + ":" + std::to_string(number));
    if (!parsed) return parsed.error();
    out.push_back(std::move(parsed.value()));
  }
  return Ok{};
}

}  // namespace

Expected<CollectedInputs> collect_inputs(const std::vector<std::string>& args) {
  std::vector<ManifestLine> lines;
  std::vector<std::string> warnings;
  for (const auto& arg : args) {
    std::error_code ec;
    // "A/x.mp4" and "./A/x.mp4" are one clip with one id.
    const fs::path p = fs::path(arg).lexically_normal();
    const std::string given = p.string();
    if (lower_extension(p) == ".jsonl" && !fs::is_directory(p, ec)) {
      auto st = read_manifest(arg, lines);
      if (!st) return st.error();
    } else if (fs::is_directory(p, ec)) {
      std::vector<std::string> clips;
      scan_folder(p, clips, warnings);
      if (clips.empty()) warnings.push_back(printable(arg) + ": folder holds no clips");
      for (auto& c : clips) lines.push_back({GateInput{.path = c, .id = c}, false});
    } else {
      lines.push_back({GateInput{.path = given, .id = given}, false});
    }
  }
  CollectedInputs out;
  out.warnings = std::move(warnings);
  std::map<std::string, std::string> seen;  // id -> where it was first given
  for (auto& line : lines) {
    GateInput& in = line.input;
    const std::string where = in.origin.empty() ? in.path : in.origin;
    auto [it, fresh] = seen.emplace(in.id, where);
    if (!fresh) {
      if (line.explicit_id) return usage_error(where, "id '" + in.id + "' repeats " + it->second);
      out.warnings.push_back(printable(where) + ": named twice; judged once");
      continue;
    }
    in.index = static_cast<int64_t>(out.inputs.size());
    out.inputs.push_back(std::move(in));
  }
  return out;
}

}  // namespace clipwarden
