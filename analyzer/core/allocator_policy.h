// How the process's allocator treats the analysis' large buffers. Called by
// programs that own their process (the CLI, the benchmarks), never by the
// library on its own: a host program (the Python module's interpreter) keeps
// its own allocator settings.
#pragma once

namespace clipwarden {

// glibc's malloc hands a large block (above a threshold that starts at
// 128 KiB and grows to the largest block freed, up to 32 MiB) straight to
// the kernel with mmap, and gives an arena's free top back once more than
// twice that threshold is free. The analysis frees and allocates
// frame-sized planes all the time (OpenCV temporaries: 0.6-1.8 MB at the
// 512 px working size), so the same pages were returned and faulted in
// again, zeroed by the kernel, frame after frame and clip after clip in a
// gate batch. Fixing both thresholds at 32 MiB keeps freed planes in the
// arenas for the next one. Measured 2026-12-05 (docs/performance.md,
// "Memory"): opencv-doc vtest.avi 274k -> 45k page faults and 2.3 -> 0.5 s
// of system time; the peak resident set grows by what stays in the arenas.
void keep_freed_buffers_for_reuse();

}  // namespace clipwarden
