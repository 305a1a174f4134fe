// Small in-memory reports for tests of the report writers and readers.
#pragma once

#include "clipwarden/report.h"

namespace clipwarden::fixtures {

// A 10-frame report with two series, one segment, a summary and a verdict.
// Invented values: only the plumbing is under test.
Report small_report();

}  // namespace clipwarden::fixtures
