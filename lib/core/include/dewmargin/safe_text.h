#pragma once
// Text from outside (payloads, topics, config values, command fields, file contents) is
// made safe here, in one place, before it is quoted in a message, a JSON document or a
// log line: ill-formed UTF-8 becomes U+FFFD, control characters are written as escapes,
// and excerpts are cut between characters, never inside one.
#include <cstddef>
#include <string>
#include <string_view>

namespace dewmargin {

// Byte offset of the first ill-formed UTF-8 sequence (RFC 3629: no overlong forms, no
// surrogates, nothing above U+10FFFF), or std::string_view::npos when `s` is valid.
[[nodiscard]] std::size_t first_invalid_utf8(std::string_view s);
[[nodiscard]] inline bool is_valid_utf8(std::string_view s) { return first_invalid_utf8(s) == std::string_view::npos; }

// Valid UTF-8: each maximal ill-formed subpart is replaced by one U+FFFD (the practice
// the Unicode Standard recommends, chapter 3.9, "U+FFFD Substitution of Maximal Subparts").
[[nodiscard]] std::string to_valid_utf8(std::string_view s);

// Valid UTF-8 fit for one log line or a quoted value in a message: C0 controls, DEL and
// C1 controls are written as escapes (\n, \r, \t, \xNN, \u0085), so no byte of the text
// can end a line, move a terminal's cursor or be taken for something else.
[[nodiscard]] std::string printable_text(std::string_view s);

// printable_text() of at most `max_bytes` of `s` (counted after the U+FFFD replacement),
// cut at a character boundary; "..." marks a cut.
[[nodiscard]] std::string text_excerpt(std::string_view s, std::size_t max_bytes);

// The first control character (U+0000-U+001F, U+007F) in `s`, or npos.
[[nodiscard]] std::size_t first_control_char(std::string_view s);

}  // namespace dewmargin
