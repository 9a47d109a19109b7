#include "app/studies/study_tolerances.h"

#include "app/studies/random_stream.h"

namespace linkrise::app {

double draw(const Tolerance& tolerance, double u) {
  if (tolerance.shape == Tolerance::Shape::Normal) {
    return truncated_normal(u, tolerance.centre, tolerance.sigma, tolerance.lower, tolerance.upper);
  }
  return tolerance.lower + u * (tolerance.upper - tolerance.lower);
}

}  // namespace linkrise::app
