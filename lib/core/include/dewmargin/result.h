#pragma once
// A small expected-like result type: C++17 has no std::expected. Expected failures
// are values the caller must look at, never a silent NaN or an exception.
#include <optional>
#include <string>
#include <utility>
#include <variant>

namespace dewmargin {

enum class error_code {
  not_finite,         // NaN or infinity given
  out_of_range,       // a value outside the stated validity range
  invalid_argument,   // a value that makes no physical sense (RH <= 0, vapour pressure <= 0)
  parse_error,        // text that is not what was expected
};

struct error {
  error_code code;
  std::string message;  // one line, names the offending value
};

// E is the error type: `error` for the core, `store_error` for the history store
// (`store_result<T>` is `result<T, store_error>`). T and E must differ.
template <typename T, typename E = error>
class [[nodiscard]] result {
 public:
  result(T value) : state_(std::move(value)) {}  // NOLINT: implicit on purpose
  result(E err) : state_(std::move(err)) {}      // NOLINT: implicit on purpose

  [[nodiscard]] bool ok() const noexcept { return state_.index() == 0; }
  explicit operator bool() const noexcept { return ok(); }

  [[nodiscard]] const T& value() const& { return std::get<0>(state_); }
  [[nodiscard]] T& value() & { return std::get<0>(state_); }
  [[nodiscard]] T&& value() && { return std::get<0>(std::move(state_)); }
  [[nodiscard]] const E& err() const& { return std::get<1>(state_); }

 private:
  std::variant<T, E> state_;
};

inline error make_error(error_code code, std::string message) { return error{code, std::move(message)}; }

}  // namespace dewmargin
