// The review queue as one self-contained HTML page (DIR/index.html): inline
// CSS, no script, nothing loaded from the network, every input string
// escaped. Clips are listed worst first: reject, review, error, pass, then
// by coherence (lowest first).
#pragma once

#include <string>
#include <vector>

#include "clipwarden/gate.h"

namespace clipwarden {

// links[i]: the report of results[i] relative to the page ("" for none).
std::string render_queue_page(const std::vector<ClipResult>& results,
                              const std::vector<std::string>& links);

// The order the page lists clips in: indices into `results`.
std::vector<size_t> worst_first_order(const std::vector<ClipResult>& results);

}  // namespace clipwarden
