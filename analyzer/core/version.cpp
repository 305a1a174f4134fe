#include "clipwarden/version.h"

namespace clipwarden {
const char* version() { return CLIPWARDEN_VERSION; }
}  // namespace clipwarden
