// docs/cli.md states every command and every option: each command the CLI
// registers (analyzer/cli/commands.cpp) has a section, and every option its
// --help lists appears in that section (analyze's and gate's shared
// analysis options in the shared table). The help text is the program's
// own account of what it accepts; the page is the hand-written contract.
#include <gtest/gtest.h>

#include <cstdio>
#include <regex>

#include "analyzer/cli/command.h"
#include "support/source_files.h"

namespace {

using clipwarden::test::read_source_file;

// The section starting at the heading that begins with `heading`, up to the
// next level-2 heading; "" when there is none.
std::string section(const std::string& doc, const std::string& heading) {
  const size_t a = doc.find("\n" + heading);
  if (a == std::string::npos) return "";
  const size_t b = doc.find("\n## ", a + 1);
  return doc.substr(a, b == std::string::npos ? std::string::npos : b - a);
}

// Option names ("--out") on the option lines of `clipwarden COMMAND --help`,
// run as its own process (gate installs signal handlers first thing).
std::vector<std::string> help_options(const clipwarden::cli::Command& command) {
  const std::string cmd = std::string(CLIPWARDEN_BINARY) + " " + command.name + " --help";
  std::string help;
  FILE* pipe = popen(cmd.c_str(), "r");
  if (!pipe) ADD_FAILURE() << "cannot run " << cmd;
  char buf[4096];
  for (size_t n; pipe && (n = fread(buf, 1, sizeof buf, pipe)) > 0;) help.append(buf, n);
  EXPECT_EQ(pipe ? pclose(pipe) : -1, 0) << cmd;
  std::vector<std::string> out;
  const size_t options = help.find("\noptions:\n");
  if (options == std::string::npos) return out;
  std::istringstream lines(help.substr(options + 10));
  const std::regex option(R"(^\s+(?:-\w, )?(--[a-z][a-z-]*))");
  for (std::string line; std::getline(lines, line);) {
    std::smatch m;
    if (std::regex_search(line, m, option) && m[1] != "--help") out.push_back(m[1]);
  }
  return out;
}

}  // namespace

TEST(CliDocs, EveryOptionIsDocumented) {
  const std::string doc = read_source_file("docs/cli.md");
  ASSERT_FALSE(doc.empty());
  const std::string shared = section(doc, "## Options shared by `analyze` and `gate`");
  ASSERT_FALSE(shared.empty());
  for (const auto& command : clipwarden::cli::commands()) {
    SCOPED_TRACE(command.name);
    std::string text = section(doc, std::string("## `clipwarden ") + command.name);
    ASSERT_FALSE(text.empty()) << "no section for the command";
    if (std::string(command.name) == "analyze" || std::string(command.name) == "gate")
      text += shared;
    const auto options = help_options(command);
    EXPECT_FALSE(options.empty());
    for (const auto& o : options)
      EXPECT_NE(text.find("`" + o + "`"), std::string::npos) << o << " undocumented";
  }
}

TEST(CliDocs, EveryExitStatusIsDocumented) {
  const std::string table = section(read_source_file("docs/cli.md"), "## Exit statuses");
  using namespace clipwarden::cli;
  for (int status : {int(kExitOk), int(kExitGateFailed), int(kExitUsage), int(kExitInputError)})
    EXPECT_NE(table.find("\n| " + std::to_string(status) + " |"), std::string::npos) << status;
  // gate's interrupted statuses: 128 + SIGINT (2), 128 + SIGTERM (15).
  EXPECT_NE(table.find("| 130, 143 |"), std::string::npos);
}
