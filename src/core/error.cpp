#include "rtline/error.hpp"

#include <cstdio>

namespace rtline {

namespace {
std::string compose(const std::string& field, const std::string& value, const std::string& why) {
    std::string text = field;
    if (!value.empty()) {
        text += " '" + value + "'";
    }
    return text + ": " + why;
}
}  // namespace

InputError::InputError(std::string field, std::string value, std::string why)
    : std::runtime_error(compose(field, value, why)),
      field_(std::move(field)),
      value_(std::move(value)),
      why_(std::move(why)) {}

std::string describe(double value) {
    char buffer[32];
    std::snprintf(buffer, sizeof buffer, "%.6g", value);
    return buffer;
}

}  // namespace rtline
