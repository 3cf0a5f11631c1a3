// The analysis' view of a streamed grid (pattern_stream.h).
#include "engine/pattern_stream.h"

#include <algorithm>
#include <cmath>

#include "engine/check.h"
#include "engine/error.h"

namespace lobecast {
namespace {

// 0, 1, m, 2m, ... and the last index. Index 1 is kept because the analysis takes
// its search steps from the first grid step (RefinePeak, engine/analysis/beam.cpp):
// with it the searches start as on the whole grid.
std::vector<std::size_t> EveryMth(std::size_t count, std::size_t m) {
  std::vector<std::size_t> out;
  for (std::size_t i = 0; i < count; i += m) {
    out.push_back(i);
    if (i == 0 && m > 1 && count > 1) out.push_back(1);
  }
  if (out.back() != count - 1) out.push_back(count - 1);
  return out;
}

std::size_t CountEveryMth(std::size_t count, std::size_t m) {
  return (count - 1) / m + 1 + ((count - 1) % m != 0 ? 1 : 0) + (m > 1 && count > 2 ? 1 : 0);
}

// The sorted union of `sampled` and `extra`, and whether `extra` was new.
std::vector<std::size_t> With(std::vector<std::size_t> sampled, std::size_t extra) {
  if (!std::binary_search(sampled.begin(), sampled.end(), extra)) {
    sampled.insert(std::upper_bound(sampled.begin(), sampled.end(), extra), extra);
  }
  return sampled;
}

}  // namespace

PatternSampler::PatternSampler(const AngularGrid& grid, std::size_t max_directions) : grid_(grid) {
  const std::size_t nt = grid.theta_deg.size(), np = grid.phi_deg.size();
  if (nt == 0 || np == 0) throw InvalidArgument("grid: found no directions, expected at least one");
  if (max_directions == 0) {
    throw InvalidArgument("view: found 0 directions, expected at least 1");
  }
  const double ratio =
      static_cast<double>(nt) * static_cast<double>(np) / static_cast<double>(max_directions);
  stride_ = ratio <= 1 ? 1 : static_cast<std::size_t>(std::ceil(std::sqrt(ratio)));
  // Long thin grids (few rows, many columns) need a larger stride than the square root.
  const auto count = [&](std::size_t m) {
    return static_cast<double>(CountEveryMth(nt, m)) * static_cast<double>(CountEveryMth(np, m));
  };
  // (At a stride of max(nt, np) only the first and last of each are left: 4.)
  while (count(stride_) > static_cast<double>(max_directions) && stride_ < std::max(nt, np)) {
    stride_ += std::max<std::size_t>(1, stride_ / 8);
  }
  rows_ = EveryMth(nt, stride_);
  columns_ = EveryMth(np, stride_);
  row_slot_.assign(nt, -1);
  for (std::size_t k = 0; k < rows_.size(); ++k) row_slot_[rows_[k]] = static_cast<long>(k);
  const auto size = static_cast<Eigen::Index>(rows_.size() * columns_.size());
  e_theta_.resize(size);
  e_phi_.resize(size);
}

void PatternSampler::Add(std::size_t first_row, const PatternResult& rows) {
  const std::size_t np = grid_.phi_deg.size();
  const std::size_t count = rows.grid.theta_deg.size();
  LOBECAST_CHECK_EQ(rows.grid.phi_deg.size(), np);
  LOBECAST_CHECK_LE(first_row + count, grid_.theta_deg.size());
  LOBECAST_CHECK_EQ(static_cast<std::size_t>(rows.directivity.size()), count * np);
  const std::size_t nc = columns_.size();
  for (std::size_t r = 0; r < count; ++r) {
    const long slot = row_slot_[first_row + r];
    if (slot < 0) continue;
    for (std::size_t j = 0; j < nc; ++j) {
      const auto to = static_cast<Eigen::Index>(static_cast<std::size_t>(slot) * nc + j);
      const auto from = static_cast<Eigen::Index>(r * np + columns_[j]);
      e_theta_[to] = rows.field.e_theta[from];
      e_phi_[to] = rows.field.e_phi[from];
    }
  }
  peak_.Add(first_row * np, rows.directivity);
  // Keep the full row of every peak candidate (new ones are in this block), drop
  // the rows no candidate is in any more.
  std::map<std::size_t, FarField> kept;
  for (std::size_t index : peak_.candidate_indices()) {
    const std::size_t row = index / np;
    if (kept.count(row)) continue;
    const auto old = candidate_rows_.find(row);
    if (old != candidate_rows_.end()) {
      kept[row] = std::move(old->second);
      continue;
    }
    LOBECAST_CHECK(row >= first_row && row < first_row + count);
    FarField& f = kept[row];
    const auto at = static_cast<Eigen::Index>((row - first_row) * np);
    f.e_theta = rows.field.e_theta.segment(at, static_cast<Eigen::Index>(np));
    f.e_phi = rows.field.e_phi.segment(at, static_cast<Eigen::Index>(np));
  }
  candidate_rows_ = std::move(kept);
}

PatternResult PatternSampler::Finish(const Array& array, const Eigen::VectorXcd& currents,
                                     const PatternResult& header, FieldOptions field) const {
  const std::size_t np = grid_.phi_deg.size();
  const std::size_t peak = peak_.index();
  const std::size_t peak_row = peak / np, peak_column = peak % np;
  const auto found = candidate_rows_.find(peak_row);
  LOBECAST_CHECK(found != candidate_rows_.end());
  const FarField& peak_field = found->second;
  const std::vector<std::size_t> rows = With(rows_, peak_row);
  const std::vector<std::size_t> columns = With(columns_, peak_column);
  const bool column_added = columns.size() != columns_.size();

  // The peak's column on the other rows, when no block kept it: exact sums.
  FarField exact;
  std::vector<std::size_t> exact_rows;
  if (column_added) {
    AngularGrid g;
    for (std::size_t row : rows) {
      if (row == peak_row) continue;
      exact_rows.push_back(row);
      g.theta_deg.push_back(grid_.theta_deg[row]);
    }
    g.phi_deg = {grid_.phi_deg[peak_column]};
    if (!exact_rows.empty()) {
      field.method = FieldMethod::kDirect;
      exact = FieldPlan(array, Directions::FromGrid(g), field).Execute(currents);
    }
  }

  PatternResult view;
  for (std::size_t row : rows) view.grid.theta_deg.push_back(grid_.theta_deg[row]);
  for (std::size_t column : columns) view.grid.phi_deg.push_back(grid_.phi_deg[column]);
  const std::size_t nc = columns.size();
  const auto size = static_cast<Eigen::Index>(rows.size() * nc);
  view.field.e_theta.resize(size);
  view.field.e_phi.resize(size);
  for (std::size_t i = 0; i < rows.size(); ++i) {
    const long slot = row_slot_[rows[i]];
    for (std::size_t j = 0; j < nc; ++j) {
      const auto to = static_cast<Eigen::Index>(i * nc + j);
      if (rows[i] == peak_row) {
        view.field.e_theta[to] = peak_field.e_theta[static_cast<Eigen::Index>(columns[j])];
        view.field.e_phi[to] = peak_field.e_phi[static_cast<Eigen::Index>(columns[j])];
        continue;
      }
      const auto sampled = std::lower_bound(columns_.begin(), columns_.end(), columns[j]);
      if (sampled != columns_.end() && *sampled == columns[j]) {
        LOBECAST_CHECK_GE(slot, 0L);
        const auto from =
            static_cast<Eigen::Index>(static_cast<std::size_t>(slot) * columns_.size() +
                                      static_cast<std::size_t>(sampled - columns_.begin()));
        view.field.e_theta[to] = e_theta_[from];
        view.field.e_phi[to] = e_phi_[from];
        continue;
      }
      const auto k = static_cast<Eigen::Index>(
          std::lower_bound(exact_rows.begin(), exact_rows.end(), rows[i]) - exact_rows.begin());
      view.field.e_theta[to] = exact.e_theta[k];
      view.field.e_phi[to] = exact.e_phi[k];
    }
  }
  view.resistance_ohm = header.resistance_ohm;
  view.active_resistance_ohm = header.active_resistance_ohm;
  view.radiated_power_w = header.radiated_power_w;
  view.field_floor_v = header.field_floor_v;
  view.summary = header.summary;
  DeriveFromField(view, field.num_threads);
  return view;
}

}  // namespace lobecast
