#pragma once
// "Did you mean ...?" for misspelt keys and ids.
#include <cstddef>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace dewmargin::config_detail {

// Optimal string alignment distance: insertions, deletions, substitutions and
// swaps of two neighbouring characters each cost 1 ("mragin" is 1 from "margin").
[[nodiscard]] std::size_t edit_distance(std::string_view a, std::string_view b);

// The candidate closest to `word`, if it is close enough to be a likely typo
// (at most a third of the word's length, at least 1, at most 3 edits). Ties go to
// the earlier candidate.
[[nodiscard]] std::optional<std::string> nearest_word(std::string_view word,
                                                      const std::vector<std::string>& candidates);

}  // namespace dewmargin::config_detail
