#pragma once
// The JSON vocabulary every JSON writer shares (summary.json and the studies' files).
#include <string>

#include <nlohmann/json.hpp>

namespace linkrise::app {

/// {"value": x, "unit": u}; a value that is not finite is null.
nlohmann::json quantity(double value, const std::string& unit);

/// `fields` with the head every JSON file of linkrise carries: "tool" (name and version; the one place a JSON
/// file takes the version from) and "case" (title and file).
nlohmann::json with_file_head(nlohmann::json fields, const std::string& case_title, const std::string& case_file);

/// A JSON file's text: indented by two spaces, ending with a newline.
std::string json_text(const nlohmann::json& value);

}  // namespace linkrise::app
