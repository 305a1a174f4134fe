// Queue lines (DIR/queue.jsonl) and the files written from the queue.
#include <filesystem>
#include <fstream>

#include "analyzer/core/byte_text.h"
#include "analyzer/core/json_text.h"
#include "clipwarden/gate.h"
#include "clipwarden/report_io.h"
#include "analyzer/gate/queue_page.h"

namespace clipwarden {
namespace {

using nlohmann::json;

json text_or_null(const std::string& s) { return s.empty() ? json(nullptr) : json(s); }

std::string text_field(const json& j, const char* key) {
  return j.contains(key) && j[key].is_string() ? j[key].get<std::string>() : std::string();
}

}  // namespace

std::string queue_status(const ClipResult& r) {
  return r.verdict ? to_string(*r.verdict) : "error";
}

void GateCounts::add(const ClipResult& r) {
  ++total;
  if (r.from_store) ++from_store;
  if (!r.verdict)
    ++error;
  else if (*r.verdict == Verdict::pass)
    ++pass;
  else if (*r.verdict == Verdict::review)
    ++review;
  else
    ++reject;
}

json queue_line(const ClipResult& r) {
  json line = {{"index", r.input.index},
          {"verdict", queue_status(r)},
          {"coherence", is_defined(r.coherence) ? json(r.coherence) : json(nullptr)},
          {"reasons", r.reasons},
          {"report", text_or_null(r.report)},
          {"error", r.error ? json(printable(r.error->message())) : json(nullptr)},
          {"from_store", r.from_store},
          {"sha256", text_or_null(r.sha256)},
          {"prompt_id", text_or_null(r.input.prompt_id)},
          {"model", text_or_null(r.input.model)},
          {"seed", r.input.seed},
          {"metadata", r.input.metadata}};
  // Paths (and ids, which default to the path) are bytes: kept losslessly.
  put_bytes_field(line, "id", r.input.id);
  put_bytes_field(line, "path", r.input.path);
  return line;
}

Expected<ClipResult> clip_result_from_queue_line(const json& j, const std::string& subject) {
  if (!j.is_object()) return input_error(subject, "a queue line must be a JSON object");
  for (const char* key : {"id", "path", "verdict"})
    if (!j.contains(key) || !j[key].is_string())
      return input_error(subject, std::string("queue line has no \"") + key + "\"");
  const auto id = get_bytes_field(j, "id"), path = get_bytes_field(j, "path");
  if (!id || !path) return input_error(subject, "queue line has a badly escaped \"id\" or \"path\"");
  if (!j.contains("index") || !j["index"].is_number_integer())
    return input_error(subject, "queue line has no \"index\"");
  ClipResult r;
  r.input.index = j["index"].get<int64_t>();
  r.input.id = *id;
  r.input.path = *path;
  r.input.prompt_id = text_field(j, "prompt_id");
  r.input.model = text_field(j, "model");
  if (j.contains("seed")) r.input.seed = j["seed"];
  if (j.contains("metadata") && j["metadata"].is_object()) r.input.metadata = j["metadata"];
  const std::string status = j["verdict"].get<std::string>();
  if (status == "pass")
    r.verdict = Verdict::pass;
  else if (status == "review")
    r.verdict = Verdict::review;
  else if (status == "reject")
    r.verdict = Verdict::reject;
  else if (status != "error")
    return input_error(subject, "queue line has an unknown verdict '" + status + "'");
  if (j.contains("coherence") && j["coherence"].is_number())
    r.coherence = j["coherence"].get<double>();
  if (j.contains("reasons") && j["reasons"].is_array())
    for (const auto& reason : j["reasons"])
      if (reason.is_string()) r.reasons.push_back(reason.get<std::string>());
  r.report = text_field(j, "report");
  r.input.output_name = std::filesystem::path(r.report).stem().string();
  if (j.contains("error") && j["error"].is_string())
    r.error = input_error("", j["error"].get<std::string>());
  if (!r.verdict && !r.error) r.error = input_error(r.input.path, "unknown error");
  r.from_store = j.value("from_store", false);
  r.sha256 = text_field(j, "sha256");
  return r;
}

Status write_queue_outputs(const std::string& out_dir, const std::vector<ClipResult>& results) {
  namespace fs = std::filesystem;
  std::string queue;
  for (const auto& r : results) queue += dump_json(queue_line(r)) + "\n";
  auto st = write_file_atomic((fs::path(out_dir) / "queue.jsonl").string(), queue);
  if (!st) return st;
  // Link the HTML report where one was written, else the JSON.
  std::vector<std::string> links;
  for (const auto& r : results) {
    std::string link = r.report;
    if (!link.empty()) {
      const std::string html = fs::path(link).replace_extension(".html").string();
      std::error_code ec;
      if (fs::exists(fs::path(out_dir) / html, ec)) link = html;
    }
    links.push_back(link);
  }
  return write_file_atomic((fs::path(out_dir) / "index.html").string(),
                           render_queue_page(results, links));
}

Expected<std::vector<ClipResult>> read_queue(const std::string& dir, const QueueLineCheck& check) {
  const std::filesystem::path queue = std::filesystem::path(dir) / "queue.jsonl";
  std::ifstream in(queue, std::ios::binary);
  if (!in) return usage_error(dir, "has no queue.jsonl (not a gate output folder)");
  std::vector<ClipResult> out;
  std::string line;
  for (int number = 1; std::getline(in, line); ++number) {
    if (line.find_first_not_of(" \t\r") == std::string::npos) continue;
    const std::string where = queue.string() + ":" + std::to_string(number);
    auto j = parse_json_text(line, where, ErrorKind::input);
    if (!j) return j.error();
    auto r = clip_result_from_queue_line(*j, where);
    if (!r) return r.error();
    if (check)
      if (auto st = check(*r, where); !st) return st.error();
    out.push_back(std::move(r.value()));
  }
  return out;
}

}  // namespace clipwarden
