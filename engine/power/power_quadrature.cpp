// Power and R x by band-limited quadrature (power_quadrature.h).
#include "engine/power/power_quadrature.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <sstream>
#include <vector>

#include "engine/error.h"
#include "engine/field/far_field.h"
#include "engine/ground.h"
#include "engine/quadrature.h"

namespace lobecast {
namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();
constexpr double kUnitRoundoff = 0.5 * std::numeric_limits<double>::epsilon();  // u = 2^-53

// rho_l(x) = 2x / (2l + 3 + sqrt((2l + 3)^2 - 4x^2)), for 2l + 3 > 2x.
double RatioBound(int l, double x) {
  const double b = 2.0 * l + 3.0;
  return 2.0 * x / (b + std::sqrt((b - 2.0 * x) * (b + 2.0 * x)));
}

// log(x^l / (2l+1)!!), (2l+1)!! = (2l+1)! / (2^l l!).
double LogSmallArgumentBound(int l, double x) {
  return l * std::log(x) - (std::lgamma(2.0 * l + 2.0) - l * std::log(2.0) - std::lgamma(l + 1.0));
}

// Walks b_l from l = ceil(x) (at least 1) upward; Tail(degree) sums (2l+1) b_l
// over l > degree, closing geometrically where q_l = rho_l (2l+3)/(2l+1) < 1/2.
class TailWalk {
 public:
  explicit TailWalk(double x) : x_(x), first_(std::max(1, static_cast<int>(std::ceil(x)))) {
    b_.push_back(std::min(1.0, std::exp(LogSmallArgumentBound(first_, x_))));
  }
  int first() const { return first_; }
  double b(int l) {
    while (static_cast<int>(b_.size()) <= l - first_) {
      const int at = first_ + static_cast<int>(b_.size());  // the l to add
      const double chained = b_.back() * RatioBound(at - 1, x_);
      b_.push_back(std::min(chained, std::exp(LogSmallArgumentBound(at, x_))));
    }
    return b_[static_cast<std::size_t>(l - first_)];
  }
  double q(int l) const { return RatioBound(l, x_) * (2.0 * l + 3.0) / (2.0 * l + 1.0); }
  double Tail(int degree) {
    double sum = 0;
    for (int l = degree + 1;; ++l) {
      const double t = (2.0 * l + 1.0) * b(l);
      const double ql = q(l);
      if (ql < 0.5 || t == 0.0) return sum + t / (1.0 - ql);
      sum += t;
    }
  }

 private:
  double x_;
  int first_;
  std::vector<double> b_;
};

double MaxAbsCoordinate(const std::vector<Dipole>& s) {
  double r = 0;
  for (const Dipole& d : s) r = std::max(r, d.position_m.norm());
  return r;
}

// Mirror symmetry of |rE|^2 about the xy plane (power_quadrature.h).
bool MirrorSymmetric(const Array& array, const std::vector<Dipole>& sources) {
  if (array.ground == Ground::kPec) return true;
  const double z = sources.front().position_m.z();
  bool vertical = true, horizontal = true;
  for (const Dipole& d : sources) {
    if (d.position_m.z() != z) return false;
    const Vec3& u = d.orientation;
    vertical = vertical && u.x() == 0.0 && u.y() == 0.0;
    horizontal = horizontal && u.z() == 0.0;
  }
  return vertical || horizontal;
}

double RoundDownToPowerOfTen(double v) { return std::pow(10.0, std::floor(std::log10(v))); }

// The nodes and weights of a rule (only the evaluated ones): cos theta ascending
// within the evaluated part, weights including 2 pi / n_phi and upper_weight.
struct Nodes {
  std::vector<double> theta_rad, row_weight;
};
Nodes RuleNodes(const SphereRule& rule) {
  const QuadratureRule gl = GaussLegendre(rule.num_theta);
  Nodes n;
  const double phi_weight = 2.0 * kPi / rule.num_phi;
  for (int i = 0; i < rule.num_theta; ++i) {
    const auto u = static_cast<std::size_t>(i);
    if (rule.upper_half && !(gl.nodes[u] > 0.0)) continue;
    n.theta_rad.push_back(std::acos(gl.nodes[u]));
    n.row_weight.push_back(gl.weights[u] * phi_weight * (rule.upper_half ? rule.upper_weight : 1));
  }
  return n;
}

// One block of whole theta rows [row, row + rows) as directions.
Directions BlockDirections(const Nodes& nodes, const SphereRule& rule, std::size_t row,
                           std::size_t rows) {
  std::vector<double> theta, phi;
  theta.reserve(rows * static_cast<std::size_t>(rule.num_phi));
  phi.reserve(theta.capacity());
  for (std::size_t i = row; i < row + rows; ++i) {
    for (int j = 0; j < rule.num_phi; ++j) {
      theta.push_back(nodes.theta_rad[i]);
      phi.push_back(2.0 * kPi * j / rule.num_phi);
    }
  }
  return Directions::FromAngles(theta, phi);
}

FieldOptions PlanOptions(const SphereRule& rule, const PowerQuadratureOptions& options) {
  FieldOptions f;
  f.num_threads = options.num_threads;
  f.method = FieldMethod::kAuto;
  f.fixed_pass_tolerance = rule.transform_tolerance;
  return f;
}

// sum_s |c_s| |m_s| over the radiating sources (images carry their dipole's current).
double SourceL1(const std::vector<Dipole>& sources, const Eigen::VectorXcd& c, std::size_t n) {
  double s1 = 0;
  for (std::size_t s = 0; s < sources.size(); ++s) {
    s1 += std::abs(c[static_cast<Eigen::Index>(DipoleOfSource(s, n))]) *
          std::abs(sources[s].effective_length_m());
  }
  return s1;
}

// The direct sums' rounding model (power_quadrature.h), relative to the sum of
// the terms' magnitudes: u (8 k R + 6 sqrt(terms) + 10).
double DirectRounding(double k_r_max, double terms) {
  return kUnitRoundoff * (8.0 * k_r_max + 6.0 * std::sqrt(terms) + 10.0);
}

// The error bound of every node's field in one block (power_quadrature.h): the
// fast path's, or the direct sum's rounding model.
double NodeFieldBound(const FieldPlan& plan, const FarField& f, double pref, double s1,
                      double k_r_max) {
  if (plan.method_used() == FieldMethod::kFast) {
    double peak = 0;
    for (Eigen::Index i = 0; i < f.e_theta.size(); ++i) {
      peak = std::max(peak, std::sqrt(std::norm(f.e_theta[i]) + std::norm(f.e_phi[i])));
    }
    if (!std::isfinite(f.error_bound_relative)) return kInf;
    return f.error_bound_relative * peak;
  }
  return std::sqrt(3.0) * pref * s1 *
         DirectRounding(k_r_max, static_cast<double>(plan.num_sources()));
}

// Runs fn(plan, field, row_weights_per_direction) over every block of the rule.
template <class Fn>
std::size_t ForEachBlock(const Array& array, const Eigen::VectorXcd& currents,
                         const SphereRule& rule, const PowerQuadratureOptions& options, Fn&& fn) {
  const Nodes nodes = RuleNodes(rule);
  const auto np = static_cast<std::size_t>(rule.num_phi);
  const std::size_t rows_per_block = std::max<std::size_t>(1, options.block_directions / np);
  std::size_t blocks = 0;
  for (std::size_t row = 0; row < nodes.theta_rad.size(); row += rows_per_block) {
    const std::size_t rows = std::min(rows_per_block, nodes.theta_rad.size() - row);
    const FieldPlan plan(array, BlockDirections(nodes, rule, row, rows),
                         PlanOptions(rule, options));
    const FarField field = plan.Execute(currents);
    Eigen::VectorXd w(static_cast<Eigen::Index>(rows * np));
    for (std::size_t i = 0; i < rows; ++i) {
      w.segment(static_cast<Eigen::Index>(i * np), static_cast<Eigen::Index>(np))
          .setConstant(nodes.row_weight[row + i]);
    }
    fn(plan, field, w);
    ++blocks;
  }
  return blocks;
}

// What both quadratures need besides the blocks: the rule, the sources, w mu0 / 4 pi,
// S1 = sum |x_s| |m_s| and k max |r_s| (the direct sums' phase scale).
struct Setup {
  SphereRule rule;
  std::vector<Dipole> sources;
  double pref = 0, s1 = 0, k_r_max = 0;
};
Setup MakeSetup(const Array& array, const Eigen::VectorXcd& x,
                const PowerQuadratureOptions& options);

void CheckOptions(const PowerQuadratureOptions& options) {
  std::string why;
  if (!options.IsValid(&why)) throw InvalidArgument("power quadrature options: " + why);
}

}  // namespace

double SphericalBesselTailBound(int degree, double x) {
  if (!(x >= 0) || degree < 0)
    throw InvalidArgument("SphericalBesselTailBound: x < 0 or degree < 0");
  if (x == 0) return 0.0;
  TailWalk walk(x);
  if (degree + 1 < walk.first()) return kInf;
  return walk.Tail(degree);
}

int BandLimitDegree(double x, double tail) {
  if (!(x >= 0) || !(tail > 0)) throw InvalidArgument("BandLimitDegree: x < 0 or tail <= 0");
  if (x == 0) return 0;
  TailWalk walk(x);
  int degree = walk.first() - 1;
  while (walk.Tail(degree) > tail) ++degree;
  return degree;
}

bool PowerQuadratureOptions::IsValid(std::string* why) const {
  std::ostringstream m;
  if (!(target_relative >= 1e-14 && target_relative <= 1e-2)) {
    m << "target_relative: found " << target_relative << ", expected 1e-14 to 1e-2";
  } else if (num_threads < 0) {
    m << "num_threads: found " << num_threads << ", expected 0 (OpenMP default) or more";
  } else if (block_directions < 1) {
    m << "block_directions: found 0, expected at least 1";
  } else {
    return true;
  }
  if (why) *why = m.str();
  return false;
}

SphereRule PowerQuadratureRule(const Array& array, const PowerQuadratureOptions& options) {
  Validate(array);
  CheckOptions(options);
  const std::vector<Dipole> sources = RadiatingSources(array);
  SphereRule rule;
  Vec3 lo = sources.front().position_m, hi = lo;
  for (const Dipole& d : sources) {
    lo = lo.cwiseMin(d.position_m);
    hi = hi.cwiseMax(d.position_m);
  }
  rule.centre_m = 0.5 * (lo + hi);
  for (const Dipole& d : sources) {
    rule.radius_m = std::max(rule.radius_m, (d.position_m - rule.centre_m).norm());
  }
  const double ns = static_cast<double>(sources.size());
  const double x = 2.0 * array.wavenumber_rad_m() * rule.radius_m;
  rule.band_degree = BandLimitDegree(x, 1e-3 * options.target_relative / (3.0 * ns));
  rule.tail = SphericalBesselTailBound(rule.band_degree, x);
  const int d = rule.exact_degree();
  rule.num_theta = (d + 2) / 2;  // ceil((D + 1) / 2): 2 n_theta - 1 >= D
  rule.num_phi = d + 1;
  rule.upper_half = MirrorSymmetric(array, sources);
  if (rule.upper_half) {
    rule.num_theta += rule.num_theta % 2;  // nodes in +-x pairs, none at 0
    rule.upper_weight = array.ground == Ground::kPec ? 1.0 : 2.0;
  }
  rule.transform_tolerance =
      std::max(1e-14, RoundDownToPowerOfTen(options.target_relative / (85.0 * std::sqrt(ns))));
  return rule;
}

namespace {

Setup MakeSetup(const Array& array, const Eigen::VectorXcd& x,
                const PowerQuadratureOptions& options) {
  ValidateCurrents(array, x);
  Setup s;
  s.rule = PowerQuadratureRule(array, options);
  s.sources = RadiatingSources(array);
  s.pref = array.angular_frequency_rad_s() * kMu0_H_m / (4.0 * kPi);
  s.s1 = SourceL1(s.sources, x, array.size());
  s.k_r_max = array.wavenumber_rad_m() * MaxAbsCoordinate(s.sources);
  return s;
}

}  // namespace

QuadraturePower RadiatedPowerByQuadrature(const Array& array, const Eigen::VectorXcd& currents_a,
                                          const PowerQuadratureOptions& options) {
  const Setup setup = MakeSetup(array, currents_a, options);
  QuadraturePower out;
  out.rule = setup.rule;
  const SphereRule& rule = out.rule;
  const double pref = setup.pref, s1 = setup.s1, k_r_max = setup.k_r_max;
  double sum = 0, field_error = 0;  // sum w |E|^2 and sum w delta (2|E| + delta)
  out.blocks =
      ForEachBlock(array, currents_a, rule, options,
                   [&](const FieldPlan& plan, const FarField& f, const Eigen::VectorXd& w) {
                     if (plan.method_used() == FieldMethod::kFast) ++out.fast_blocks;
                     const double delta = NodeFieldBound(plan, f, pref, s1, k_r_max);
                     for (Eigen::Index i = 0; i < w.size(); ++i) {
                       const double e2 = std::norm(f.e_theta[i]) + std::norm(f.e_phi[i]);
                       sum += w[i] * e2;
                       field_error += w[i] * delta * (2.0 * std::sqrt(e2) + delta);
                     }
                   });
  // P and its bounds; over PEC (upper half, weight 1) half of the full rule's
  // truncation, which is 8 pi pref^2 S1^2 tau.
  const double to_power = 1.0 / (2.0 * kEta0_ohm);
  out.radiated_power_w = to_power * sum;
  const double half = array.ground == Ground::kPec ? 0.5 : 1.0;
  const double truncation = to_power * half * 8.0 * kPi * pref * pref * s1 * s1 * rule.tail;
  out.truncation_bound_relative = truncation / out.radiated_power_w;
  out.field_bound_relative = to_power * field_error / out.radiated_power_w;
  out.error_bound_relative = out.truncation_bound_relative + out.field_bound_relative;
  return out;
}

QuadratureResistanceProduct ResistanceProductByQuadrature(const Array& array,
                                                          const Eigen::VectorXcd& x,
                                                          const PowerQuadratureOptions& options) {
  const Setup setup = MakeSetup(array, x, options);
  QuadratureResistanceProduct out;
  out.rule = setup.rule;
  const SphereRule& rule = out.rule;
  const std::vector<Dipole>& sources = setup.sources;
  const std::size_t n = array.size();
  const double pref = setup.pref, s1 = setup.s1, k_r_max = setup.k_r_max;
  // M_m: the moments' sizes of dipole m's sources.
  Eigen::VectorXd moment = Eigen::VectorXd::Zero(static_cast<Eigen::Index>(n));
  for (std::size_t s = 0; s < sources.size(); ++s) {
    moment[static_cast<Eigen::Index>(DipoleOfSource(s, n))] +=
        std::abs(sources[s].effective_length_m());
  }
  Eigen::VectorXcd y = Eigen::VectorXcd::Zero(static_cast<Eigen::Index>(n));
  // sum w delta; the fast adjoints' bounds (absolute); the direct adjoints'
  // rounding per unit of pref M_m (sqrt(2) for the two components).
  double weighted_delta = 0, adjoint_fast = 0, adjoint_direct = 0;
  ForEachBlock(array, x, rule, options,
               [&](const FieldPlan& plan, const FarField& f, const Eigen::VectorXd& w) {
                 const double delta = NodeFieldBound(plan, f, pref, s1, k_r_max);
                 weighted_delta += w.sum() * delta;
                 const DipoleSums part = plan.ExecuteAdjoint(f, w);
                 y += part.values;
                 if (plan.method_used() == FieldMethod::kFast) {
                   adjoint_fast += part.error_bound_relative * part.values.cwiseAbs().maxCoeff();
                 } else {
                   double l1 = 0;
                   for (Eigen::Index i = 0; i < w.size(); ++i) {
                     l1 += w[i] * std::hypot(std::abs(f.e_theta[i]), std::abs(f.e_phi[i]));
                   }
                   adjoint_direct +=
                       std::sqrt(2.0) * l1 * DirectRounding(k_r_max, static_cast<double>(w.size()));
                 }
               });
  out.values = y / kEta0_ohm;
  const double half = array.ground == Ground::kPec ? 0.5 : 1.0;
  double worst = 0;
  for (Eigen::Index m = 0; m < moment.size(); ++m) {
    const double truncation = half * 8.0 * kPi * pref * pref * moment[m] * s1 * rule.tail;
    const double field = pref * moment[m] * (weighted_delta + adjoint_direct);
    worst = std::max(worst, (truncation + field + adjoint_fast) / kEta0_ohm);
  }
  const double peak = out.values.cwiseAbs().maxCoeff();
  out.error_bound_relative = peak > 0 ? worst / peak : kInf;
  return out;
}

}  // namespace lobecast
