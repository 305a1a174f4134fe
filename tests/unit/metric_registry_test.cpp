// The metric registry (analyzer/metrics/registry.cpp) and the descriptors it
// lists (metric_descriptor.h): every registered metric describes itself
// completely, the instances make_metrics builds carry the descriptors the
// registry lists, and the readers (default policy, compare's direction, the
// page's column descriptions) find every column. A metric registered with an
// empty description, unit or citation fails here.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <set>

#include "analyzer/compare/metric_direction.h"
#include "analyzer/inject/defect_spec.h"
#include "analyzer/metrics/metric.h"
#include "clipwarden/policy.h"
#include "report/html/page_parts.h"
#include "support/accuracy_score.h"

using namespace clipwarden;

namespace {

bool one_line(const std::string& s) { return s.find('\n') == std::string::npos; }

}  // namespace

TEST(MetricRegistry, EveryMetricAndColumnIsDescribed) {
  ASSERT_FALSE(metric_descriptors().empty());
  std::set<std::string> metric_names, column_names;
  for (const MetricDescriptor* m : metric_descriptors()) {
    SCOPED_TRACE("metric " + m->name);
    EXPECT_FALSE(m->name.empty());
    EXPECT_TRUE(metric_names.insert(m->name).second) << "registered twice";
    EXPECT_FALSE(m->citation.empty()) << "no citation (the published method, or \"our own\")";
    ASSERT_FALSE(m->columns.empty()) << "writes no column";
    bool name_is_a_column = false;
    for (const ColumnDescriptor& c : m->columns) {
      SCOPED_TRACE("column " + c.name);
      EXPECT_FALSE(c.name.empty());
      EXPECT_TRUE(column_names.insert(c.name).second) << "column written by two metrics";
      EXPECT_FALSE(c.unit.empty()) << "no unit";
      EXPECT_FALSE(c.description.empty()) << "no description";
      EXPECT_TRUE(one_line(c.description)) << "the page shows one line";
      EXPECT_FALSE(c.frame_rate_text.empty()) << "frame-rate dependence not stated in words";
      name_is_a_column = name_is_a_column || c.name == m->name;
    }
    EXPECT_TRUE(name_is_a_column) << "a metric is named after one of its columns";
  }
}

TEST(MetricRegistry, InstancesCarryTheRegisteredDescriptors) {
  const auto metrics = make_metrics(AnalysisSettings{});
  const auto& descriptors = metric_descriptors();
  ASSERT_EQ(metrics.size(), descriptors.size());
  for (size_t i = 0; i < metrics.size(); ++i) {
    EXPECT_EQ(&metrics[i]->descriptor(), descriptors[i]) << descriptors[i]->name;
    std::vector<std::string> names;
    for (const auto& c : descriptors[i]->columns) names.push_back(c.name);
    EXPECT_EQ(metrics[i]->columns(), names);
  }
}

TEST(MetricRegistry, LookupByColumn) {
  const ColumnDescriptor* lum = find_column("luminance");
  ASSERT_NE(lum, nullptr);
  EXPECT_EQ(lum->better, Better::none);
  ASSERT_NE(find_metric_of_column("luminance"), nullptr);
  EXPECT_EQ(find_metric_of_column("luminance")->name, "flicker");
  EXPECT_EQ(find_column("no_such_column"), nullptr);
  EXPECT_EQ(find_metric_of_column("no_such_column"), nullptr);
}

// The page, compare and the default policy read the descriptors: every
// column has a page description with its unit, a direction that matches,
// and its default rules in the default policy (and no rule names a column
// nobody writes).
TEST(MetricRegistry, ReadersFollowTheDescriptors) {
  const Policy& policy = default_policy();
  std::set<std::string> columns;
  for (const MetricDescriptor* m : metric_descriptors())
    for (const ColumnDescriptor& c : m->columns) {
      SCOPED_TRACE(c.name);
      columns.insert(c.name);
      const std::string page = page::metric_description(c.name);
      EXPECT_NE(page.find(c.description), std::string::npos) << page;
      EXPECT_NE(page.find(c.unit), std::string::npos) << page;
      const auto direction = compare_detail::direction_of(c.name);
      EXPECT_EQ(direction == compare_detail::Direction::descriptive, c.better == Better::none);
      EXPECT_EQ(direction == compare_detail::Direction::higher_is_better,
                c.better == Better::higher);
      EXPECT_EQ(policy.segments.count(c.name) == 1, c.default_rule.segment.has_value());
      size_t rules = 0;
      for (const auto& r : policy.rules) rules += r.metric == c.name;
      EXPECT_EQ(rules, c.default_rule.statistics.size());
    }
  for (const auto& [metric, rule] : policy.segments) EXPECT_TRUE(columns.count(metric)) << metric;
  for (const auto& rule : policy.rules) EXPECT_TRUE(columns.count(rule.metric)) << rule.metric;
  EXPECT_EQ(page::metric_description("no_such_column"), "");
  EXPECT_EQ(compare_detail::direction_of("coherence"), compare_detail::Direction::higher_is_better);
}

// Default rules must be usable as the segmenter and the policy read them:
// hysteresis downwards, levels in order, statistics the policy knows.
TEST(MetricRegistry, DefaultRulesAreCoherent) {
  const auto& known = policy_statistics();
  for (const MetricDescriptor* m : metric_descriptors())
    for (const ColumnDescriptor& c : m->columns) {
      SCOPED_TRACE(c.name);
      if (const auto& s = c.default_rule.segment) {
        EXPECT_LE(s->leave, s->enter);
        EXPECT_GE(s->min_frames, 1);
        EXPECT_LE(s->review_peak, s->reject_peak);
        EXPECT_FALSE(c.better == Better::none && std::isfinite(s->review_peak))
            << "a descriptive column must never review or reject by itself";
      }
      for (const auto& r : c.default_rule.statistics) {
        // details.<key> is a number the metric writes into its summary
        // details; the policy reads any key (docs/gate.md).
        if (r.statistic.rfind("details.", 0) != 0)
          EXPECT_NE(std::find(known.begin(), known.end(), r.statistic), known.end()) << r.statistic;
        EXPECT_TRUE(r.review || r.reject) << r.statistic;
        if (r.review && r.reject) EXPECT_LE(*r.review, *r.reject) << r.statistic;
      }
    }
}

// `catches` names `clipwarden inject` classes by their SPEC names, and every
// class has a column the accuracy evaluation scores it on.
TEST(MetricRegistry, EveryInjectableClassIsCaughtByADeclaredColumn) {
  for (const MetricDescriptor* m : metric_descriptors())
    for (const ColumnDescriptor& c : m->columns)
      for (const std::string& name : c.catches) {
        const auto parsed = inject::defect_class_from_string(name);
        ASSERT_TRUE(parsed.has_value()) << c.name << " catches unknown class " << name;
        EXPECT_EQ(inject::to_string(*parsed), name) << "use the class's own SPEC name";
      }
  for (inject::DefectClass cls : inject::all_defect_classes())
    EXPECT_FALSE(accuracy::metrics_for(cls).empty()) << inject::to_string(cls);
  // As docs/accuracy.md (Scoring) states the matching: strobe is found by
  // flash, a splice by cut, jump_cut or warp_error_ratio.
  EXPECT_EQ(accuracy::metrics_for(inject::DefectClass::strobe), std::vector<std::string>{"flash"});
  EXPECT_EQ(accuracy::metrics_for(inject::DefectClass::cut),
            (std::vector<std::string>{"warp_error_ratio", "cut", "jump_cut"}));
}
