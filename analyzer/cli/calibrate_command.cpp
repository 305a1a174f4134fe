// clipwarden calibrate DIR : how the gate's verdicts line up with people's
// decisions, and a policy that would have matched them best
// (include/clipwarden/calibrate.h).
#include <cstdio>

#include "analyzer/cli/args.h"
#include "analyzer/cli/command.h"
#include "clipwarden/calibrate.h"
#include "clipwarden/report_io.h"

namespace clipwarden::cli {
namespace {

const char* kDescription =
    "Reads the decisions people made with `clipwarden review DIR` and the gate's reports,\n"
    "prints per rule how the gate's verdicts line up with them (keep = pass, second look =\n"
    "review, reject = reject), then moves the policy's levels one at a time to the values\n"
    "that match the decisions best while rejecting at most --budget of the clips people\n"
    "kept, prints what each moved level does and writes the policy (a --policy file for\n"
    "gate). With too few decisions it says how many more it needs and writes nothing.";

std::string level_text(const std::optional<double>& v) {
  if (!v) return "off";
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.4g", *v);
  return buf;
}

}  // namespace

int run_calibrate(const std::vector<std::string>& args) {
  const std::vector<OptionSpec> specs = {
      {"db", true, "results store holding the decisions (default DIR/clipwarden.db)"},
      {"policy", true, "the policy to start from (default: the built-in policy)"},
      {"budget", true, "share of kept clips the policy may reject, 0-1 (default 0.05)"},
      {"min-decisions", true, "decided clips needed before levels are moved (default 20)"},
      {"out", true, "where to write the proposed policy (default DIR/calibrated-policy.json)"},
  };
  int stop_status = kExitOk;
  auto parsed = parse_command_line(args, specs, {"calibrate", "DIR [options]", kDescription}, stop_status);
  if (!parsed) return stop_status;
  if (parsed->positionals.size() != 1)
    return print_error("calibrate needs one gate output folder DIR (see clipwarden calibrate --help)"), kExitUsage;
  const std::string dir = parsed->positionals[0];
  Policy start = default_policy();
  if (auto p = parsed->get("policy")) {
    auto loaded = load_policy(*p);
    if (!loaded) return print_error(loaded.error().message()), kExitUsage;
    start = *loaded;
  }
  CalibrationOptions options;
  auto budget = parsed->get_double("budget", 0, 1);
  if (!budget) return print_error(budget.error().message()), kExitUsage;
  if (*budget) options.false_reject_budget = **budget;
  auto min = parsed->get_int("min-decisions", 2, 1000000);
  if (!min) return print_error(min.error().message()), kExitUsage;
  if (*min) options.min_decisions = **min;

  auto clips = load_decided_clips(dir, parsed->get("db").value_or(""));
  if (!clips) return print_error(clips.error().message()), clips.error().kind == ErrorKind::usage ? kExitUsage : kExitInputError;

  std::printf("agreement of the gate's verdicts with %zu decided clips, by the rule that decided:\n", clips->size());
  std::printf("  %-20s %6s %6s  %s\n", "rule", "clips", "agree", "tool pass/review/reject vs people keep/second look/reject");
  for (const auto& a : agreement_by_rule(*clips, nullptr)) {
    std::string table;
    for (int t = 0; t < 3; ++t) {
      table += t ? " | " : "";
      for (int p = 0; p < 3; ++p) table += (p ? " " : "") + std::to_string(a.counts[t][p]);
    }
    std::printf("  %-20s %6d %6d  %s\n", a.rule.c_str(), a.clips, a.agree, table.c_str());
    for (size_t i = 0; i < a.differ.size() && i < 5; ++i) std::printf("      differs: %s\n", a.differ[i].c_str());
    if (a.differ.size() > 5) std::printf("      ... and %zu more\n", a.differ.size() - 5);
  }

  const Calibration cal = calibrate_policy(*clips, start, options);
  if (cal.more_needed > 0) {
    std::printf("calibrate: %d decided clips (%d kept); %d more needed to move levels (at least %d, with %d kept "
                "and %d not kept)\n",
                cal.decided, cal.kept, cal.more_needed, options.min_decisions, options.min_each, options.min_each);
    return kExitOk;
  }
  std::printf("calibrate: budget %.3g of %d kept clips may be rejected\n", options.false_reject_budget, cal.kept);
  for (const auto& c : cal.changes)
    std::printf("  %s: %s -> %s (%d verdicts change; agreement %d -> %d)\n", c.key.c_str(),
                level_text(c.before).c_str(), level_text(c.after).c_str(), c.verdicts_changed, c.agree_before,
                c.agree_after);
  if (cal.changes.empty()) std::printf("  no level change matches the decisions better\n");
  std::printf("agreement %d -> %d of %d; kept clips rejected %d -> %d\n", cal.agree_before, cal.agree_after,
              cal.decided, cal.false_rejects_before, cal.false_rejects_after);
  const std::string out = parsed->get("out").value_or(dir + "/calibrated-policy.json");
  if (auto st = write_file_atomic(out, policy_to_json(cal.policy).dump(2) + "\n"); !st)
    return print_error(st.error().message()), kExitInputError;
  std::printf("policy -> %s (use with clipwarden gate --policy)\n", out.c_str());
  return kExitOk;
}

}  // namespace clipwarden::cli
