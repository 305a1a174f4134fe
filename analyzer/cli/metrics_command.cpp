// clipwarden metrics: what every registered metric writes and means, from
// the descriptors beside the metrics' code.
#include <cstdio>

#include "analyzer/cli/args.h"
#include "analyzer/cli/command.h"
#include "analyzer/cli/metric_listing.h"

namespace clipwarden::cli {

int run_metrics(const std::vector<std::string>& args) {
  const std::vector<OptionSpec> specs = {
      {"json", false, "print the descriptors as JSON"},
      {"markdown", false, "print the README's metric table (Markdown)"},
      {"reference", false, "print the per-metric reference of docs/metrics.md (Markdown)"},
  };
  int stop_status = kExitOk;
  auto parsed = parse_command_line(
      args, specs,
      {"metrics", "[--json | --markdown | --reference]",
       "Lists the metrics: their per-frame columns with units, which direction is better, how they "
       "depend on the frame rate, the method each follows and its default rules."},
      stop_status);
  if (!parsed) return stop_status;
  const int formats = parsed->has("json") + parsed->has("markdown") + parsed->has("reference");
  if (!parsed->positionals.empty() || formats > 1) {
    print_error("metrics takes no CLIP and at most one of --json, --markdown, --reference");
    return kExitUsage;
  }
  std::string text;
  if (parsed->has("json"))
    text = metric_listing_json().dump(2) + "\n";
  else if (parsed->has("markdown"))
    text = metric_table_markdown();
  else if (parsed->has("reference"))
    text = metric_reference_markdown();
  else
    text = metric_listing_text();
  std::fputs(text.c_str(), stdout);
  return kExitOk;
}

}  // namespace clipwarden::cli
