#include "analyzer/cli/gate_output.h"

#include <cstdio>

#include "analyzer/cli/command.h"

namespace clipwarden::cli {
namespace {

std::string duration_text(double s) {
  const long total = static_cast<long>(s + 0.5);
  char buf[32];
  if (total >= 3600)
    std::snprintf(buf, sizeof buf, "%ldh%02ldm", total / 3600, (total / 60) % 60);
  else if (total >= 60)
    std::snprintf(buf, sizeof buf, "%ldm%02lds", total / 60, total % 60);
  else
    std::snprintf(buf, sizeof buf, "%lds", total);
  return buf;
}

}  // namespace

BatchProgress::BatchProgress(int total, bool silent)
    : total_(total), silent_(silent), start_(std::chrono::steady_clock::now()) {}

void BatchProgress::update(const GateCounts& counts) {
  last_ = counts;
  if (silent_) return;
  const auto now = std::chrono::steady_clock::now();
  if (drawn_ && counts.total < total_ && now - last_draw_ < std::chrono::milliseconds(100)) return;
  last_draw_ = now;
  draw(counts);
}

void BatchProgress::draw(const GateCounts& c) {
  constexpr int kWidth = 24;
  const int filled = total_ > 0 ? kWidth * c.total / total_ : kWidth;
  std::string bar(static_cast<size_t>(filled), '#');
  bar.resize(kWidth, '.');
  std::string eta = "ETA --";
  const double elapsed =
      std::chrono::duration<double>(std::chrono::steady_clock::now() - start_).count();
  if (c.total > 0 && c.total < total_)
    eta = "ETA " + duration_text(elapsed / c.total * (total_ - c.total));
  std::fprintf(stderr, "\r[%s] %d/%d clips  %d reject  %d review  %d error  %s\x1b[K", bar.c_str(),
               c.total, total_, c.reject, c.review, c.error, eta.c_str());
  drawn_ = true;
}

void BatchProgress::print_above(const std::string& line) {
  if (drawn_) std::fprintf(stderr, "\r\x1b[K");
  print_error(line);
  if (drawn_) draw(last_);
}

void BatchProgress::finish() {
  if (drawn_) std::fprintf(stderr, "\r\x1b[K");
  drawn_ = false;
}

std::string summary_text(const GateCounts& c) {
  return std::to_string(c.pass) + " pass / " + std::to_string(c.review) + " review / " +
         std::to_string(c.reject) + " reject / " + std::to_string(c.error) + " error (" +
         std::to_string(c.from_store) + " taken from the store)";
}

Expected<Verdict> fail_on_from_args(const ParsedArgs& args) {
  const std::string v = args.get("fail-on").value_or("reject");
  if (v == "reject") return Verdict::reject;
  if (v == "review") return Verdict::review;
  return usage_error("--fail-on", "expects review or reject, got '" + v + "'");
}

int gate_exit_status(const GateCounts& c, Verdict fail_on) {
  if (c.error > 0) return kExitInputError;
  const int failed = fail_on == Verdict::review ? c.review + c.reject : c.reject;
  return failed > 0 ? kExitGateFailed : kExitOk;
}

}  // namespace clipwarden::cli
