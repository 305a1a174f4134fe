#include <cstdio>

#include "analyzer/store/decision_log.h"
#include "clipwarden/report_io.h"
#include "clipwarden/review.h"

namespace clipwarden {

Expected<int> export_decisions(const std::string& db_path, const std::string& out_path) {
  auto log = DecisionLog::open(db_path);
  if (!log) return log.error();
  auto all = (*log)->all();
  if (!all) return all.error();
  std::string text;
  for (const auto& d : *all)
    text += decision_to_json(d).dump(-1, ' ', false, nlohmann::json::error_handler_t::replace) + "\n";
  if (out_path == "-") {
    std::fwrite(text.data(), 1, text.size(), stdout);
  } else if (auto st = write_file_atomic(out_path, text); !st) {
    return st.error();
  }
  return static_cast<int>(all->size());
}

}  // namespace clipwarden
