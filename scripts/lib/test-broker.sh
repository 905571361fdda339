# shellcheck shell=bash
# A private mosquitto for scripts/demo and the end-to-end tests (tests/e2e): its own config in
# a directory of the caller, a free loopback port, started and stopped by PID. Source it:
#
#   source scripts/lib/test-broker.sh
#   test_broker_start "$work" "$work/mosquitto.log" || exit 1   # sets test_broker_pid, test_broker_port
#   test_broker_point_config config/demo.yaml "$work/demo.yaml" "$work/history.db" || exit 1
#   ...
#   test_broker_stop
#
# Ports come from 20000-32000, below the kernel's ephemeral range (as the C++ test brokers do,
# tests/integration/mosquitto_fixture.h): a port from bind(0) is soon handed to an outgoing
# connection. A port something else listens on is skipped; a broker that cannot bind is retried.
# As root, mosquitto drops to its own user: the directory and the config must be readable.

test_broker_pid=
test_broker_port=

# True when something accepts TCP connections on 127.0.0.1:$1.
test_broker_listening() { (exec 3<>"/dev/tcp/127.0.0.1/$1") 2>/dev/null; }

# test_broker_start DIR LOG: config in DIR, the broker's log in LOG. Returns 1 when no broker
# came up after five ports.
test_broker_start() {
  local dir=$1 log=$2 candidate attempt
  chmod 755 "$dir"
  for attempt in 1 2 3 4 5; do
    candidate=$((20000 + RANDOM % 12000))
    test_broker_listening "$candidate" && continue
    printf 'listener %s 127.0.0.1\nallow_anonymous true\npersistence false\nlog_dest stderr\nmax_queued_messages 0\n' \
      "$candidate" >"$dir/mosquitto.conf"
    # Extra broker settings, one per line (bench/run: set_tcp_nodelay true).
    [[ -n ${TEST_BROKER_EXTRA:-} ]] && printf '%s\n' "$TEST_BROKER_EXTRA" >>"$dir/mosquitto.conf"
    chmod 644 "$dir/mosquitto.conf"
    mosquitto -c "$dir/mosquitto.conf" 2>>"$log" &
    test_broker_pid=$!
    for _ in $(seq 100); do
      test_broker_listening "$candidate" && break
      kill -0 "$test_broker_pid" 2>/dev/null || break
      sleep 0.1
    done
    if kill -0 "$test_broker_pid" 2>/dev/null && test_broker_listening "$candidate"; then
      test_broker_port=$candidate
      return 0
    fi
    echo "test-broker: attempt $attempt on port $candidate failed" >>"$log"
    test_broker_stop
  done
  return 1
}

# Stops the broker this shell started, by its PID.
test_broker_stop() {
  [[ -n $test_broker_pid ]] || return 0
  kill "$test_broker_pid" 2>/dev/null || true
  wait "$test_broker_pid" 2>/dev/null || true
  test_broker_pid=
}

# test_broker_point_config SRC DEST DB: a copy of the service config SRC that talks to this
# broker and keeps its history in DB. SRC must name tcp://127.0.0.1:1883 and a `path:` under
# `storage:` (config/demo.yaml and config/clinic.yaml do).
test_broker_point_config() {
  local src=$1 dest=$2 db=$3
  sed -E -e "s#tcp://127\.0\.0\.1:1883#tcp://127.0.0.1:$test_broker_port#" \
    -e "/^storage:/,/^[^ ]/ s#^(  path:).*#\1 $db#" "$src" >"$dest"
  if ! grep -q "tcp://127.0.0.1:$test_broker_port" "$dest" || ! grep -q "path: $db" "$dest"; then
    echo "test-broker: could not point $src at the test broker and $db" >&2
    return 1
  fi
}
