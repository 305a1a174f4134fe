// The review server on cpp-httplib (Debian libcpp-httplib-dev). Every
// request passes check_access (access.h) before any route runs; routes name
// clips by their queue index only, so the files served are exactly those
// the queue names (review_folder.h). Media are made on first request and
// kept: strips and panels in memory, previews under DIR/.review-previews/.
#include <httplib.h>

#include <filesystem>
#include <fstream>
#include <map>
#include <mutex>
#include <sstream>

#include "analyzer/review/access.h"
#include "analyzer/review/clip_media.h"
#include "analyzer/review/review_folder.h"
#include "analyzer/review/review_pages.h"
#include "analyzer/store/decision_log.h"
#include "clipwarden/calibrate.h"
#include "clipwarden/review.h"

namespace clipwarden {
namespace {

namespace fs = std::filesystem;
using review::DecisionsByClip;
using review::ReviewClip;

constexpr int kStripFrames = 5;
constexpr int kStripHeight = 72;
constexpr size_t kMaxBody = 64 * 1024;  // a decision is a few hundred bytes

void send_text(httplib::Response& res, int status, const std::string& text) {
  res.status = status;
  res.set_header("Content-Security-Policy", "default-src 'none'; frame-ancestors 'none'");
  res.set_content(text + "\n", "text/plain; charset=utf-8");
}

void send_json(httplib::Response& res, const nlohmann::json& j, int status = 200) {
  res.status = status;
  res.set_header("Content-Security-Policy", "default-src 'none'; frame-ancestors 'none'");
  res.set_content(j.dump(-1, ' ', false, nlohmann::json::error_handler_t::replace), "application/json");
}

// Streams a file with Range support (cpp-httplib cuts the ranges), read a
// piece at a time so a long clip is never held in memory.
void send_file(httplib::Response& res, const std::string& path, const std::string& type) {
  std::error_code ec;
  const auto size = fs::file_size(path, ec);
  if (ec) return send_text(res, 404, "not found");
  auto in = std::make_shared<std::ifstream>(path, std::ios::binary);
  res.set_content_provider(static_cast<size_t>(size), type,
                           [in](size_t offset, size_t length, httplib::DataSink& sink) {
                             char buf[64 * 1024];
                             in->clear();
                             in->seekg(static_cast<std::streamoff>(offset));
                             while (length > 0 && *in) {
                               in->read(buf, static_cast<std::streamsize>(std::min(length, sizeof buf)));
                               const auto got = static_cast<size_t>(in->gcount());
                               if (got == 0 || !sink.write(buf, got)) return false;
                               length -= got;
                               offset += got;
                             }
                             return true;
                           });
}

std::string video_type(const std::string& path) {
  const std::string ext = fs::path(path).extension().string();
  if (ext == ".webm") return "video/webm";
  if (ext == ".mov") return "video/quicktime";
  return "video/mp4";
}

nlohmann::json read_json_file(const std::string& path) {
  if (path.empty()) return nullptr;
  std::ifstream in(path, std::ios::binary);
  auto j = nlohmann::json::parse(in, nullptr, false);
  return j.is_discarded() ? nlohmann::json(nullptr) : j;
}

class Server final : public ReviewServer {
 public:
  Server(ReviewOptions options, std::string db_path, review::ReviewFolder folder, std::unique_ptr<DecisionLog> log)
      : options_(std::move(options)), db_path_(std::move(db_path)), folder_(std::move(folder)), log_(std::move(log)) {}

  Status bind() {
    if (options_.token.empty()) options_.token = review::random_token();
    if (options_.port == 0) {
      port_ = http_.bind_to_any_port(options_.host);
      if (port_ <= 0) return output_error(options_.host, "cannot listen on any port");
    } else {
      if (!http_.bind_to_port(options_.host, options_.port))
        return output_error(options_.host + ":" + std::to_string(options_.port),
                            "cannot listen there (in use, or not an address of this machine)");
      port_ = options_.port;
    }
    rules_.token = options_.token;
    rules_.hosts = review::accepted_hosts(options_.host, port_);
    routes();
    return Ok{};
  }

  int port() const override { return port_; }
  const std::string& token() const override { return options_.token; }
  std::string url() const override { return "http://" + rules_.hosts.front() + "/?token=" + options_.token; }

  Status run() override {
    if (!http_.listen_after_bind()) return output_error(url(), "the server stopped with an error");
    return Ok{};
  }
  void stop() override { http_.stop(); }

 private:
  void routes() {
    http_.set_payload_max_length(kMaxBody);
    http_.set_default_headers({{"X-Content-Type-Options", "nosniff"},
                               {"Referrer-Policy", "no-referrer"},
                               {"X-Frame-Options", "DENY"},
                               {"Cross-Origin-Resource-Policy", "same-origin"},
                               {"Cache-Control", "no-store"}});
    http_.set_pre_routing_handler([this](const httplib::Request& req, httplib::Response& res) {
      review::AccessRequest a;
      a.method = req.method;
      a.path = req.path;
      a.host = req.get_header_value("Host");
      a.origin = req.get_header_value("Origin");
      a.sec_fetch_site = req.get_header_value("Sec-Fetch-Site");
      a.header_token = req.get_header_value("X-Clipwarden-Token");
      a.query_token = req.get_param_value("token");
      if (auto refusal = review::check_access(a, rules_)) {
        send_text(res, refusal->status, "refused: " + refusal->reason);
        return httplib::Server::HandlerResponse::Handled;
      }
      return httplib::Server::HandlerResponse::Unhandled;
    });
    http_.set_error_handler([](const httplib::Request&, httplib::Response& res) {
      if (res.body.empty()) send_text(res, res.status, res.status == 404 ? "not found" : "error");
    });

    http_.Get("/", [this](const httplib::Request&, httplib::Response& res) {
      auto decided = decisions_by_clip();
      if (!decided) return send_text(res, 500, decided.error().message());
      send_page(res, review::render_queue_page(folder_, *decided, options_.token));
    });
    http_.Get(R"(/clip/(\d+))", [this](const httplib::Request& req, httplib::Response& res) {
      const ReviewClip* c = folder_.find(req.matches[1]);
      if (!c) return send_text(res, 404, "no such clip");
      auto decided = decisions_by_clip();
      if (!decided) return send_text(res, 500, decided.error().message());
      send_page(res, review::render_clip_page(*c, read_json_file(c->report_json), *decided,
                                              next_undecided(c->key, *decided), options_.token));
    });
    http_.Get(R"(/clip/(\d+)/video)", [this](const httplib::Request& req, httplib::Response& res) {
      const ReviewClip* c = folder_.find(req.matches[1]);
      if (!c || c->video_path.empty()) return send_text(res, 404, "no such clip");
      auto path = playable_video(*c);
      if (!path) return send_text(res, 500, path.error().message());
      send_file(res, *path, video_type(*path));
    });
    http_.Get(R"(/clip/(\d+)/strip\.jpg)", [this](const httplib::Request& req, httplib::Response& res) {
      const ReviewClip* c = folder_.find(req.matches[1]);
      if (!c || c->video_path.empty()) return send_text(res, 404, "no such clip");
      send_cached(res, "strip " + c->key, [c] {
        return review::frame_strip_jpeg(c->video_path, kStripFrames, kStripHeight);
      });
    });
    http_.Get(R"(/clip/(\d+)/panels/(\d+)\.jpg)", [this](const httplib::Request& req, httplib::Response& res) {
      const ReviewClip* c = folder_.find(req.matches[1]);
      if (!c || c->video_path.empty()) return send_text(res, 404, "no such clip");
      const int64_t frame = std::stoll(req.matches[2].str().substr(0, 9));
      send_cached(res, "panels " + c->key + " " + std::to_string(frame), [c, frame] {
        const nlohmann::json report = read_json_file(c->report_json);
        return review::frame_panels_jpeg(c->video_path, frame,
                                         report.is_object() ? report.value("settings", nlohmann::json()) : nlohmann::json());
      });
    });
    http_.Get(R"(/clip/(\d+)/report\.json)", [this](const httplib::Request& req, httplib::Response& res) {
      const ReviewClip* c = folder_.find(req.matches[1]);
      if (!c || c->report_json.empty()) return send_text(res, 404, "no report");
      send_file(res, c->report_json, "application/json");
      res.set_header("Content-Security-Policy", "default-src 'none'; frame-ancestors 'none'");
    });
    http_.Get(R"(/clip/(\d+)/report\.html)", [this](const httplib::Request& req, httplib::Response& res) {
      const ReviewClip* c = folder_.find(req.matches[1]);
      if (!c || c->report_html.empty()) return send_text(res, 404, "no report page");
      send_file(res, c->report_html, "text/html; charset=utf-8");
      // The page's own policy (a meta element naming its inline style and
      // script by hash) still applies; this one adds that nothing loads
      // from anywhere, not even from this server.
      res.set_header("Content-Security-Policy",
                     "default-src 'none'; img-src data:; style-src 'unsafe-inline'; script-src 'unsafe-inline'; "
                     "base-uri 'none'; form-action 'none'; frame-ancestors 'none'");
    });
    http_.Get("/agreement", [this](const httplib::Request&, httplib::Response& res) {
      auto clips = load_decided_clips(folder_.dir, db_path_);
      if (!clips) return send_text(res, 500, clips.error().message());
      send_page(res, review::render_agreement_page(folder_, agreement_by_rule(*clips, nullptr), options_.token));
    });
    http_.Get("/api/queue", [this](const httplib::Request&, httplib::Response& res) {
      auto decided = decisions_by_clip();
      if (!decided) return send_text(res, 500, decided.error().message());
      nlohmann::json clips = nlohmann::json::array();
      for (const auto& c : folder_.clips) {
        auto d = decided->find(c.result.input.id);
        clips.push_back({{"key", c.key},
                         {"id", c.result.input.id},
                         {"verdict", queue_status(c.result)},
                         {"headline", c.headline},
                         {"metrics", c.metrics},
                         {"decision", d == decided->end() ? nlohmann::json(nullptr) : nlohmann::json(d->second.decision)}});
      }
      send_json(res, {{"clips", clips}});
    });
    http_.Get("/api/decisions", [this](const httplib::Request&, httplib::Response& res) {
      auto all = log_->all();
      if (!all) return send_text(res, 500, all.error().message());
      nlohmann::json out = nlohmann::json::array();
      for (const auto& d : *all) out.push_back(decision_to_json(d));
      send_json(res, {{"decisions", out}});
    });
    http_.Post("/api/decide", [this](const httplib::Request& req, httplib::Response& res) { decide(req, res); });
  }

  void send_page(httplib::Response& res, const review::Page& page) {
    res.set_header("Content-Security-Policy", page.policy);
    res.set_content(page.html, "text/html; charset=utf-8");
  }

  template <class Make>
  void send_cached(httplib::Response& res, const std::string& key, Make make) {
    std::string bytes;
    {
      std::lock_guard<std::mutex> lock(cache_mutex_);
      auto it = cache_.find(key);
      if (it != cache_.end()) bytes = it->second;
    }
    if (bytes.empty()) {
      auto made = make();
      if (!made) return send_text(res, 500, made.error().message());
      bytes = std::move(*made);
      std::lock_guard<std::mutex> lock(cache_mutex_);
      cache_[key] = bytes;
    }
    res.set_content(bytes, "image/jpeg");
  }

  // The clip itself when browsers play it, else a preview made once (one
  // at a time: two requests for the same clip wait for one encoding).
  Expected<std::string> playable_video(const ReviewClip& c) {
    const nlohmann::json report = read_json_file(c.report_json);
    if (report.is_object() && review::browser_plays(report.value("clip", nlohmann::json::object())))
      return c.video_path;
    std::lock_guard<std::mutex> lock(preview_mutex_);
    const fs::path dir = fs::path(folder_.dir) / ".review-previews";
    const fs::path out = dir / (c.key + ".mp4");
    std::error_code ec;
    if (fs::is_regular_file(out, ec)) return out.string();
    fs::create_directories(dir, ec);
    if (ec) return output_error(dir.string(), "cannot create the previews folder: " + ec.message());
    if (auto st = review::write_browser_preview(c.video_path, out.string()); !st) return st.error();
    return out.string();
  }

  Expected<DecisionsByClip> decisions_by_clip() {
    auto all = log_->all();
    if (!all) return all.error();
    DecisionsByClip out;
    for (auto& d : latest_decisions(*all)) out[d.clip_id] = d;
    return out;
  }

  // The first undecided clip after `key` in queue order, wrapping round.
  std::string next_undecided(const std::string& key, const DecisionsByClip& decided) const {
    const auto& clips = folder_.clips;
    size_t at = 0;
    while (at < clips.size() && clips[at].key != key) ++at;
    for (size_t step = 1; step <= clips.size(); ++step) {
      const ReviewClip& c = clips[(at + step) % clips.size()];
      if (c.key != key && !decided.count(c.result.input.id)) return c.key;
    }
    return "";
  }

  void decide(const httplib::Request& req, httplib::Response& res) {
    auto body = nlohmann::json::parse(req.body, nullptr, false);
    if (!body.is_object()) return send_text(res, 400, "the body must be a JSON object");
    const ReviewClip* c = folder_.find(body.value("clip", ""));
    if (!c) return send_text(res, 400, "no such clip");
    Decision d;
    d.request_id = body.value("request_id", "");
    d.clip_id = c->result.input.id;
    d.content_sha256 = c->result.sha256;
    d.reviewer = body.value("reviewer", "");
    if (d.reviewer.empty()) d.reviewer = options_.reviewer;
    d.decision = body.value("decision", "");
    d.note = body.value("note", "");
    if (auto tags = body.find("tags"); tags != body.end() && tags->is_array())
      for (const auto& t : *tags)
        if (t.is_string() && !t.get<std::string>().empty()) d.tags.push_back(t.get<std::string>());
    d.tool_verdict = queue_status(c->result);
    d.tool_reasons = c->result.reasons;
    auto stored = log_->append(std::move(d));
    if (!stored)
      return send_text(res, stored.error().kind == ErrorKind::usage ? 400 : 500, stored.error().message());
    auto decided = decisions_by_clip();
    if (!decided) return send_text(res, 500, decided.error().message());
    send_json(res, {{"decision", decision_to_json(*stored)}, {"next", next_undecided(c->key, *decided)}});
  }

  ReviewOptions options_;
  std::string db_path_;
  review::ReviewFolder folder_;
  std::unique_ptr<DecisionLog> log_;
  httplib::Server http_;
  review::AccessRules rules_;
  int port_ = 0;
  std::mutex cache_mutex_;
  std::map<std::string, std::string> cache_;
  std::mutex preview_mutex_;
};

}  // namespace

Expected<std::unique_ptr<ReviewServer>> ReviewServer::open(const ReviewOptions& options) {
  auto folder = review::load_review_folder(options.dir);
  if (!folder) return folder.error();
  const std::string db = options.db_path.empty() ? (fs::path(options.dir) / "clipwarden.db").string() : options.db_path;
  auto log = DecisionLog::open(db);
  if (!log) return log.error();
  auto server = std::make_unique<Server>(options, db, std::move(*folder), std::move(*log));
  if (auto st = server->bind(); !st) return st.error();
  return std::unique_ptr<ReviewServer>(std::move(server));
}

}  // namespace clipwarden
