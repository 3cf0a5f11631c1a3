// Lattice detection and the lattice's type-2 sum (lattice.h).
#include "engine/field/lattice.h"
#include "engine/threads.h"

#include <algorithm>
#include <cmath>
#include <complex>
#include <sstream>
#include <utility>

#include <omp.h>

#include "engine/check.h"
#include "engine/error.h"
#include "engine/field/sincos.h"

namespace lobecast {
namespace {

using Complex = std::complex<double>;

constexpr int kMaxPitchDivisor = 8;

struct Axis {
  double origin = 0, pitch = 0;
  int sites = 1;
};

// The lattice of one coordinate, or std::nullopt.
std::optional<Axis> FindAxis(std::vector<double> v, double max_offset, double max_sites) {
  for (double x : v) {
    if (!std::isfinite(x)) return std::nullopt;
  }
  std::sort(v.begin(), v.end());
  const double lo = v.front(), span = v.back() - lo;
  if (span <= 2.0 * max_offset) return Axis{lo + 0.5 * span, 0.0, 1};
  // Distinct values (merged within max_offset) and the smallest gap between them.
  std::vector<double> distinct{v.front()};
  for (double x : v) {
    if (x - distinct.back() > max_offset) distinct.push_back(x);
  }
  double gap = span;
  for (std::size_t i = 1; i < distinct.size(); ++i)
    gap = std::min(gap, distinct[i] - distinct[i - 1]);
  for (int m = 1; m <= kMaxPitchDivisor; ++m) {
    const double steps = std::nearbyint(span / (gap / m));
    if (steps + 1 > max_sites) return std::nullopt;
    const double pitch = span / steps;  // the end points are sites exactly
    bool fits = true;
    for (double x : distinct) {
      const double n = (x - lo) / pitch;
      if (std::abs(n - std::nearbyint(n)) * pitch > max_offset) {
        fits = false;
        break;
      }
    }
    if (fits) return Axis{lo, pitch, static_cast<int>(steps) + 1};
  }
  return std::nullopt;
}

// At most this many layers: each costs a pass over every target, so a cube of
// few sites per side must not become hundreds of zero-dimensional transforms.
constexpr int kMaxLayers = 16;
// One layer's fixed cost per target (phase, accumulation, a pass of the
// interpolation loop) in kernel-point units: about 80 ns against 2 ns
// (tests/bench, this machine's AVX-512 build).
constexpr double kLayerCostInKernelPoints = 40.0;

// Which dimensions are summed layer by layer for a kernel w cells wide. Layering
// a dimension of m sites turns one interpolation of w^a kernel points per target
// (a transformed dimensions) into m of w^(a-1); it is done when that is cheaper
// with the layers' fixed cost counted, fewest sites first, while the layers
// multiply to at most kMaxLayers.
std::array<bool, 3> LayeredDimensions(const AxisLattice& lattice, int w) {
  std::array<int, 3> by_sites{0, 1, 2};
  std::stable_sort(by_sites.begin(), by_sites.end(), [&](int a, int b) {
    return lattice.sites[static_cast<std::size_t>(a)] < lattice.sites[static_cast<std::size_t>(b)];
  });
  std::array<bool, 3> layered{false, false, false};
  int active = 0;
  for (int m : lattice.sites) active += m > 1 ? 1 : 0;
  int layers = 1;
  for (int d : by_sites) {
    const int m = lattice.sites[static_cast<std::size_t>(d)];
    if (m == 1 || layers * m > kMaxLayers) continue;
    const double transformed = std::pow(w, active) + kLayerCostInKernelPoints;
    const double as_layers = m * (std::pow(w, active - 1) + kLayerCostInKernelPoints);
    if (as_layers < transformed) {
      layered[static_cast<std::size_t>(d)] = true;
      layers *= m;
      --active;
    }
  }
  return layered;
}

}  // namespace

std::optional<AxisLattice> FindAxisLattice(const Eigen::Matrix3Xd& points, double max_offset,
                                           double max_sites) {
  if (points.cols() == 0 || !(max_offset >= 0)) return std::nullopt;
  max_sites = std::min(max_sites, 2e9);  // site numbers are ints
  AxisLattice lat;
  for (int d = 0; d < 3; ++d) {
    const std::optional<Axis> axis = FindAxis(
        std::vector<double>(points.row(d).begin(), points.row(d).end()), max_offset, max_sites);
    if (!axis) return std::nullopt;
    lat.origin[d] = axis->origin;
    lat.pitch[d] = axis->pitch;
    lat.sites[static_cast<std::size_t>(d)] = axis->sites;
  }
  if (lat.num_sites() > max_sites) return std::nullopt;
  lat.index.resize(static_cast<std::size_t>(points.cols()));
  for (Eigen::Index j = 0; j < points.cols(); ++j) {
    Eigen::Vector3d offset;
    for (int d = 0; d < 3; ++d) {
      const auto u = static_cast<std::size_t>(d);
      const double x = points(d, j) - lat.origin[d];
      const int n = lat.sites[u] == 1 ? 0 : static_cast<int>(std::nearbyint(x / lat.pitch[d]));
      lat.index[static_cast<std::size_t>(j)][u] = n;
      offset[d] = x - n * lat.pitch[d];
    }
    lat.max_offset = std::max(lat.max_offset, offset.norm());
  }
  if (lat.max_offset > max_offset * std::sqrt(3.0)) return std::nullopt;
  return lat;
}

LatticeShape LatticeSum::ShapeFor(const AxisLattice& lattice, double tolerance) {
  const int w = Nufft2::GeometryFor({1, 1, 1}, tolerance).kernel_width;
  const std::array<bool, 3> layered = LayeredDimensions(lattice, w);
  LatticeShape shape;
  std::array<int, 3> modes{1, 1, 1};
  int slot = 2;  // transformed dimensions fill the last slots, in order
  for (int d = 2; d >= 0; --d) {
    const int m = lattice.sites[static_cast<std::size_t>(d)];
    if (m == 1) continue;
    if (layered[static_cast<std::size_t>(d)]) {
      shape.layers *= m;
    } else {
      modes[static_cast<std::size_t>(slot--)] = m;
    }
  }
  shape.per_layer = Nufft2::GeometryFor(modes, tolerance);
  return shape;
}

LatticeSum::LatticeSum(const AxisLattice& lattice, const Eigen::Matrix3Xd& targets,
                       const NufftOptions& options)
    : shape_(ShapeFor(lattice, options.tolerance)),
      num_points_(lattice.index.size()),
      num_threads_(options.num_threads) {
  const int w = shape_.per_layer.kernel_width;
  const std::array<bool, 3> layered = LayeredDimensions(lattice, w);
  // Mode slots: trivial and layered dimensions first, transformed ones last (the
  // order ShapeFor fills them in), so the innermost grid loop is a transformed one.
  std::array<int, 3> modes{1, 1, 1};
  std::vector<int> transformed;
  for (int d = 0; d < 3; ++d) {
    const int m = lattice.sites[static_cast<std::size_t>(d)];
    if (m == 1) continue;
    if (layered[static_cast<std::size_t>(d)]) {
      layered_.push_back(d);
      layered_sites_.push_back(m);
    } else {
      transformed.push_back(d);
    }
  }
  int slot = 3 - static_cast<int>(transformed.size());
  std::array<bool, 3> used{false, false, false};
  for (int d : transformed) {
    order_[static_cast<std::size_t>(slot)] = d;
    modes[static_cast<std::size_t>(slot)] = lattice.sites[static_cast<std::size_t>(d)];
    used[static_cast<std::size_t>(d)] = true;
    ++slot;
  }
  slot = 0;
  for (int d = 0; d < 3; ++d) {
    if (!used[static_cast<std::size_t>(d)]) order_[static_cast<std::size_t>(slot++)] = d;
  }

  // Per point: its layer (mixed radix over the layered dimensions) and its row in
  // the layer's mode array (Nufft2's layout over the slots).
  point_layer_.resize(num_points_);
  point_row_.resize(num_points_);
  for (std::size_t j = 0; j < num_points_; ++j) {
    const std::array<int, 3>& n = lattice.index[j];
    int layer = 0;
    for (int d : layered_)
      layer = layer * lattice.sites[static_cast<std::size_t>(d)] + n[static_cast<std::size_t>(d)];
    Eigen::Index row = 0;
    for (std::size_t i = 0; i < 3; ++i) {
      const auto d = static_cast<std::size_t>(order_[i]);
      row = row * modes[i] + (modes[i] == 1 ? 0 : n[d]);
    }
    point_layer_[j] = layer;
    point_row_[j] = row;
  }

  // Targets: t_d = s_d a_d in slot order for the transform; the layered ones kept
  // for the layer phases exp(i sum t_d n_d).
  const Eigen::Index nk = targets.cols();
  Eigen::Matrix3Xd t = Eigen::Matrix3Xd::Zero(3, nk);
  layer_targets_.resize(static_cast<Eigen::Index>(layered_.size()), nk);
  target_factor_.resize(nk);
  double s_max = 0;
  for (Eigen::Index k = 0; k < nk; ++k) {
    s_max = std::max(s_max, targets.col(k).norm());
    double phase = targets.col(k).dot(lattice.origin);
    for (std::size_t i = 0; i < 3; ++i) {
      const int d = order_[i];
      if (modes[i] == 1) continue;
      t(static_cast<Eigen::Index>(i), k) = targets(d, k) * lattice.pitch[d];
      phase += t(static_cast<Eigen::Index>(i), k) * (modes[i] / 2);
    }
    for (std::size_t l = 0; l < layered_.size(); ++l) {
      const int d = layered_[l];
      layer_targets_(static_cast<Eigen::Index>(l), k) = targets(d, k) * lattice.pitch[d];
    }
    target_factor_[k] = Complex(std::cos(phase), std::sin(phase));
  }
  representation_error_ = s_max * lattice.max_offset;
  modes_ = modes;
  origin_ = lattice.origin;
  pitch_ = lattice.pitch;
  layer_sum_ = std::make_unique<const Nufft2>(modes, std::move(t), options);
}

void LatticeSum::CheckRows(const Eigen::MatrixXcd& m, std::size_t rows, const char* what) const {
  if (static_cast<std::size_t>(m.rows()) != rows || m.cols() < 1 || m.cols() > 3) {
    std::ostringstream s;
    s << "lattice sum " << what << ": found " << m.rows() << " x " << m.cols() << ", expected "
      << rows << " x 1 to 3";
    throw InvalidArgument(s.str());
  }
}

Eigen::VectorXcd LatticeSum::LayerPhases(int layer) const {
  // The layer's site along each layered dimension: mixed-radix digits, the last
  // layered dimension fastest (as point_layer_ counts them).
  const auto nl = static_cast<Eigen::Index>(layered_.size());
  Eigen::VectorXd n(nl);
  for (Eigen::Index l = nl - 1, r = layer; l >= 0; --l) {
    const int m = layered_sites_[static_cast<std::size_t>(l)];
    n[l] = static_cast<double>(r % m);
    r /= m;
  }
  const Eigen::Index nk = target_factor_.size();
  Eigen::VectorXcd phases(nk);
#pragma omp parallel for num_threads(ResolveThreads(num_threads_)) schedule(static)
  for (Eigen::Index k = 0; k < nk; ++k) {
    double phase = 0;
    for (Eigen::Index l = 0; l < nl; ++l) phase += layer_targets_(l, k) * n[l];
    double sn = 0, cs = 1;
    if (nl > 0) SinCos(phase, sn, cs);
    phases[k] = Complex(cs, sn);
  }
  return phases;
}

std::vector<Eigen::MatrixXcd> LatticeSum::LayerCoefficients(
    const Eigen::MatrixXcd& strengths) const {
  CheckRows(strengths, num_points_, "strengths");
  const auto rows = static_cast<Eigen::Index>(layer_sum_->num_modes());
  // Strengths summed per site, layer by layer (in point order: deterministic).
  std::vector<Eigen::MatrixXcd> coefficients(static_cast<std::size_t>(shape_.layers),
                                             Eigen::MatrixXcd::Zero(rows, strengths.cols()));
  for (std::size_t j = 0; j < num_points_; ++j) {
    coefficients[static_cast<std::size_t>(point_layer_[j])].row(point_row_[j]) +=
        strengths.row(static_cast<Eigen::Index>(j));
  }
  return coefficients;
}

Eigen::MatrixXcd LatticeSum::Execute(const Eigen::MatrixXcd& strengths) const {
  const std::vector<Eigen::MatrixXcd> coefficients = LayerCoefficients(strengths);
  const Eigen::Index nc = strengths.cols();
  const Eigen::Index nk = target_factor_.size();
  Eigen::MatrixXcd out = Eigen::MatrixXcd::Zero(nk, nc);
  for (int layer = 0; layer < shape_.layers; ++layer) {
    const Eigen::MatrixXcd f = layer_sum_->Execute(coefficients[static_cast<std::size_t>(layer)]);
    const Eigen::VectorXcd phases = LayerPhases(layer);
#pragma omp parallel for num_threads(ResolveThreads(num_threads_)) schedule(static)
    for (Eigen::Index k = 0; k < nk; ++k) {
      for (Eigen::Index a = 0; a < nc; ++a) out(k, a) += phases[k] * f(k, a);
    }
  }
  for (Eigen::Index a = 0; a < nc; ++a) out.col(a) = out.col(a).cwiseProduct(target_factor_);
  return out;
}

namespace {
struct LatticePrepared : PointSum::Prepared {
  const LatticeSum* owner = nullptr;
  std::vector<std::shared_ptr<const Nufft2::Prepared>> layers;
  Eigen::Index components = 0;
};
}  // namespace

std::shared_ptr<const PointSum::Prepared> LatticeSum::Prepare(
    const Eigen::MatrixXcd& strengths) const {
  auto p = std::make_shared<LatticePrepared>();
  p->owner = this;
  p->components = strengths.cols();
  for (const Eigen::MatrixXcd& c : LayerCoefficients(strengths))
    p->layers.push_back(layer_sum_->Prepare(c));
  return p;
}

Eigen::MatrixXcd LatticeSum::ExecuteAt(const Prepared& base,
                                       const Eigen::Matrix3Xd& targets) const {
  const auto* p = dynamic_cast<const LatticePrepared*>(&base);
  if (!p || p->owner != this)
    throw InternalError("LatticeSum::ExecuteAt: found another transform's prepared grid");
  const LatticePrepared& prepared = *p;
  // The constructor's target data and Execute's steps, for these targets.
  const Eigen::Index nk = targets.cols(), nc = prepared.components;
  Eigen::Matrix3Xd t = Eigen::Matrix3Xd::Zero(3, nk);
  Eigen::VectorXcd factor(nk);
  for (Eigen::Index k = 0; k < nk; ++k) {
    double phase = targets.col(k).dot(origin_);
    for (std::size_t i = 0; i < 3; ++i) {
      const int d = order_[i];
      if (modes_[i] == 1) continue;
      t(static_cast<Eigen::Index>(i), k) = targets(d, k) * pitch_[d];
      phase += t(static_cast<Eigen::Index>(i), k) * (modes_[i] / 2);
    }
    factor[k] = Complex(std::cos(phase), std::sin(phase));
  }
  Eigen::MatrixXcd out = Eigen::MatrixXcd::Zero(nk, nc);
  for (int layer = 0; layer < shape_.layers; ++layer) {
    const Eigen::MatrixXcd f =
        layer_sum_->InterpolateAt(*prepared.layers[static_cast<std::size_t>(layer)], t);
    // The layer's site along each layered dimension (LayerPhases).
    std::vector<double> n(layered_.size());
    for (Eigen::Index l = static_cast<Eigen::Index>(layered_.size()) - 1, r = layer; l >= 0; --l) {
      const int m = layered_sites_[static_cast<std::size_t>(l)];
      n[static_cast<std::size_t>(l)] = static_cast<double>(r % m);
      r /= m;
    }
    for (Eigen::Index k = 0; k < nk; ++k) {
      double phase = 0;
      for (std::size_t l = 0; l < layered_.size(); ++l)
        phase += targets(layered_[l], k) * pitch_[layered_[l]] * n[l];
      const Complex ph(std::cos(phase), std::sin(phase));
      for (Eigen::Index a = 0; a < nc; ++a) out(k, a) += ph * f(k, a);
    }
  }
  for (Eigen::Index a = 0; a < nc; ++a) out.col(a) = out.col(a).cwiseProduct(factor);
  return out;
}

Eigen::MatrixXcd LatticeSum::Adjoint(const Eigen::MatrixXcd& values) const {
  const Eigen::Index nk = target_factor_.size();
  CheckRows(values, static_cast<std::size_t>(nk), "values");
  const Eigen::Index nc = values.cols();
  // Execute's steps transposed, in reverse: target factors, then per layer its
  // phases and the layer transform's adjoint, then each point reads its site.
  Eigen::MatrixXcd v(nk, nc);
  for (Eigen::Index a = 0; a < nc; ++a)
    v.col(a) = values.col(a).cwiseProduct(target_factor_.conjugate());
  std::vector<Eigen::MatrixXcd> coefficients;
  for (int layer = 0; layer < shape_.layers; ++layer) {
    const Eigen::VectorXcd phases = LayerPhases(layer);
    Eigen::MatrixXcd vl(nk, nc);
    for (Eigen::Index a = 0; a < nc; ++a) vl.col(a) = v.col(a).cwiseProduct(phases.conjugate());
    coefficients.push_back(layer_sum_->Adjoint(vl));
  }
  Eigen::MatrixXcd out(static_cast<Eigen::Index>(num_points_), nc);
  for (std::size_t j = 0; j < num_points_; ++j) {
    out.row(static_cast<Eigen::Index>(j)) =
        coefficients[static_cast<std::size_t>(point_layer_[j])].row(point_row_[j]);
  }
  return out;
}

}  // namespace lobecast
