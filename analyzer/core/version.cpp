#include "framelint/version.h"

namespace framelint {
const char* version() { return FRAMELINT_VERSION; }
}  // namespace framelint
