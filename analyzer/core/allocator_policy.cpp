#include "analyzer/core/allocator_policy.h"

#include <malloc.h>

namespace clipwarden {

void keep_freed_buffers_for_reuse() {
  // 32 MiB is glibc's largest dynamic mmap threshold on 64-bit systems;
  // setting either value turns the dynamic adjustment off, so both are set.
  constexpr int kThresholdBytes = 32 * 1024 * 1024;
  mallopt(M_MMAP_THRESHOLD, kThresholdBytes);
  mallopt(M_TRIM_THRESHOLD, kThresholdBytes);
}

}  // namespace clipwarden
