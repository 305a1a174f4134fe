// The flash screening caution, shared by the flash metric (report notes and
// summary.flash.details) and the reporters that show it.
#pragma once

namespace clipwarden {

extern const char* const kFlashCaution;

}  // namespace clipwarden
