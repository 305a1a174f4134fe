#include "analyzer/core/json_text.h"

#include <set>
#include <vector>

#include "analyzer/core/byte_text.h"

namespace clipwarden {
namespace {

using nlohmann::json;

// Thrown from the parser callback to stop at the first problem.
struct Refused {
  std::string cause;
};

}  // namespace

Expected<json> parse_json_text(std::string_view text, const std::string& subject, ErrorKind kind) {
  std::vector<std::set<std::string>> keys;  // one set per open object
  const json::parser_callback_t check = [&](int depth, json::parse_event_t event, json& parsed) {
    using E = json::parse_event_t;
    if (event == E::object_start || event == E::array_start) {
      if (depth >= kMaxJsonDepth)
        throw Refused{"nests deeper than " + std::to_string(kMaxJsonDepth) + " levels"};
      if (event == E::object_start) keys.emplace_back();
    } else if (event == E::object_end) {
      keys.pop_back();
    } else if (event == E::key && !keys.empty()) {
      const std::string& key = parsed.get_ref<const std::string&>();
      if (!keys.back().insert(key).second)
        throw Refused{"repeats the key \"" + printable(key) + "\" in one object"};
    }
    return true;
  };
  try {
    return json::parse(text.begin(), text.end(), check);
  } catch (const Refused& r) {
    return Error{kind, subject, r.cause};
  } catch (const json::parse_error& e) {
    return Error{kind, subject, "is not valid JSON (error at byte " + std::to_string(e.byte) + ")"};
  } catch (const json::exception&) {
    // A number beyond double's range (1e400) throws out_of_range 406, not
    // parse_error (found by fuzzing).
    return Error{kind, subject, "is not valid JSON (a number is out of range)"};
  }
}

}  // namespace clipwarden
