// clipwarden merge: the outputs of shard runs joined into one folder. Report
// names are unique across shards (the gate names clips over the whole input
// list before taking its share), so a merge normally copies them unchanged.
//
// A shard folder is input like any other: its queue may name any file. So
// every report a queue line names is checked before anything is copied: a
// plain file name inside the shard folder (no folder part, no link leading
// out), a report that reads as one, and whose clip hash is the queue line's.
// Anything else refuses the whole merge with the line and the reason.
#include <algorithm>
#include <filesystem>
#include <fstream>
#include <map>
#include <set>
#include <sstream>

#include "analyzer/core/json_text.h"
#include "analyzer/gate/folder_lock.h"
#include "clipwarden/gate.h"
#include "clipwarden/report_io.h"
#include "analyzer/store/result_store.h"

namespace clipwarden {
namespace {

namespace fs = std::filesystem;

std::string canonical_text(const fs::path& p) {
  std::error_code ec;
  auto c = fs::weakly_canonical(p, ec);
  return (ec ? fs::absolute(p) : c).lexically_normal().string();
}

Expected<std::string> read_text(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  if (!in) return input_error(p.string(), "cannot open");
  std::stringstream buffer;
  buffer << in.rdbuf();
  return buffer.str();
}

Status copy_atomic(const fs::path& from, const fs::path& to) {
  auto text = read_text(from);
  if (!text) return text.error();
  return write_file_atomic(to.string(), *text);
}

// The report a queue line names, as a file in the shard folder, or why not.
Expected<fs::path> checked_report(const fs::path& dir, const ClipResult& r,
                                  const std::string& where) {
  const fs::path name(r.report);
  const auto refuse = [&](const std::string& why) {
    return input_error(where, "report '" + r.report + "' " + why + "; not merged");
  };
  if (name.has_parent_path() || name.is_absolute() || name.filename() != name ||
      name == "." || name == ".." || name.extension() != ".json")
    return refuse("is not a report file name in the shard folder");
  const fs::path path = dir / name;
  std::error_code ec;
  const auto inside = fs::weakly_canonical(dir, ec);
  const auto target = fs::weakly_canonical(path, ec);
  if (ec || target.parent_path() != inside) return refuse("leads outside the shard folder");
  if (!fs::exists(path, ec)) return path;  // missing: a warning later, as before
  if (!fs::is_regular_file(target, ec)) return refuse("is not a regular file");
  auto report = read_report_file(path.string());
  if (!report) return refuse("is not a report (" + report.error().cause + ")");
  if (r.sha256.empty() || report->clip.sha256 != r.sha256)
    return refuse("is of another clip (sha256 " + report->clip.sha256.substr(0, 12) +
                  ", the queue line says " + (r.sha256.empty() ? "none" : r.sha256.substr(0, 12)) +
                  ")");
  return path;
}

struct Merger {
  fs::path out_dir;
  std::set<std::string> used_names;
  std::map<std::string, std::string> moved;  // canonical source report -> canonical merged report
  std::vector<std::string> warnings;

  std::string free_name(const std::string& stem) {
    std::string name = stem;
    for (int n = 2; used_names.count(name); ++n) name = stem + "-" + std::to_string(n);
    used_names.insert(name);
    return name;
  }

  // Copies r's report (JSON and HTML when present) and points r at the copy.
  void copy_report(const fs::path& dir, ClipResult& r) {
    if (r.report.empty()) return;
    const fs::path src = dir / r.report;
    std::error_code ec;
    if (!fs::exists(src, ec)) {
      warnings.push_back(src.string() + ": report listed in the queue is missing");
      r.report.clear();
      return;
    }
    const std::string name = free_name(fs::path(r.report).stem().string());
    const fs::path dst = out_dir / (name + ".json");
    if (auto st = copy_atomic(src, dst); !st) {
      warnings.push_back(st.error().message());
      r.report.clear();
      return;
    }
    const fs::path html = fs::path(src).replace_extension(".html");
    if (fs::exists(html, ec))
      if (auto st = copy_atomic(html, out_dir / (name + ".html")); !st)
        warnings.push_back(st.error().message());
    moved[canonical_text(src)] = canonical_text(dst);
    r.report = name + ".json";
    r.input.output_name = name;
  }

  Status merge_store(const fs::path& dir, ResultStore& into) {
    const fs::path db = dir / "clipwarden.db";
    std::error_code ec;
    if (!fs::exists(db, ec)) return Ok{};  // the shard used a shared --db
    auto from = ResultStore::open(db.string());
    if (!from) return from.error();
    auto rows = (*from)->all();
    if (!rows) return rows.error();
    for (auto& row : *rows) {
      // Only rows of reports this merge copied: a row may name any file,
      // and a later gate would copy what the store names into its output.
      auto it = moved.find(canonical_text(row.report_path));
      if (it == moved.end()) continue;
      row.report_path = it->second;
      auto present = into.contains(row);
      if (!present) return present.error();
      if (*present == ResultStore::Presence::present) continue;
      if (auto st = into.insert(row); !st) return st;
    }
    return Ok{};
  }
};

}  // namespace

Expected<GateRun> merge_gate_outputs(const std::vector<std::string>& shard_dirs,
                                     const std::string& out_dir) {
  const std::string out_canonical = canonical_text(out_dir);
  for (const auto& dir : shard_dirs)
    if (canonical_text(dir) == out_canonical)
      return usage_error(dir, "merge output folder must not be one of its inputs");
  // Before anything is written: a refused merge (a missing or foreign
  // shard, a queue line naming a report outside its shard) leaves no
  // partial queue.
  if (auto st = check_shard_set(shard_dirs); !st) return st.error();
  std::vector<std::vector<ClipResult>> queues(shard_dirs.size());
  for (size_t i = 0; i < shard_dirs.size(); ++i) {
    const fs::path dir = shard_dirs[i];
    auto queue = read_queue(shard_dirs[i], [&dir](const ClipResult& r, const std::string& where) {
      if (r.report.empty()) return Status(Ok{});
      auto checked = checked_report(dir, r, where);
      return checked ? Status(Ok{}) : Status(checked.error());
    });
    if (!queue) return queue.error();
    queues[i] = std::move(*queue);
  }
  std::error_code ec;
  fs::create_directories(out_dir, ec);
  if (ec) return output_error(out_dir, "cannot create output folder: " + ec.message());
  auto lock = FolderLock::take(out_dir);
  if (!lock) return lock.error();

  auto store = ResultStore::open((fs::path(out_dir) / "clipwarden.db").string());
  if (!store) return store.error();
  Merger merger{fs::path(out_dir)};
  std::map<std::string, std::string> seen;  // id -> the folder it came from
  GateRun run;
  for (size_t i = 0; i < shard_dirs.size(); ++i) {
    const std::string& dir = shard_dirs[i];
    for (auto& r : queues[i]) {
      auto [it, fresh] = seen.emplace(r.input.id, dir);
      if (!fresh) {
        merger.warnings.push_back(dir + ": clip '" + r.input.id + "' is also in " + it->second +
                                  "; kept that one");
        continue;
      }
      merger.copy_report(dir, r);
      run.results.push_back(std::move(r));
    }
    if (auto st = merger.merge_store(dir, **store); !st) return st.error();
  }
  std::stable_sort(
      run.results.begin(), run.results.end(),
      [](const ClipResult& a, const ClipResult& b) { return a.input.index < b.input.index; });
  for (const auto& r : run.results) run.counts.add(r);
  run.warnings = std::move(merger.warnings);
  if (auto st = write_queue_outputs(out_dir, run.results); !st) return st.error();
  return run;
}

}  // namespace clipwarden
