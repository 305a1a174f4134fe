// The evaluation corpus of real clips (camera footage and model outputs,
// with a MANIFEST.tsv), kept outside the repository: tests that need it
// read it from the folder named by the CLIPWARDEN_CORPUS environment
// variable and skip when it is not set or the clip is missing.
#pragma once

#include <string>

#include "clipwarden/report.h"

namespace clipwarden::test {

// Path of clips/<file> in the corpus, or "" when there is none.
std::string corpus_clip(const std::string& file);

// The clip analysed with the default settings and policy; a failed analysis
// fails the test and gives an empty report.
Report analyse_with_defaults(const std::string& path);

// The segments of `metric` above info in `report`, each as "frames a-b peak
// p", joined by "; "; "" when there are none. EXPECT_EQ(flagged_segments(r,
// "boiling"), "") << clip names every segment that should not be there.
std::string flagged_segments(const Report& report, const std::string& metric);

}  // namespace clipwarden::test
