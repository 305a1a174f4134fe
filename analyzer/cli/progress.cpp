#include "analyzer/cli/progress.h"

#include <cstdio>

namespace clipwarden::cli {

ProgressLine::ProgressLine(std::string label, bool silent) : label_(std::move(label)), silent_(silent) {}

void ProgressLine::update(int64_t done, int64_t expected) {
  if (silent_) return;
  auto now = std::chrono::steady_clock::now();
  if (drawn_ && now - last_draw_ < std::chrono::milliseconds(100)) return;  // at most 10 redraws/s
  last_draw_ = now;
  drawn_ = true;
  if (expected > 0)
    std::fprintf(stderr, "\r%s: frame %lld/%lld (%d%%)\x1b[K", label_.c_str(), static_cast<long long>(done),
                 static_cast<long long>(expected), static_cast<int>(100 * done / expected));
  else
    std::fprintf(stderr, "\r%s: frame %lld\x1b[K", label_.c_str(), static_cast<long long>(done));
}

void ProgressLine::finish() {
  if (drawn_) std::fprintf(stderr, "\r\x1b[K");
  drawn_ = false;
}

}  // namespace clipwarden::cli
