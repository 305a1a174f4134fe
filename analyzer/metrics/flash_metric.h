// The flash screening caution, shared by the flash metric (report notes and
// summary.flash.details) and the reporters that show it.
#pragma once

namespace framelint {

extern const char* const kFlashCaution;

}  // namespace framelint
