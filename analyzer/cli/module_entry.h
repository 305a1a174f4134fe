// The one function the commands' module (clipwarden-commands.so) exports:
// the launcher (main.cpp) loads the module and calls it with the command
// line after the program name. args[0] is a command name from
// command_names.h. Returns the exit status.
#pragma once

extern "C" int clipwarden_run_command(int argc, char** argv);

namespace clipwarden::cli {
inline constexpr const char* kModuleEntryName = "clipwarden_run_command";
}  // namespace clipwarden::cli
