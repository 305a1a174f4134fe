// One way to fail: every library call that can fail returns Expected<T>,
// which holds either a value or an Error naming the input and the cause.
// Errors are values; nothing is thrown across the library boundary.
#pragma once

#include <string>
#include <type_traits>
#include <utility>
#include <variant>

namespace clipwarden {

// What went wrong, in the terms the CLI maps to an exit status.
enum class ErrorKind {
  usage,     // bad arguments or a bad policy/manifest (exit 2)
  input,     // an input could not be read or decoded (exit 3)
  output,    // a result could not be written
  internal,  // a bug or an unexpected library failure
};

struct Error {
  ErrorKind kind = ErrorKind::internal;
  std::string subject;  // the file, key or argument at fault
  std::string cause;    // one sentence, no trailing period

  // "subject: cause", the one line the CLI prints.
  std::string message() const { return subject.empty() ? cause : subject + ": " + cause; }
};

inline Error input_error(std::string subject, std::string cause) {
  return {ErrorKind::input, std::move(subject), std::move(cause)};
}
inline Error usage_error(std::string subject, std::string cause) {
  return {ErrorKind::usage, std::move(subject), std::move(cause)};
}
inline Error output_error(std::string subject, std::string cause) {
  return {ErrorKind::output, std::move(subject), std::move(cause)};
}

struct Ok {};

// A value or an Error. Deliberately small: check with ok(), then use value()
// or error(). Accessing the wrong side is a programming error (asserts).
// Its bool test means "no error", never the value: a call with two outcomes
// besides failing returns an enum naming both (as ClipSource::read does),
// since `if (!result)` on an Expected<bool> reads like either.
template <class T>
class [[nodiscard]] Expected {
  static_assert(!std::is_same_v<std::remove_cv_t<T>, bool>,
                "Expected<bool> can be misread as success; return an enum that names both outcomes");

 public:
  Expected(T value) : state_(std::move(value)) {}
  Expected(Error error) : state_(std::move(error)) {}

  bool ok() const { return state_.index() == 0; }
  explicit operator bool() const { return ok(); }

  T& value() & { return std::get<0>(state_); }
  const T& value() const& { return std::get<0>(state_); }
  T&& value() && { return std::get<0>(std::move(state_)); }
  const Error& error() const { return std::get<1>(state_); }

  T* operator->() { return &value(); }
  const T* operator->() const { return &value(); }
  T& operator*() & { return value(); }
  const T& operator*() const& { return value(); }

 private:
  std::variant<T, Error> state_;
};

using Status = Expected<Ok>;

}  // namespace clipwarden
