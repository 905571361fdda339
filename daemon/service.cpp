#include "service.h"

#include <malloc.h>

#include <chrono>
#include <nlohmann/json.hpp>
#include <optional>
#include <string>
#include <thread>
#include <vector>

#include "dewmargin/config_loader.h"
#include "dewmargin/engine.h"
#include "dewmargin/forward_clock.h"
#include "dewmargin/history_reader.h"
#include "dewmargin/http_server.h"
#include "dewmargin/input_registry.h"
#include "dewmargin/json_dump.h"
#include "dewmargin/live_snapshot.h"
#include "dewmargin/mqtt_link.h"
#include "dewmargin/restart_needed.h"
#include "dewmargin/safe_text.h"
#include "dewmargin/secret_file.h"
#include "dewmargin/store_writer.h"
#include "dewmargin/tick_driver.h"
#include "dewmargin/version.h"
#include "event_log_budget.h"
#include "logging.h"
#include "message_containment.h"
#include "signals.h"
#include "systemd_notify.h"

namespace dewmargin::daemon {
namespace {

constexpr auto k_tick = std::chrono::seconds(1);
constexpr auto k_http_retry = std::chrono::seconds(60);      // the web server, when it could not start
constexpr auto k_max_wait = std::chrono::milliseconds(200);  // signal and watchdog latency
constexpr std::size_t k_burst = 256;
constexpr std::size_t k_max_early_messages = 1000;
// Entries an output batch keeps room for between passes; a burst's room (the start, a
// reconnect, a reload: a state per zone and more, 1.2 MB at 10,000 zones) is given back.
constexpr std::size_t k_batch_room_kept = 8192;  // above a busy tick at 10,000 zones
// Opening the history database again after a failure: soon at first (a lock or a full disk
// clears quickly), then less often.
constexpr auto k_store_retry_first = std::chrono::seconds(5);
constexpr auto k_store_retry_max = std::chrono::seconds(60);
constexpr auto k_stop_store_timeout = std::chrono::milliseconds(2000);
constexpr auto k_stop_link_timeout = std::chrono::milliseconds(2000);
// Repeated problems, contained message faults and held-back event lines: at most one line
// per problem and minute, and a summary line a minute.
constexpr auto k_report_interval = std::chrono::seconds(60);
constexpr auto k_heap_trim_interval = std::chrono::minutes(10);

timestamp wall_now() {
  return std::chrono::time_point_cast<std::chrono::milliseconds>(std::chrono::system_clock::now());
}

std::string status_payload(const site_config& cfg, const char* state, const std::string& reason) {
  nlohmann::json j;
  j["state"] = state;
  j["site"] = cfg.site;
  j["version"] = k_version;
  j["ts"] = format_iso8601_utc(wall_now());
  if (!reason.empty()) j["reason"] = reason;
  return json_dump(j);
}

std::string describe_event(const event_record& e) {
  std::string subject = subject_type_name(e.subject);
  if (!e.subject_id.empty()) subject += " " + e.subject_id;
  return e.kind + " " + subject + ": " + e.json;
}

// Owns the pieces and runs the loop; members are declared in start-up order.
class service {
 public:
  service(const service_options& o, std::shared_ptr<spdlog::logger> log)
      : options_(o),
        log_(std::move(log)),
        problems_(log_, k_report_interval),
        containment_(k_report_interval, [this](const containment_report& r) { report_contained(r); }),
        log_budget_(event_log_budget::limits{k_report_interval, 5}, std::chrono::steady_clock::now()) {}

  int run() {
    auto loaded = load_config_file(options_.config_path);
    if (!loaded.ok()) {
      for (const auto& d : loaded.errors) log_->error("{}", text_excerpt(d.to_string(), 400));
      return 2;
    }
    if (!apply_log_level(*loaded.config)) return 2;
    core_ = std::make_unique<engine>(std::move(*loaded.config));
    const site_config& cfg = core_->config();
    log_->info("dewmargind {} starting: site {}, {} zones, {} loops, broker {}", k_version, cfg.site, cfg.zones.size(),
               cfg.loops.size(), cfg.broker.uri);

    auto link = mqtt_link::create(link_options(cfg));
    if (!link) {
      log_->error("{}", link.err().message);
      return 1;
    }
    link_ = std::make_unique<mqtt_link>(std::move(link.value()));
    // Connecting and subscribing (0.5 s for 30,000 topics, mostly the broker's) overlap the
    // restore and the start-up burst below. Nothing is lost or reordered by starting first:
    // readings wait in the link's queue until loop() takes them, after start_core(), and the
    // sender waits for the subscription before it sends anything.
    link_->start();
    notifier_.status("connecting to " + cfg.broker.uri);
    if (cfg.http) {
      live_ = std::make_unique<live_snapshot>(cfg.publish.prefix, cfg.site, k_version);
      start_http(*cfg.http);
    }

    open_store();
    restored_state restored;
    {
      // A history that cannot be opened for writing (a read-only remount, a lock) may still be
      // read: alarms, acknowledgements, shelving and valves are restored from it all the same.
      auto r = store_ ? store_->load_restored_state() : read_only_restore(cfg.storage.path);
      if (r) {
        restored = std::move(r.value());
        log_->info("restored {} zone and {} loop states from {}", restored.zones.size(), restored.loops.size(),
                   cfg.storage.path);
      } else {
        log_->error("{}; starting without restored state", r.err().message);
      }
    }

    restored_ = std::move(restored);
    event_time_ = cfg.clock.source == clock_source::readings;
    // In event-time mode the core starts at the first reading's time; until then nothing
    // is evaluated (and the first messages wait, see handle()).
    if (!event_time_) start_core(clock_now());

    loop();
    shut_down();
    return 0;
  }

 private:
  bool apply_log_level(const site_config& cfg) {
    const std::string level_text = options_.log_level.value_or(cfg.logging.level);
    spdlog::level::level_enum level{};
    if (!parse_log_level(level_text, level)) {
      log_->error("{}: logging.level '{}' is not one of trace, debug, info, warn, error, critical, off",
                  options_.config_path.string(), level_text);
      return false;
    }
    log_->set_level(level);
    return true;
  }

  mqtt_link_options link_options(const site_config& cfg) {
    mqtt_link_options o;
    o.broker = cfg.broker;
    o.status_topic = core_->status_topic();
    o.online_payload = status_payload(cfg, "online", "");
    o.offline_will_payload = status_payload(cfg, "offline", "connection lost");
    o.subscriptions = core_->subscriptions();
    o.must_keep_prefixes = {core_->command_prefix()};
    o.outbox_capacity = outbox_capacity_for_zones(cfg.zones.size());  // the start-up burst fits (outbox.h)
    o.report = [this](link_report_level level, const std::string& message) {
      const auto l = level == link_report_level::error     ? spdlog::level::err
                     : level == link_report_level::warning ? spdlog::level::warn
                                                           : spdlog::level::info;
      problems_.report(l, "mqtt: " + message);
    };
    return o;
  }

  static store_result<restored_state> read_only_restore(const std::string& path) {
    auto reader = history_reader::open(path);
    if (!reader) reader = history_reader::open_immutable(path);  // read-only media: WAL without -shm
    if (!reader) return reader.err();
    return reader.value().load_restored_state();
  }

  void open_store() {
    last_store_attempt_ = std::chrono::steady_clock::now();
    auto opts = store_writer_options_from(core_->config().storage);
    opts.report_error = [this](const std::string& message) { problems_.report(spdlog::level::err, message); };
    auto opened = store_writer::open(std::move(opts));
    if (!opened) {
      // Supervision matters more than history: go on without the disk, retry later.
      problems_.report(spdlog::level::err, opened.err().message + "; running without history, trying again in " +
                                               std::to_string(store_retry_.count()) + " s");
      store_open_failed_ = true;
      next_store_retry_ = last_store_attempt_ + store_retry_;
      store_retry_ = std::min<std::chrono::seconds>(store_retry_ * 2, k_store_retry_max);
      return;
    }
    store_ = std::make_unique<store_writer>(std::move(opened.value()));
    if (store_open_failed_) {
      log_->info("history: {} opened, writing again", store_->path().string());
      // The rows for restarts were not written meanwhile: every zone's and loop's state now,
      // so that a restart restores today's alarms and valves, not those of the last write.
      if (started_) {
        const restored_state now = core_->snapshot();
        engine_output rows;
        rows.zone_snapshots = now.zones;
        rows.loop_snapshots = now.loops;
        store_->enqueue(rows);
      }
    }
    store_open_failed_ = false;
    store_retry_ = k_store_retry_first;
    store_seen_ = store_->counters();
  }

  // The config's parse tree (a reload's too) and the start-up burst are freed once the outbox
  // has sent the burst: their pages go back to the system then. glibc keeps freed heap
  // otherwise, and at 10,000 zones that was more than half of the resident memory.
  // Also every 10 minutes: a burst of readings or of outgoing states leaves freed heap behind
  // too (at 10,000 zones the resident set grew by a third under load and stayed there).
  void trim_heap_if_due(std::chrono::steady_clock::time_point now) {
    const bool after_burst = trim_heap_when_sent_ && link_->stats().outbox_size == 0;
    if (!after_burst && now - last_heap_trim_ < k_heap_trim_interval) return;
    trim_heap_when_sent_ = false;
    last_heap_trim_ = now;
    (void)malloc_trim(0);
  }

  // Once a second: a recovery line when the store writes again after failed commits.
  void watch_store() {
    if (!store_) return;
    const store_writer_counters now = store_->counters();
    if (now.errors > store_seen_.errors) {
      store_failing_since_ = store_failing_since_.value_or(store_seen_.errors);
    } else if (store_failing_since_ && now.commits > store_seen_.commits) {
      log_->info("history: {} writable again, rows committed ({} failed attempts meanwhile)", store_->path().string(),
                 now.errors - *store_failing_since_);
      store_failing_since_.reset();
    }
    store_seen_ = now;
  }

  // Once a second: after a reconnect, the retained messages again; drops counted for the
  // summary line; the line once a minute.
  void watch_link(std::chrono::steady_clock::time_point now) {
    const mqtt_link_stats st = link_->stats();
    // A new connection after the first: the broker may have restarted without persistence and
    // lost every retained state and command, and the link keeps no copies. The engine
    // publishes them again as they stand now (at most a second after the connect; the sender
    // holds everything until the subscription is back anyway).
    if (started_ && st.connections > std::max<std::uint64_t>(link_seen_.connections, 1)) {
      core_->republish(service_now(), batch_);
      const std::size_t count = batch_.messages.size();
      dispatch();
      trim_heap_when_sent_ = true;  // a burst like the start's: give back the room once it is sent
      log_->info(
          "reconnected (connection {}): {} retained states and commands published again, in case the broker lost them",
          st.connections, count);
    }
    std::uint64_t outbox = 0;
    for (const auto d : st.dropped_outbox) outbox += d;
    log_budget_.count("inbound messages dropped (queue full)", st.dropped_inbound - link_seen_.dropped_inbound);
    log_budget_.count("events dropped (outbox full of events)", outbox - outbox_drops_seen_);
    outbox_drops_seen_ = outbox;
    link_seen_ = st;
    const std::uint64_t contained = containment_.dropped_total();
    log_budget_.count("messages dropped on a handling error", contained - contained_seen_);
    contained_seen_ = contained;
    if (auto summary = log_budget_.summary_due(now)) {
      const bool lost = summary->find("dropped") != std::string::npos;
      log_->log(lost ? spdlog::level::warn : spdlog::level::info, "{}", *summary);
    }
  }

  // One message could not be handled: the message is gone, supervision goes on. Reported
  // in the log and as a service event, both at most once per interval.
  void report_contained(const containment_report& r) {
    std::string text = "message on " + r.topic + " dropped: " + r.error;
    if (r.dropped_since_last > 0) {
      text += " (" + std::to_string(r.dropped_since_last) + " more dropped since the last report)";
    }
    log_->error("{}", text);
    if (started_) core_->service_event(service_now(), "running", "running", text, batch_);
  }

  // ---- live views (lib/http): the web server gets copies of the published states ----

  // Like the history: supervision matters more than the page. A server that cannot start
  // (port taken, token file missing) is logged and tried again every minute.
  void start_http(const http_config& h) {
    next_http_attempt_ = std::chrono::steady_clock::now() + k_http_retry;
    http_server_options o;
    o.host = h.host;
    o.port = h.port;
    if (!h.token_file.empty()) {
      auto token = read_secret_file(h.token_file);
      if (!token) {
        problems_.report(spdlog::level::err, "http.token_file " + token.err().message +
                                                 "; no web server until it can be read (retrying every 60 s)");
        return;
      }
      o.token = std::move(token).value();
    }
    auto server = http_server::start(o, *live_);
    if (!server) {
      problems_.report(spdlog::level::err, server.err().message + "; retrying every 60 s");
      return;
    }
    http_ = std::move(server).value();
    const std::string host = o.host.find(':') != std::string::npos ? "[" + o.host + "]" : o.host;
    log_->info("live page at http://{}:{}/ (metrics at /metrics{})", host, http_->port(),
               o.token.empty() ? "" : "; bearer token required");
  }

  void update_live_counters() {
    if (!live_) return;
    service_counters c;
    const auto st = link_->stats();
    const auto& ec = core_->counters();
    c.messages_received = st.received;
    c.bad_inputs = retired_bad_inputs_ + ec.bad_readings;
    c.commands_rejected = retired_rejected_ + ec.rejected;
    c.broker_reconnects = st.reconnects;
    c.inbound_drops = st.dropped_inbound;
    c.outbox_drops = st.dropped_outbox_of(message_class::event) + st.dropped_outbox_of(message_class::alarm_event) +
                     st.dropped_outbox_of(message_class::state) + st.dropped_outbox_of(message_class::command);
    if (store_) {
      const auto sc = store_->counters();
      c.store_write_errors = sc.errors;
      c.store_commits = sc.commits;
      c.store_commit_us_total = sc.total_commit_us;
    }
    c.broker_connected = link_->connected();
    live_->set_counters(c);
  }

  // Publish first: the outbox takes messages without waiting, the store only copies rows,
  // so neither a slow disk nor a slow broker delays the other.
  void dispatch() {
    for (const auto& e : batch_.events) {
      if (!log_budget_.admit(e.kind)) continue;
      const spdlog::level::level_enum level = e.kind == "rejected"                   ? spdlog::level::warn
                                              : event_log_budget::quiet_kind(e.kind) ? spdlog::level::debug
                                                                                     : spdlog::level::info;
      if (log_->should_log(level)) log_->log(level, "{}", describe_event(e));
    }
    if (live_) {
      for (const auto& m : batch_.messages) {
        if (m.retained && m.cls == message_class::state) live_->on_published(m.topic, m.payload);
      }
    }
    for (auto& m : batch_.messages) link_publish(std::move(m));
    if (store_) store_->enqueue(batch_);
    batch_.clear();
    const auto roomy = [](const auto& v) { return v.capacity() > k_batch_room_kept; };
    if (roomy(batch_.messages) || roomy(batch_.events) || roomy(batch_.samples) || roomy(batch_.zone_snapshots) ||
        roomy(batch_.loop_snapshots)) {
      batch_ = engine_output{};
    }
  }

  void link_publish(outbound_message m) {
    if (link_) link_->publish(std::move(m));
  }

  void loop() {
    auto next_tick = std::chrono::steady_clock::now() + k_tick;
    bool announced_ready = false;
    std::vector<inbound_message> inbox;  // reused: no allocation per burst
    inbox.reserve(k_burst);
    for (;;) {
      const auto steady = std::chrono::steady_clock::now();
      const auto wait = std::min<std::chrono::steady_clock::duration>(
          k_max_wait, std::max<std::chrono::steady_clock::duration>(next_tick - steady, std::chrono::milliseconds(0)));
      // A burst is taken at once, and handled without the per-pass checks below.
      inbox.clear();
      if (link_->next_batch(inbox, k_burst, std::chrono::duration_cast<std::chrono::milliseconds>(wait)) > 0) {
        for (const auto& msg : inbox) handle(msg);
      }
      const auto after = std::chrono::steady_clock::now();
      if (after >= next_tick) {
        if (!event_time_) {
          core_->tick(clock_now(), batch_);
          dispatch();
        }
        next_tick += k_tick;
        update_live_counters();
        if (live_ && !http_ && core_->config().http && after >= next_http_attempt_) start_http(*core_->config().http);
        // After a stall (suspend, debugger) do not replay the missed ticks one by one.
        if (after - next_tick > std::chrono::seconds(5)) next_tick = after + k_tick;
        if (!store_ && after >= next_store_retry_) open_store();
        watch_store();
        watch_link(after);
        trim_heap_if_due(after);
      }
      if (!announced_ready && link_->ready()) {
        announced_ready = true;
        trim_heap_when_sent_ = true;
        notifier_.ready("connected to " + core_->config().broker.uri + ", supervising " +
                        std::to_string(core_->config().zones.size()) + " zones");
        log_->info("connected and subscribed to {} topics", core_->subscriptions().size());
      }
      notifier_.keep_alive(after);
      switch (signals_.poll()) {
        case signal_request::none:
          break;
        case signal_request::reload:
          reload_contained();
          break;
        case signal_request::stop:
          return;
      }
    }
  }

  // Restored alarms and setpoints go out before any new reading is evaluated.
  void start_core(timestamp now) {
    core_->begin(now, restored_, batch_);
    restored_ = restored_state{};
    core_->service_event(now, "stopped", "running", std::string("started, version ") + k_version, batch_);
    dispatch();
    started_ = true;
    event_now_ = now;
    event_ticks_.emplace(now);
  }

  // Each message's outputs go out before the next message is taken (alarm latency).
  void handle(const inbound_message& msg) {
    if (!event_time_) {
      contain(msg, clock_now());
      return;
    }
    // Only a reading moves event time: a command, or a message on a topic no input reads,
    // cannot set the clock (a stray "ts" in 2099 would make every input stale until a restart).
    const std::optional<timestamp> ts = core_->reads(msg.topic) ? reading_time(msg.payload) : std::nullopt;
    if (!started_) {
      if (!ts) {
        // Commands before the first reading: keep a bounded number for when time starts.
        if (early_.size() < k_max_early_messages) early_.push_back(msg);
        return;
      }
      start_core(*ts);
      std::vector<inbound_message> early;
      early.swap(early_);
      for (const auto& m : early) handle(m);
    }
    if (ts && *ts > event_now_) advance_event_time(*ts);
    contain(msg, ts.value_or(event_now_));
  }

  // Only the core's handling of the message is contained (see message_containment.h);
  // what it produced before a fault still goes out, since the core's state already
  // reflects it. Publishing and storing are outside: a fault there stops the service.
  void contain(const inbound_message& msg, timestamp now) {
    (void)containment_.run(msg.topic, [&] { core_->on_message(msg.topic, msg.payload, now, batch_, msg.retained); });
    if (!batch_.empty()) dispatch();
  }

  // Event time: the ISO 8601 text at clock.field of a JSON payload.
  std::optional<timestamp> reading_time(const std::string& payload) const {
    if (payload.empty() || payload.front() != '{' || payload.size() > k_max_input_payload_bytes) return std::nullopt;
    const auto doc = nlohmann::json::parse(payload, nullptr, false);
    if (doc.is_discarded() || !doc.is_object()) return std::nullopt;
    try {
      const nlohmann::json::json_pointer ptr(core_->config().clock.field);
      if (!doc.contains(ptr) || !doc.at(ptr).is_string()) return std::nullopt;
      auto t = parse_iso8601(doc.at(ptr).get<std::string>());
      if (!t) return std::nullopt;
      return t.value();
    } catch (const nlohmann::json::exception&) {
      return std::nullopt;
    }
  }

  // Event time drives the tick by the core's one rule (tick_driver.h).
  void advance_event_time(timestamp t) {
    event_ticks_->advance_to(t, [this](timestamp at) {
      core_->tick(at, batch_);
      dispatch();
    });
    event_now_ = t;
  }

  // A config file comes from outside: a fault while taking it in (a value the core cannot
  // publish) rejects the reload as long as the running core is still the old one. Once the
  // new core is in place there is nothing to go back to: the fault stops the service.
  void reload_contained() {
    const engine* before = core_.get();
    try {
      reload();
    } catch (const std::bad_alloc&) {
      throw;
    } catch (const std::logic_error&) {
      throw;
    } catch (const std::exception& e) {
      if (core_.get() != before) throw;
      batch_.clear();  // what the new config produced before the fault must not go out
      const std::string why = text_excerpt(e.what(), k_report_bytes);
      log_->error("reload of {} failed: {}; the previous config stays in force", options_.config_path.string(), why);
      reject_reload(service_now(), why);
    }
  }

  // A reload that is not taken: a `service` event saying why, and systemd told the old config
  // is still in force. `why` is already safe text.
  void reject_reload(timestamp now, const std::string& why) {
    core_->service_event(now, "running", "running", "reload rejected (" + why + "); the previous config stays in force",
                         batch_);
    dispatch();
    notifier_.ready("reload rejected; previous config in force");
  }

  timestamp service_now() { return event_time_ ? event_now_ : clock_now(); }

  // Wall time that never goes backwards (forward_clock.h); a step back is logged once.
  timestamp clock_now() {
    const timestamp t = clock_.now(wall_now(), std::chrono::steady_clock::now());
    const bool behind = clock_.ahead() > std::chrono::seconds(1);
    if (behind && !clock_stepped_back_) {
      spdlog::warn(
          "the system clock stepped back by {:.1f} s; the service's time keeps running forward (at 90 % "
          "speed until the system clock catches up), so no reading is refused as out of order",
          std::chrono::duration<double>(clock_.ahead()).count());
    } else if (!behind && clock_stepped_back_) {
      spdlog::info("the system clock has caught up with the service's time");
    }
    clock_stepped_back_ = behind;
    return t;
  }

  void reload() {
    notifier_.reloading();
    log_->info("SIGHUP: reloading {}", options_.config_path.string());
    auto loaded = load_config_file(options_.config_path);
    const timestamp now = service_now();
    if (!loaded.ok()) {
      for (const auto& d : loaded.errors) log_->error("{}", text_excerpt(d.to_string(), 400));
      // The file may hold anything (binary junk): escaped before it goes into an event.
      const std::string first = loaded.errors.empty() ? std::string("unknown error")
                                                      : text_excerpt(loaded.errors.front().to_string(), k_report_bytes);
      reject_reload(now, std::to_string(loaded.errors.size()) + " errors; first: " + first);
      return;
    }
    if (const auto added = new_input_topics(core_->config(), *loaded.config); !added.empty()) {
      std::string topics;
      for (const auto& t : added) topics += (topics.empty() ? "'" : ", '") + text_excerpt(t, 120) + "'";
      log_->error("reload rejected: new input topics need a restart (they are subscribed at start): {}", topics);
      reject_reload(now, "new input topics need a restart: " + text_excerpt(topics, k_report_bytes));
      return;
    }
    for (const auto& setting : restart_needed(core_->config(), *loaded.config)) {
      log_->warn("reload: {} changed; it takes effect at the next restart", setting);
    }
    auto fresh = std::make_unique<engine>(with_start_settings_of(core_->config(), std::move(*loaded.config)));
    if (!apply_log_level(fresh->config())) log_->warn("logging level unchanged");
    if (!started_) {
      // Event time has not started yet: nothing to carry over.
      core_ = std::move(fresh);
      log_->info("config reloaded before the first reading");
      notifier_.ready("config reloaded");
      return;
    }
    retired_bad_inputs_ += core_->counters().bad_readings;  // a new engine counts from zero
    retired_rejected_ += core_->counters().rejected;
    fresh->adopt(*core_, now, batch_);
    core_ = std::move(fresh);
    core_->service_event(now, "running", "running", "config reloaded", batch_);
    dispatch();
    trim_heap_when_sent_ = true;
    notifier_.ready("config reloaded");
  }

  void shut_down() {
    notifier_.stopping();
    if (http_) http_->stop();
    if (started_) {
      const timestamp now = service_now();
      core_->flush(now, batch_);
      core_->service_event(now, "running", "stopped", "stop requested by signal", batch_);
      dispatch();
    }
    if (store_) {
      if (!store_->flush(k_stop_store_timeout)) log_->error("history: not every row was written before stopping");
      store_->stop(std::chrono::milliseconds(500));
    }
    link_->shutdown(status_payload(core_->config(), "offline", "stopped"), k_stop_link_timeout);
    const auto st = link_->stats();
    log_->info("stopped: {} messages received, {} delivered, {} inbound drops, {} outbox drops", st.received,
               st.delivered, st.dropped_inbound,
               st.dropped_outbox_of(message_class::event) + st.dropped_outbox_of(message_class::alarm_event) +
                   st.dropped_outbox_of(message_class::state) + st.dropped_outbox_of(message_class::command));
  }

  service_options options_;
  std::shared_ptr<spdlog::logger> log_;
  problem_reporter problems_;
  message_containment containment_;
  event_log_budget log_budget_;
  signal_inbox signals_;  // before any thread is started
  systemd_notifier notifier_;
  std::unique_ptr<engine> core_;
  std::unique_ptr<store_writer> store_;
  std::unique_ptr<mqtt_link> link_;
  std::chrono::steady_clock::time_point last_store_attempt_{};
  std::chrono::steady_clock::time_point next_store_retry_{};
  std::chrono::seconds store_retry_ = k_store_retry_first;
  bool store_open_failed_ = false;
  store_writer_counters store_seen_{};
  std::optional<std::uint64_t> store_failing_since_;  // error count before the failures began
  mqtt_link_stats link_seen_{};
  std::uint64_t outbox_drops_seen_ = 0;
  std::uint64_t contained_seen_ = 0;
  engine_output batch_;
  restored_state restored_;
  bool started_ = false;
  bool trim_heap_when_sent_ = false;  // see trim_heap_if_due()
  std::chrono::steady_clock::time_point last_heap_trim_ = std::chrono::steady_clock::now();
  // Event-time mode (clock.source: readings).
  bool event_time_ = false;
  timestamp event_now_{};
  std::optional<tick_driver> event_ticks_;
  std::vector<inbound_message> early_;
  // Live views (http: in the config).
  std::unique_ptr<live_snapshot> live_;
  std::unique_ptr<http_server> http_;
  std::chrono::steady_clock::time_point next_http_attempt_{};
  forward_clock clock_;
  bool clock_stepped_back_ = false;
  std::uint64_t retired_bad_inputs_ = 0;
  std::uint64_t retired_rejected_ = 0;
};

}  // namespace

int run_service(const service_options& options, const std::shared_ptr<spdlog::logger>& log) {
  service s(options, log);
  return s.run();
}

}  // namespace dewmargin::daemon
