// The per-frame values of all metrics: one row per frame, each metric owning
// a contiguous slice of columns. Rows arrive in frame order.
#pragma once

#include <memory>
#include <span>
#include <string>
#include <vector>

#include "analyzer/metrics/metric.h"
#include "clipwarden/report.h"

namespace clipwarden {

class MetricTable {
 public:
  explicit MetricTable(const std::vector<std::unique_ptr<Metric>>& metrics) {
    for (const auto& m : metrics) {
      offsets_.push_back(names_.size());
      for (auto& c : m->columns()) names_.push_back(c);
    }
    offsets_.push_back(names_.size());
    columns_.resize(names_.size());
  }

  size_t width() const { return names_.size(); }
  int64_t frame_count() const { return static_cast<int64_t>(times_.size()); }

  // The slice of `row` that metric m writes.
  std::span<double> slot(std::vector<double>& row, size_t m) const {
    return std::span<double>(row).subspan(offsets_[m], offsets_[m + 1] - offsets_[m]);
  }

  void append(double t_s, std::vector<double> row) {
    times_.push_back(t_s);
    for (size_t c = 0; c < row.size(); ++c) columns_[c].push_back(row[c]);
  }

  // Moves the data out into report series and frame times.
  void move_into(Report& report) {
    report.frame_times_s = std::move(times_);
    for (size_t c = 0; c < names_.size(); ++c) report.series.push_back({names_[c], std::move(columns_[c])});
  }

 private:
  std::vector<std::string> names_;
  std::vector<size_t> offsets_;
  std::vector<std::vector<double>> columns_;
  std::vector<double> times_;
};

}  // namespace clipwarden
