// The CLI's commands by name, with the line `clipwarden --help` shows for
// each. Kept apart from the commands themselves so the launcher (main.cpp)
// can list them without loading the commands' module.
#pragma once

#include <array>

namespace clipwarden::cli {

struct CommandName {
  const char* name;
  const char* summary;
};

inline constexpr std::array<CommandName, 10> kCommandNames = {{
    {"analyze", "analyze clips; write a JSON and an HTML report per clip"},
    {"probe", "print what a clip's container holds, as JSON"},
    {"gate", "judge a batch of clips into a review queue (queue.jsonl, index.html)"},
    {"merge", "join the outputs of gate shards into one queue"},
    {"inspect", "write PNG panels (flow, warp, error, occlusion) for one frame"},
    {"compare", "compare two model versions on the same prompts, with paired statistics"},
    {"inject", "write a copy of a clip with known defects, and where they are"},
    {"metrics", "list the metrics: columns, units, better direction, default rules"},
    {"review", "serve a gate queue to a browser: watch flagged clips, decide by keyboard"},
    {"calibrate", "compare the gate's verdicts with people's decisions; propose a policy"},
}};

}  // namespace clipwarden::cli
