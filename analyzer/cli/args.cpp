#include "analyzer/cli/args.h"

#include <charconv>
#include <cstdlib>

namespace clipwarden::cli {

std::optional<std::string> ParsedArgs::get(const std::string& name) const {
  auto it = values_.find(name);
  if (it == values_.end() || it->second.empty()) return std::nullopt;
  return it->second.back();
}

std::vector<std::string> ParsedArgs::get_all(const std::string& name) const {
  auto it = values_.find(name);
  return it == values_.end() ? std::vector<std::string>{} : it->second;
}

Expected<std::optional<int>> ParsedArgs::get_int(const std::string& name, int min, int max) const {
  auto v = get(name);
  if (!v) return std::optional<int>{};
  int out = 0;
  auto [end, ec] = std::from_chars(v->data(), v->data() + v->size(), out);
  if (ec != std::errc() || end != v->data() + v->size() || out < min || out > max)
    return usage_error("--" + name, "expects a whole number from " + std::to_string(min) + " to " +
                                        std::to_string(max) + ", got '" + *v + "'");
  return std::optional<int>{out};
}

Expected<std::optional<double>> ParsedArgs::get_double(const std::string& name, double min,
                                                       double max) const {
  auto v = get(name);
  if (!v) return std::optional<double>{};
  char* end = nullptr;
  double out = std::strtod(v->c_str(), &end);
  if (v->empty() || *end != '\0' || !(out >= min && out <= max))
    return usage_error("--" + name, "expects a number from " + std::to_string(min) + " to " +
                                        std::to_string(max) + ", got '" + *v + "'");
  return std::optional<double>{out};
}

Expected<ParsedArgs> parse_args(const std::vector<std::string>& args,
                                const std::vector<OptionSpec>& specs) {
  ParsedArgs parsed;
  auto find = [&](const std::string& key, bool is_short) -> const OptionSpec* {
    for (const auto& s : specs)
      if ((is_short ? s.short_name : s.name) == key && !key.empty()) return &s;
    return nullptr;
  };
  bool only_positionals = false;
  for (size_t i = 0; i < args.size(); ++i) {
    const std::string& a = args[i];
    if (only_positionals || a.size() < 2 || a[0] != '-') {
      parsed.positionals.push_back(a);
      continue;
    }
    if (a == "--") {
      only_positionals = true;
      continue;
    }
    bool is_short = a[1] != '-';
    std::string key = a.substr(is_short ? 1 : 2);
    std::optional<std::string> inline_value;
    if (auto eq = key.find('='); eq != std::string::npos) {
      inline_value = key.substr(eq + 1);
      key = key.substr(0, eq);
    }
    const OptionSpec* spec = find(key, is_short);
    if (!spec) return usage_error(a, "unknown option (see --help)");
    if (!spec->takes_value) {
      if (inline_value) return usage_error(a, "takes no value");
      parsed.values_[spec->name].push_back("1");
      continue;
    }
    std::string value;
    if (inline_value) {
      value = *inline_value;
    } else if (i + 1 < args.size()) {
      value = args[++i];
    } else {
      return usage_error(a, "needs a value");
    }
    auto& slot = parsed.values_[spec->name];
    if (!slot.empty() && !spec->repeatable) return usage_error(a, "given more than once");
    slot.push_back(value);
  }
  return parsed;
}

std::string format_help(const std::string& name, const std::string& synopsis,
                        const std::string& description, const std::vector<OptionSpec>& specs) {
  std::string out = "usage: clipwarden " + name + " " + synopsis + "\n\n" + description + "\n";
  if (!specs.empty()) out += "\noptions:\n";
  for (const auto& s : specs) {
    std::string left = "  ";
    if (!s.short_name.empty()) left += "-" + s.short_name + ", ";
    left += "--" + s.name + (s.takes_value ? " VALUE" : "");
    if (left.size() < 28) left.resize(28, ' ');
    out += left + " " + s.help + "\n";
  }
  out += "  --help                     show this help\n";
  return out;
}

bool wants_help(const std::vector<std::string>& args) {
  for (const auto& a : args)
    if (a == "--help" || a == "-h") return true;
  return false;
}

}  // namespace clipwarden::cli
