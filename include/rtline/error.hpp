// rtline's one error type for bad input, and the error for "no design meets the constraints".
// Both are thrown where the input is read and caught once, in the program's main.
#pragma once

#include <stdexcept>
#include <string>

namespace rtline {

// Bad input: names the field (a flag, file field or key), the offending text and why it is wrong.
class InputError : public std::runtime_error {
public:
    InputError(std::string field, std::string value, std::string why);

    [[nodiscard]] const std::string& field() const noexcept { return field_; }
    [[nodiscard]] const std::string& value() const noexcept { return value_; }
    [[nodiscard]] const std::string& why() const noexcept { return why_; }

private:
    std::string field_;
    std::string value_;
    std::string why_;
};

// A search found no candidate that meets the constraints (exit code 1).
class InfeasibleError : public std::runtime_error {
public:
    explicit InfeasibleError(const std::string& what) : std::runtime_error(what) {}
};

// Formats a number for an error message with enough digits to be recognisable (%.6g).
[[nodiscard]] std::string describe(double value);

}  // namespace rtline
