// The `http:` config section (lib/config/src/read_http.cpp).
#include <gtest/gtest.h>

#include "dewmargin/config_loader.h"

namespace dewmargin {
namespace {

std::string config_with(const std::string& http) {
  return "site: s\n"
         "broker: { uri: tcp://127.0.0.1:1883, client_id: c }\n"
         "storage: { path: /tmp/h.db }\n" +
         http +
         "loops:\n"
         "  - id: l\n"
         "    supply_temp: { topic: p/s }\n"
         "    setpoint: { topic: p/sp, min_c: 15, max_c: 20 }\n"
         "zones:\n"
         "  - id: z\n"
         "    loop: l\n"
         "    air_temp: { topic: z/t }\n"
         "    humidity: { topic: z/rh }\n";
}

TEST(ConfigHttp, OffUnlessConfiguredAndLoopbackByDefault) {
  auto none = load_config_text(config_with(""), "t.yaml");
  ASSERT_TRUE(none.ok());
  EXPECT_FALSE(none.config->http);
  auto defaults = load_config_text(config_with("http: {}\n"), "t.yaml");
  ASSERT_TRUE(defaults.ok()) << defaults.errors.front().to_string();
  ASSERT_TRUE(defaults.config->http);
  EXPECT_EQ(defaults.config->http->host, "127.0.0.1");
  EXPECT_EQ(defaults.config->http->port, 8088);
}

TEST(ConfigHttp, ReadsListenAddresses) {
  const struct {
    const char* listen;
    const char* host;
    int port;
  } cases[] = {
      {"127.0.0.1:9000", "127.0.0.1", 9000},
      {"localhost:8088", "127.0.0.1", 8088},
      {"[::1]:8088", "::1", 8088},
      {"127.0.2.1:1", "127.0.2.1", 1},
  };
  for (const auto& c : cases) {
    auto r = load_config_text(config_with(std::string("http: { listen: \"") + c.listen + "\" }\n"), "t.yaml");
    ASSERT_TRUE(r.ok()) << c.listen << ": " << r.errors.front().to_string();
    EXPECT_EQ(r.config->http->host, c.host);
    EXPECT_EQ(r.config->http->port, c.port);
  }
}

TEST(ConfigHttp, AnyOtherAddressNeedsAToken) {
  auto refused = load_config_text(config_with("http: { listen: \"0.0.0.0:8088\" }\n"), "t.yaml");
  ASSERT_FALSE(refused.ok());
  ASSERT_EQ(refused.errors.size(), 1u);
  EXPECT_EQ(refused.errors.front().to_string(),
            "t.yaml:4:17: http listen '0.0.0.0:8088' is reachable from other machines: set 'token_file' (a bearer "
            "token), or listen on 127.0.0.1 and reach it through an SSH tunnel");
  auto with_token = load_config_text(
      config_with("http: { listen: \"192.0.2.10:8088\", token_file: /etc/dm/http.token }\n"), "t.yaml");
  ASSERT_TRUE(with_token.ok()) << with_token.errors.front().to_string();
  EXPECT_EQ(with_token.config->http->token_file, "/etc/dm/http.token");
}

TEST(ConfigHttp, RejectsBadListenValuesAndUnknownKeys) {
  const struct {
    const char* http;
    const char* message;
  } cases[] = {
      {"http: { listen: \"8088\" }\n",
       "http listen '8088' must be HOST:PORT with an IP address (or localhost) and a port 1-65535, as in "
       "127.0.0.1:8088 "
       "or [::1]:8088"},
      {"http: { listen: \"127.0.0.1:70000\" }\n",
       "http listen '127.0.0.1:70000' must be HOST:PORT with an IP address (or localhost) and a port 1-65535, as in "
       "127.0.0.1:8088 or [::1]:8088"},
      {"http: { listen: \"gateway.example:8088\" }\n",
       "http listen 'gateway.example:8088' must be HOST:PORT with an IP address (or localhost) and a port 1-65535, as "
       "in 127.0.0.1:8088 or [::1]:8088"},
      {"http: { token_file: \"\" }\n", "'token_file' must not be empty"},
  };
  for (const auto& c : cases) {
    auto r = load_config_text(config_with(c.http), "t.yaml");
    ASSERT_FALSE(r.ok()) << c.http;
    EXPECT_NE(r.errors.front().message.find(c.message), std::string::npos) << r.errors.front().to_string();
  }
  auto misspelt = load_config_text(config_with("http: { listne: \"127.0.0.1:8088\" }\n"), "t.yaml");
  ASSERT_FALSE(misspelt.ok());
  EXPECT_NE(misspelt.errors.front().message.find("listen"), std::string::npos) << misspelt.errors.front().to_string();
}

}  // namespace
}  // namespace dewmargin
