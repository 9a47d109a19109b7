#pragma once
// The detection matrix as a JSON value, for the studies' JSON writers that embed it (window.json). Internal to
// the studies library: its public headers give JSON as text.
#include <nlohmann/json.hpp>

#include "app/studies/faults.h"

namespace linkrise::app {

nlohmann::json detection_matrix_json(const DetectionMatrix& matrix);

}  // namespace linkrise::app
