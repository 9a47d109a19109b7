#pragma once
// The JSON vocabulary every JSON writer shares (summary.json and the studies' files).
#include <string>

#include <nlohmann/json.hpp>

namespace linkrise::app {

/// {"value": x, "unit": u}; a value that is not finite is null.
nlohmann::json quantity(double value, const std::string& unit);

/// A JSON file's text: indented by two spaces, ending with a newline.
std::string json_text(const nlohmann::json& value);

}  // namespace linkrise::app
