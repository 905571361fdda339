#include <gtest/gtest.h>

#include "tcp_probe.h"

namespace dewmargin::detail {
namespace {

struct split_case {
  const char* uri;
  const char* host;  // nullptr: no valid address
  const char* port;
};

TEST(BrokerUri, SplitsHostAndPort) {
  for (const split_case c : {split_case{"tcp://127.0.0.1:1883", "127.0.0.1", "1883"},
                             split_case{"ssl://broker.example:8884", "broker.example", "8884"},
                             split_case{"ssl://broker.example", "broker.example", "8883"},
                             split_case{"tcp://broker.example", "broker.example", "1883"},
                             split_case{"tcp://[::1]:1884", "::1", "1884"}, split_case{"ssl://[::1]", "::1", "8883"},
                             split_case{"tcp://h:1883/ignored", "h", "1883"}, split_case{"tcp://", nullptr, nullptr},
                             split_case{"tcp://[::1", nullptr, nullptr}, split_case{"no-scheme", nullptr, nullptr}}) {
    const auto hp = split_broker_uri(c.uri);
    if (c.host == nullptr) {
      EXPECT_FALSE(hp) << c.uri;
      continue;
    }
    ASSERT_TRUE(hp) << c.uri;
    EXPECT_EQ(hp->host, c.host) << c.uri;
    EXPECT_EQ(hp->port, c.port) << c.uri;
  }
}

}  // namespace
}  // namespace dewmargin::detail
