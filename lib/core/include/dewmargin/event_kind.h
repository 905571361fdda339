#pragma once
// The kinds of event on <prefix>/events (design.md "Topics it publishes"), named once:
// the engine, the store and the command line all take their names from here.
#include <array>
#include <optional>
#include <string>
#include <string_view>

namespace dewmargin {

enum class event_kind { band, ack, shelve, unshelve, valve, setpoint, dehumidify, input, rejected, service };

inline constexpr std::array<event_kind, 10> k_event_kinds = {
    event_kind::band,     event_kind::ack,        event_kind::shelve, event_kind::unshelve, event_kind::valve,
    event_kind::setpoint, event_kind::dehumidify, event_kind::input,  event_kind::rejected, event_kind::service};

const char* event_kind_name(event_kind k);
// The kind named `text` exactly (lower case, as published); empty when there is none.
std::optional<event_kind> parse_event_kind(std::string_view text);
// "band, ack, shelve, ...": for help texts and error messages.
std::string event_kind_list();

}  // namespace dewmargin
