// The review station's pages. Each is one HTML document whose only style
// and script are inline, allowed by their hashes in the Content-Security-
// Policy the server sends with it (page_policy); media and data come from
// the server itself, with the access token in every address. Every string
// from an input (clip ids, paths, prompts, reasons, tags, notes) is escaped.
#pragma once

#include <map>
#include <string>

#include <nlohmann/json.hpp>

#include "analyzer/review/review_folder.h"
#include "analyzer/store/decision_log.h"
#include "clipwarden/calibrate.h"

namespace clipwarden::review {

struct Page {
  std::string html;
  std::string policy;  // the Content-Security-Policy header value
};

// Decisions by clip id (the newest of each clip).
using DecisionsByClip = std::map<std::string, Decision>;

Page render_queue_page(const ReviewFolder& folder, const DecisionsByClip& decided,
                       const std::string& token);

// `report`: the clip's JSON report (null when it has none); `next`: the key
// of the next undecided clip after this one, "" when none.
Page render_clip_page(const ReviewClip& clip, const nlohmann::json& report,
                      const DecisionsByClip& decided, const std::string& next, const std::string& token);

// How the gate's verdicts line up with people's decisions, per rule, with
// links to the clips where they differ.
Page render_agreement_page(const ReviewFolder& folder, const std::vector<RuleAgreement>& rules,
                           const std::string& token);

// The timeline's data from a report: frame times, the series of the
// metrics that matter for this clip, and the segments.
nlohmann::json timeline_data(const nlohmann::json& report, const std::vector<std::string>& metrics);

}  // namespace clipwarden::review
