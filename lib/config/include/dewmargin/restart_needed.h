#pragma once
// Config reload (SIGHUP): zones, loops, thresholds and rules take effect at once; the
// settings named here are read only at start (the broker connection, the history file,
// the topics subscribed or published under, the clock) and need a restart.
#include <string>
#include <vector>

#include "dewmargin/config.h"

namespace dewmargin {

// One entry per setting that differs between `old` and `fresh` and needs a restart, in
// config order: "broker.uri", "broker.tls.ca_file", "storage.keep_events_days",
// "input topic 'bldg/l2e/rh' (new)", ... Empty when the reload takes full effect.
[[nodiscard]] std::vector<std::string> restart_needed(const site_config& old, const site_config& fresh);

// `fresh` with the settings read only at start taken from `running` (broker, storage, publish
// prefix, clock source, http): a reload applies the rest at once and never half-applies these
// (a new prefix in the core while the status topic, the will and the subscriptions stay on the
// old one). Warn with restart_needed() first.
[[nodiscard]] site_config with_start_settings_of(const site_config& running, site_config fresh);

// The topics `fresh` reads that `old` does not (not subscribed until a restart). A reload with
// any is refused as a whole: a zone reading a topic nobody receives would be half-applied.
[[nodiscard]] std::vector<std::string> new_input_topics(const site_config& old, const site_config& fresh);

// Every topic the config reads (inputs of loops and zones), each once, in config order.
[[nodiscard]] std::vector<std::string> input_topics(const site_config& config);

}  // namespace dewmargin
