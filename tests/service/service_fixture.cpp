#include "service_fixture.h"

#include <fstream>
#include <stdexcept>

namespace dewmargin::test_support {

std::string service_test_config(const std::string& broker_uri, const std::filesystem::path& db_path,
                                const std::string& extra_top_level) {
  return "site: service-test\n"
         "broker: { uri: " + broker_uri + ", client_id: dewmargin-service-test, keepalive_s: 5 }\n"
         "storage: { path: " + db_path.string() + " }\n"
         "publish: { prefix: dm, min_interval_s: 1 }\n"
         "defaults: { margin_warn_k: 2.0, margin_alarm_k: 1.0, hysteresis_k: 0.3, confirm_s: 2, stale_after_s: 60 }\n" +
         extra_top_level +
         "loops:\n"
         "  - id: loop-1\n"
         "    supply_temp: { topic: plant/l1/supply }\n"
         "    setpoint: { topic: plant/l1/sp, min_c: 15.0, max_c: 20.0, reset_margin_k: 2.0, fall_k_per_min: 60 }\n"
         "zones:\n"
         "  - id: room-a\n"
         "    loop: loop-1\n"
         "    air_temp: { topic: r/a/temp }\n"
         "    humidity: { topic: r/a/rh }\n"
         "    surfaces: [ { topic: r/a/surface } ]\n"
         "    window_contact: { topic: r/a/window, active: [open] }\n"
         "    valve: { topic: r/a/valve, reopen_after_s: 600 }\n"
         "  - id: room-b\n"
         "    loop: loop-1\n"
         "    air_temp: { topic: r/b/env, field: /t }\n"
         "    humidity: { topic: r/b/env, field: /rh }\n";
}

service_under_test::service_under_test(const std::string& broker_uri, const std::filesystem::path& dir,
                                       const std::string& extra_top_level)
    : dir_(dir), config_path_(dir / "site.yaml"), db_path_(dir / "history.db"), log_file_(dir / "dewmargind.log") {
  rewrite_config(service_test_config(broker_uri, db_path_, extra_top_level));
}

void service_under_test::rewrite_config(const std::string& text) const {
  std::ofstream out(config_path_, std::ios::trunc);
  out << text;
  if (!out) throw std::runtime_error("cannot write " + config_path_.string());
}

void service_under_test::start() {
  process_ = child_process::spawn({DEWMARGIND_BIN, "--config", config_path_.string(), "--log-level", "debug"},
                                  log_file_);
}

int service_under_test::stop(std::chrono::milliseconds grace) { return process_.terminate(grace); }
int service_under_test::kill_now() { return process_.kill_now(); }

nlohmann::json as_json(const received_message& m) { return nlohmann::json::parse(m.payload, nullptr, false); }

std::optional<nlohmann::json> wait_event(mqtt_test_client& c, const std::string& kind, const std::string& zone,
                                         std::chrono::milliseconds timeout, std::size_t from) {
  const auto m = c.wait_for(
      "dm/events",
      [&](const received_message& r) {
        const auto j = as_json(r);
        return j.is_object() && j.value("kind", "") == kind && (zone.empty() || j.value("zone", "") == zone);
      },
      timeout, from);
  if (!m) return std::nullopt;
  return as_json(*m);
}

command_result run_dewmargin(const std::vector<std::string>& args, const std::filesystem::path& work_dir) {
  const auto out_file = work_dir / "dewmargin.out";
  std::filesystem::remove(out_file);
  std::vector<std::string> argv{DEWMARGIN_BIN};
  argv.insert(argv.end(), args.begin(), args.end());
  auto p = child_process::spawn(argv, out_file);
  const auto code = p.wait_for(std::chrono::seconds(20));
  if (!code) throw std::runtime_error("dewmargin did not finish within 20 s");
  return {*code, read_text_file(out_file)};
}

}  // namespace dewmargin::test_support
