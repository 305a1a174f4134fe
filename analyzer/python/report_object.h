// clipwarden.Report: a finished report as Python sees it. Holds the
// library's Report, its JSON (for the dict-valued attributes), the settings
// it was made with and the thumbnails kept during analysis, so save() writes
// what `clipwarden analyze` writes.
#pragma once

#include <memory>

#include <nlohmann/json.hpp>

#include "clipwarden/analysis.h"
#include "analyzer/inspect/page_pictures.h"
#include "clipwarden/html_report.h"
#include "clipwarden/report.h"

namespace clipwarden::python {

class ReportObject {
 public:
  ReportObject(Report report, AnalysisSettings settings,
               std::shared_ptr<const ThumbnailCollector> thumbnails);

  const Report& report() const { return report_; }
  const nlohmann::json& json() const { return json_; }
  const AnalysisSettings& settings() const { return settings_; }
  const std::vector<Thumbnail>* thumbnails() const {
    return thumbnails_ ? &thumbnails_->thumbnails() : nullptr;
  }

 private:
  Report report_;
  nlohmann::json json_;
  AnalysisSettings settings_;
  std::shared_ptr<const ThumbnailCollector> thumbnails_;  // null for a report read from a file
};

}  // namespace clipwarden::python
