#include <arpa/inet.h>
#include <gtest/gtest.h>
#include <netinet/in.h>
#include <netinet/tcp.h>
#include <sys/socket.h>
#include <unistd.h>

#include "dewmargin/tcp_nodelay.h"

namespace dewmargin {
namespace {

TEST(BrokerUriPort, ReadsThePortOrTheSchemesDefault) {
  EXPECT_EQ(broker_uri_port("tcp://127.0.0.1:1883"), 1883);
  EXPECT_EQ(broker_uri_port("tcp://broker.local:21883"), 21883);
  EXPECT_EQ(broker_uri_port("mqtt://broker.local"), 1883);
  EXPECT_EQ(broker_uri_port("ssl://broker.local"), 8883);
  EXPECT_EQ(broker_uri_port("mqtts://broker.local:9883"), 9883);
  EXPECT_EQ(broker_uri_port("ssl://[::1]:8884"), 8884);
  EXPECT_EQ(broker_uri_port("tcp://[::1]"), 1883);
  EXPECT_EQ(broker_uri_port("tcp://host:0"), 0);
  EXPECT_EQ(broker_uri_port("tcp://host:70000"), 0);
  EXPECT_EQ(broker_uri_port("tcp://host:12ab"), 0);
  EXPECT_EQ(broker_uri_port("no scheme"), 0);
}

// A loopback listener, a client connected to it: the option is set on the client's socket
// (its peer is the listener's port) and on nothing else.
TEST(TcpNodelay, SetsTheOptionOnSocketsConnectedToThePeerPort) {
  const int listener = socket(AF_INET, SOCK_STREAM, 0);
  ASSERT_GE(listener, 0);
  sockaddr_in addr{};
  addr.sin_family = AF_INET;
  addr.sin_addr.s_addr = htonl(INADDR_LOOPBACK);
  ASSERT_EQ(bind(listener, reinterpret_cast<sockaddr*>(&addr), sizeof addr), 0);
  ASSERT_EQ(listen(listener, 1), 0);
  socklen_t len = sizeof addr;
  ASSERT_EQ(getsockname(listener, reinterpret_cast<sockaddr*>(&addr), &len), 0);
  const int port = ntohs(addr.sin_port);

  const int client = socket(AF_INET, SOCK_STREAM, 0);
  ASSERT_EQ(connect(client, reinterpret_cast<sockaddr*>(&addr), sizeof addr), 0);
  const int accepted = accept(listener, nullptr, nullptr);
  ASSERT_GE(accepted, 0);

  auto nodelay = [](int fd) {
    int value = 0;
    socklen_t size = sizeof value;
    getsockopt(fd, IPPROTO_TCP, TCP_NODELAY, &value, &size);
    return value != 0;
  };
  ASSERT_FALSE(nodelay(client));
  EXPECT_EQ(set_tcp_nodelay_to_peer(port), 1);
  EXPECT_TRUE(nodelay(client));
  EXPECT_FALSE(nodelay(accepted));  // its peer is the client's port
  EXPECT_EQ(set_tcp_nodelay_to_peer(port == 65535 ? 65534 : port + 1), 0);

  close(accepted);
  close(client);
  close(listener);
}

}  // namespace
}  // namespace dewmargin
