#include "app/output/json_fields.h"

#include <cmath>

#include "linkrise/version.h"

namespace linkrise::app {

nlohmann::json quantity(double value, const std::string& unit) {
  nlohmann::json q;
  q["value"] = std::isfinite(value) ? nlohmann::json(value) : nlohmann::json(nullptr);
  q["unit"] = unit;
  return q;
}

nlohmann::json with_file_head(nlohmann::json fields, const std::string& case_title, const std::string& case_file) {
  fields["tool"] = {{"name", "linkrise"}, {"version", kVersion}};
  fields["case"] = {{"title", case_title}, {"file", case_file}};
  return fields;
}

std::string json_text(const nlohmann::json& value) { return value.dump(2) + "\n"; }

}  // namespace linkrise::app
