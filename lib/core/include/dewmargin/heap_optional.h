#pragma once
// An optional value kept on the heap: 8 bytes when empty, where std::optional<T> takes
// sizeof(T) and more whether or not the value is there. For config parts that most zones leave
// out: a condensation switch and a window contact are 144 bytes each as
// std::optional<input_config>, 288 bytes of every zone record (2.7 MB at 10,000 zones). The
// interface is std::optional's, as far as the config's users need it; a copy copies the value.
#include <memory>
#include <optional>
#include <utility>

namespace dewmargin {

template <typename T>
class heap_optional {
 public:
  heap_optional() = default;
  heap_optional(std::nullopt_t) noexcept {}  // NOLINT(google-explicit-constructor): as std::optional
  heap_optional(T value) : value_(std::make_unique<T>(std::move(value))) {}  // NOLINT: as std::optional
  heap_optional(std::optional<T> value) {                                    // NOLINT: as std::optional
    if (value) value_ = std::make_unique<T>(std::move(*value));
  }
  heap_optional(const heap_optional& other) : value_(other.value_ ? std::make_unique<T>(*other.value_) : nullptr) {}
  heap_optional(heap_optional&&) noexcept = default;
  heap_optional& operator=(const heap_optional& other) {
    if (this != &other) value_ = other.value_ ? std::make_unique<T>(*other.value_) : nullptr;
    return *this;
  }
  heap_optional& operator=(heap_optional&&) noexcept = default;
  heap_optional& operator=(std::nullopt_t) noexcept {
    value_.reset();
    return *this;
  }
  ~heap_optional() = default;

  [[nodiscard]] bool has_value() const noexcept { return value_ != nullptr; }
  explicit operator bool() const noexcept { return has_value(); }

  T& operator*() { return *value_; }
  const T& operator*() const { return *value_; }
  T* operator->() { return value_.get(); }
  const T* operator->() const { return value_.get(); }
  T& value() {
    if (!value_) throw std::bad_optional_access();
    return *value_;
  }
  [[nodiscard]] const T& value() const {
    if (!value_) throw std::bad_optional_access();
    return *value_;
  }
  void reset() noexcept { value_.reset(); }
  template <typename... Args>
  T& emplace(Args&&... args) {
    value_ = std::make_unique<T>(std::forward<Args>(args)...);
    return *value_;
  }

 private:
  std::unique_ptr<T> value_;
};

}  // namespace dewmargin
