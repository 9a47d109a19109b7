#include "solver/waveform.h"

#include <stdexcept>

namespace linkrise::solver {

int Waveform::column(const std::string& name) const {
  for (std::size_t c = 0; c < headers_.size(); ++c) {
    const std::string& header = headers_[c];
    if (header == name) return static_cast<int>(c);
    if (header.size() > name.size() + 1 && header.compare(0, name.size(), name) == 0 && header[name.size()] == ' ' &&
        header[name.size() + 1] == '[')
      return static_cast<int>(c);
  }
  return -1;
}

void Waveform::reserve(std::size_t rows) {
  times_.reserve(rows);
  values_.reserve(rows * headers_.size());
}

void Waveform::restart(std::vector<std::string> headers) {
  headers_ = std::move(headers);
  times_.clear();
  values_.clear();
}

void Waveform::add_row(double time, const std::vector<double>& values) {
  if (values.size() != headers_.size()) throw std::logic_error("waveform row has the wrong width");
  times_.push_back(time);
  values_.insert(values_.end(), values.begin(), values.end());
}

void Waveform::truncate_after(double time) {
  std::size_t keep = times_.size();
  while (keep > 0 && times_[keep - 1] > time) --keep;
  times_.resize(keep);
  values_.resize(keep * headers_.size());
}

std::vector<double> Waveform::series(int column) const {
  std::vector<double> out(times_.size());
  for (std::size_t r = 0; r < times_.size(); ++r) out[r] = value(r, column);
  return out;
}

}  // namespace linkrise::solver
