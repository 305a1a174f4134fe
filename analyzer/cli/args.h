// A small argument parser shared by every command: declared options only,
// "--name value" or "--name=value", flags without values, positionals.
// Errors are one line naming the argument.
#pragma once

#include <map>
#include <optional>
#include <string>
#include <vector>

#include "clipwarden/error.h"

namespace clipwarden::cli {

struct OptionSpec {
  std::string name;     // without dashes, e.g. "out"
  bool takes_value;     // false for flags like --quiet
  std::string help;     // one line, shown by --help
  std::string short_name = "";  // e.g. "o" for -o
  bool repeatable = false;
};

class ParsedArgs {
 public:
  std::vector<std::string> positionals;
  bool has(const std::string& name) const { return values_.count(name) > 0; }
  std::optional<std::string> get(const std::string& name) const;
  std::vector<std::string> get_all(const std::string& name) const;
  // Typed accessors: a usage error names the option when the value is bad.
  Expected<std::optional<int>> get_int(const std::string& name, int min, int max) const;
  Expected<std::optional<double>> get_double(const std::string& name, double min, double max) const;

 private:
  friend Expected<ParsedArgs> parse_args(const std::vector<std::string>&,
                                         const std::vector<OptionSpec>&);
  std::map<std::string, std::vector<std::string>> values_;
};

Expected<ParsedArgs> parse_args(const std::vector<std::string>& args,
                                const std::vector<OptionSpec>& specs);

// "usage: clipwarden NAME SYNOPSIS" then the options, one per line.
std::string format_help(const std::string& name, const std::string& synopsis,
                        const std::string& description, const std::vector<OptionSpec>& specs);

// True if args ask for help (-h or --help anywhere).
bool wants_help(const std::vector<std::string>& args);

}  // namespace clipwarden::cli
