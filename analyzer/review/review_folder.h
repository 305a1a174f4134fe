// A gate output folder as the review server sees it: its queue, worst
// first, and for each clip the only files the server will ever serve for it
// (the clip named by the queue, the report inside the folder and its page).
// Requests name clips by their queue index, never by a path, so no request
// can reach any other file.
#pragma once

#include <string>
#include <vector>

#include "clipwarden/error.h"
#include "clipwarden/gate.h"

namespace clipwarden::review {

struct ReviewClip {
  ClipResult result;
  std::string key;          // the queue index as text: the clip's name in URLs
  std::string video_path;   // the clip file ("" when the queue names none that exists)
  std::string report_json;  // the report inside the folder ("" when none)
  std::string report_html;  // its page ("" when none)
  std::string headline;     // the most severe reason, in words
  std::vector<std::string> metrics;  // the metrics the reasons name, in order
};

struct ReviewFolder {
  std::string dir;
  std::vector<ReviewClip> clips;  // worst first (the gate's index page order)
  const ReviewClip* find(const std::string& key) const;
};

// Reads DIR/queue.jsonl. A relative clip path is looked up from the current
// folder, then from DIR; a report path that leads out of DIR is ignored.
Expected<ReviewFolder> load_review_folder(const std::string& dir);

// "freeze mean 0.4 >= review 0.3 (frames 12-40, 0.50-1.67 s): the picture
// stands still for 1.2 s" -> "The picture stands still for 1.2 s: review
// level, frames 12-40, 0.50-1.67 s". Without plain words the metric's own
// description leads ("Brightness change that motion does not explain: ...");
// a reason that names no metric stays as it is.
std::string reason_in_words(const std::string& reason);

// The metric a reason is about ("" for hard rules such as the flash hazard).
std::string reason_metric(const std::string& reason);

}  // namespace clipwarden::review
