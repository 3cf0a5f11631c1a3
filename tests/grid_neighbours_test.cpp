// Grid neighbourhoods (engine/analysis/grid_neighbours.h): the computed-on-demand structure
// against a brute-force one built from explicit position tables, and the memory
// design it exists for. The memory checks count the bytes allocated through
// operator new (every std container; Eigen's own allocations go through malloc and
// are not seen) while the code runs. They are allocation counts, not RSS or timing:
// deterministic, and they fail when a per-direction copy (8 bytes a direction for a
// double) comes back where the design keeps at most a bit.
#include "engine/analysis/grid_neighbours.h"
#include "engine/analysis/null_geometry.h"
#include "engine/analysis/pattern_probe.h"
#include "engine/grid.h"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <cstdlib>
#include <map>
#include <new>
#include <set>
#include <utility>
#include <vector>

#include <gtest/gtest.h>

#include "engine/analysis/pattern_analysis.h"
#include "engine/pattern.h"
#include "engine/types.h"
#include "tests/test_util.h"

// --- counting allocator (this test executable only) ----------------------------------

namespace {

std::atomic<std::size_t> g_live_bytes{0};
std::atomic<std::size_t> g_peak_bytes{0};

// A 16-byte header holds the size, so the malloc alignment is kept.
constexpr std::size_t kHeader = 16;

void* CountedAllocate(std::size_t n) {
  void* block = std::malloc(n + kHeader);
  if (block == nullptr) throw std::bad_alloc();
  *static_cast<std::size_t*>(block) = n;
  const std::size_t live = g_live_bytes.fetch_add(n) + n;
  std::size_t peak = g_peak_bytes.load();
  while (live > peak && !g_peak_bytes.compare_exchange_weak(peak, live)) {
  }
  return static_cast<char*>(block) + kHeader;
}

void CountedRelease(void* p) noexcept {
  if (p == nullptr) return;
  void* block = static_cast<char*>(p) - kHeader;
  g_live_bytes.fetch_sub(*static_cast<std::size_t*>(block));
  std::free(block);
}

// Highest live operator-new bytes above the level at construction, while it lives.
class PeakAllocation {
 public:
  PeakAllocation() : base_(g_live_bytes.load()) { g_peak_bytes.store(base_); }
  std::size_t bytes() const { return g_peak_bytes.load() - base_; }

 private:
  std::size_t base_;
};

}  // namespace

void* operator new(std::size_t n) { return CountedAllocate(n); }
void* operator new[](std::size_t n) { return CountedAllocate(n); }
void* operator new(std::size_t n, const std::nothrow_t&) noexcept {
  try {
    return CountedAllocate(n);
  } catch (...) {
    return nullptr;
  }
}
void* operator new[](std::size_t n, const std::nothrow_t& t) noexcept { return operator new(n, t); }
void operator delete(void* p) noexcept { CountedRelease(p); }
void operator delete[](void* p) noexcept { CountedRelease(p); }
void operator delete(void* p, std::size_t) noexcept { CountedRelease(p); }
void operator delete[](void* p, std::size_t) noexcept { CountedRelease(p); }
void operator delete(void* p, const std::nothrow_t&) noexcept { CountedRelease(p); }
void operator delete[](void* p, const std::nothrow_t&) noexcept { CountedRelease(p); }

namespace lobecast {
namespace {

using testing::MakeDipole;

// The neighbourhood written out the slow way: every grid position gets its node from
// a table, and two nodes are neighbours when any of their positions are 8-adjacent
// (phi wrapping when the seam is closed).
struct BruteForce {
  std::vector<std::size_t> representative;
  std::vector<std::set<std::size_t>> neighbours;

  BruteForce(const AngularGrid& grid, Ground ground, std::size_t columns, bool periodic) {
    const std::size_t nt = grid.theta_deg.size();
    std::map<std::pair<std::size_t, std::size_t>, std::size_t> node;
    for (std::size_t i = 0; i < nt; ++i) {
      const double t = grid.theta_deg[i];
      if (ground == Ground::kPec && t > 90.0) continue;
      const bool pole = std::abs(t) < 1e-9 || std::abs(t - 180.0) < 1e-9;
      for (std::size_t j = 0; j < columns; ++j) {
        if (pole && j > 0) {
          node[{i, j}] = node[{i, 0}];
          continue;
        }
        node[{i, j}] = representative.size();
        representative.push_back(i * grid.phi_deg.size() + j);
      }
    }
    neighbours.resize(representative.size());
    for (const auto& [pos, a] : node) {
      for (long di = -1; di <= 1; ++di) {
        for (long dj = -1; dj <= 1; ++dj) {
          const long i = static_cast<long>(pos.first) + di;
          long j = static_cast<long>(pos.second) + dj;
          if (periodic) j = (j + static_cast<long>(columns)) % static_cast<long>(columns);
          const auto it = node.find({static_cast<std::size_t>(i), static_cast<std::size_t>(j)});
          if (i < 0 || j < 0 || it == node.end() || it->second == a) continue;
          neighbours[a].insert(it->second);
        }
      }
    }
  }
};

struct GridCase {
  const char* name;
  AngularGrid grid;
  Ground ground;
  std::size_t columns;  // phi columns that are nodes
  bool periodic;
};

std::vector<GridCase> Cases() {
  auto g = [](AngleRange t, AngleRange p) { return AngularGrid::FromRanges(t, p); };
  return {
      {"full sphere, phi = 360 repeated", g({0, 180, 15}, {0, 360, 30}), Ground::kNone, 12, true},
      {"full sphere, seam by step", g({0, 180, 20}, {0, 330, 30}), Ground::kNone, 12, true},
      {"phi sector", g({10, 170, 20}, {0, 90, 15}), Ground::kNone, 7, false},
      {"over PEC ground", g({0, 180, 10}, {0, 360, 45}), Ground::kPec, 8, true},
      {"one theta row", g({90, 90, 1}, {0, 360, 10}), Ground::kNone, 36, true},
      {"one phi column", g({0, 180, 10}, {45, 45, 1}), Ground::kNone, 1, false},
      {"two phi values 0 and 360", g({0, 180, 30}, {0, 360, 360}), Ground::kNone, 1, false},
  };
}

TEST(GridNeighbours, MatchesBruteForce) {
  for (const GridCase& c : Cases()) {
    SCOPED_TRACE(c.name);
    const GridNeighbours n(c.grid, c.ground);
    const BruteForce ref(c.grid, c.ground, c.columns, c.periodic);
    ASSERT_EQ(n.num_nodes(), ref.representative.size());
    for (std::size_t k = 0; k < n.num_nodes(); ++k) {
      EXPECT_EQ(n.representative(k), ref.representative[k]) << "node " << k;
      const std::vector<std::size_t> expected(ref.neighbours[k].begin(), ref.neighbours[k].end());
      EXPECT_EQ(n.neighbours(k), expected) << "node " << k;
      const std::size_t g = ref.representative[k], np = c.grid.phi_deg.size();
      const double t = c.grid.theta_deg[g / np] * kDegree, p = c.grid.phi_deg[g % np] * kDegree;
      const Vec3 d = n.direction(k);
      EXPECT_EQ(d, Vec3(std::sin(t) * std::cos(p), std::sin(t) * std::sin(p), std::cos(t)));
    }
  }
}

TEST(GridNeighbours, ExtremaAndComponentsMatchBruteForce) {
  testing::TestRng rng(7);
  for (const GridCase& c : Cases()) {
    SCOPED_TRACE(c.name);
    const GridNeighbours n(c.grid, c.ground);
    const BruteForce ref(c.grid, c.ground, c.columns, c.periodic);
    // Few distinct values, so there are ties and plateaus.
    std::vector<double> value(c.grid.size());
    for (double& v : value) v = std::floor(rng.Uniform(0, 4));
    const GridNeighbours::GridValue at = [&](std::size_t g) { return value[g]; };
    std::vector<bool> max_ref(n.num_nodes()), min_ref(n.num_nodes()), member(n.num_nodes());
    for (std::size_t k = 0; k < n.num_nodes(); ++k) {
      const double v = value[ref.representative[k]];
      bool is_max = !ref.neighbours[k].empty(), is_min = is_max;
      for (std::size_t m : ref.neighbours[k]) {
        is_max = is_max && v >= value[ref.representative[m]] - 0.5;
        is_min = is_min && v <= value[ref.representative[m]] + 0.5;
      }
      max_ref[k] = is_max;
      min_ref[k] = is_min;
      member[k] = v >= 2.0;
    }
    EXPECT_EQ(n.LocalMaxima(at, 0.5), max_ref);
    EXPECT_EQ(n.LocalMinima(at, 0.5), min_ref);
    EXPECT_EQ(n.NodesWhere([&](std::size_t g) { return value[g] >= 2.0; }), member);
    const std::size_t top = n.MaxNode(at);
    for (std::size_t k = 0; k < n.num_nodes(); ++k) {
      const double v = value[ref.representative[k]], vt = value[ref.representative[top]];
      EXPECT_TRUE(k < top ? v < vt : v <= vt) << "node " << k << ", max node " << top;
    }

    // Components: a partition of the members into neighbour-closed sets; every
    // component is visited alike, in the same order, by VisitComponent.
    const auto components = n.Components(member);
    std::vector<int> label(n.num_nodes(), -1);
    for (std::size_t ci = 0; ci < components.size(); ++ci)
      for (std::size_t k : components[ci]) {
        ASSERT_TRUE(member[k]);
        EXPECT_EQ(label[k], -1);
        label[k] = static_cast<int>(ci);
      }
    for (std::size_t k = 0; k < n.num_nodes(); ++k) {
      EXPECT_EQ(label[k] >= 0, static_cast<bool>(member[k]));
      for (std::size_t m : ref.neighbours[k]) {
        if (member[k] && member[m]) {
          EXPECT_EQ(label[k], label[m]);
        }
      }
    }
    for (const auto& comp : components) {
      std::vector<std::size_t> visited;
      n.VisitComponent(member, comp.back(), [&](std::size_t k) { visited.push_back(k); });
      EXPECT_EQ(visited, comp);
    }
    for (std::size_t k = 0; k < n.num_nodes(); ++k) {
      if (!member[k]) n.VisitComponent(member, k, [](std::size_t) { ADD_FAILURE(); });
    }
  }
}

TEST(GridNeighbours, MaxNodeBreaksRoundingTiesAsPeakIndexDoes) {
  // Twin beams at theta 45 and 135 deg, the lower one a rounding above: the
  // analysis must take the beam PeakIndex names (the first), or it measures side
  // lobes and in-beam XPD around the mirror beam.
  const AngularGrid grid = AngularGrid::FromRanges({0, 180, 45}, {0, 270, 90});
  const GridNeighbours n(grid, Ground::kNone);
  Eigen::VectorXd v = Eigen::VectorXd::Constant(static_cast<Eigen::Index>(grid.size()), 0.1);
  v[1 * 4 + 2] = 2.0;
  v[3 * 4 + 2] = 2.0 * (1 + 1e-12);
  const std::size_t top = n.MaxNode([&](std::size_t g) { return v[static_cast<Eigen::Index>(g)]; });
  EXPECT_EQ(n.representative(top), static_cast<std::size_t>(PeakIndex(v)));
  EXPECT_EQ(n.representative(top), 6u);
}

TEST(GridNeighbours, HoldsNothingPerDirection) {
  // 0.2 deg full sphere: 1.6 M directions. The structure holds its rows and columns;
  // the sweeps and masks one bit per node and three rows of values. Bounds: the bits,
  // plus 64 bytes per row and column for everything else.
  const AngularGrid grid = AngularGrid::FromRanges({0, 180, 0.2}, {0, 360, 0.2});
  const std::size_t per_rows = 64 * (grid.theta_deg.size() + grid.phi_deg.size());
  std::size_t nodes = 0;
  {
    const PeakAllocation peak;
    const GridNeighbours n(grid, Ground::kNone);
    nodes = n.num_nodes();
    EXPECT_LE(peak.bytes(), per_rows);
  }
  const GridNeighbours n(grid, Ground::kNone);
  const std::size_t bits = nodes / 8 + 64;
  // A smooth pattern with one broad beam (a third of the sphere above its half level).
  const GridNeighbours::GridValue value = [&](std::size_t g) {
    const std::size_t np = grid.phi_deg.size();
    const double t = grid.theta_deg[g / np] * kDegree, p = grid.phi_deg[g % np] * kDegree;
    return std::pow(std::sin(t), 2) * (1.2 + std::cos(3 * p));
  };
  {
    const PeakAllocation peak;
    const std::vector<bool> maxima = n.LocalMaxima(value, 1e-12);
    const auto components = n.Components(maxima);
    EXPECT_EQ(components.size(), 3u);  // three lobes in phi on the equator
    EXPECT_LE(peak.bytes(), 2 * bits + per_rows);
  }
  {
    const std::vector<bool> member = n.NodesWhere([&](std::size_t g) { return value(g) >= 1.1; });
    std::size_t visited = 0;
    const PeakAllocation peak;
    n.VisitComponent(member, n.MaxNode(value), [&](std::size_t) { ++visited; });
    EXPECT_GT(visited, nodes / 20);
    // One bit per node of the grid, and the walk's stack: at most one index per
    // node of the component (never a list of it, nor anything per grid direction).
    EXPECT_LE(peak.bytes(), bits + per_rows + sizeof(std::size_t) * visited);
  }
}

TEST(GridNeighbours, AnalysisGrowsByLessThanTwoBytesPerDirection) {
  // The whole pattern analysis on a 1 deg and a 0.25 deg grid of the same array, with
  // the grid-independent searches cut down (few AR planes and beam rays) so that the
  // grid-wide work is what the peak measures. Its growth with the grid must stay
  // below 2 bytes per direction: masks are a bit per direction; one copy of the
  // directivity would be 8.
  testing::TestArray a;
  a.frequency_hz = testing::kTestFrequency_hz;
  const double lambda = a.wavelength_m(), k = 2 * kPi / lambda;
  const Vec3 steer(std::sin(30 * kDegree) * std::cos(20 * kDegree),
                   std::sin(30 * kDegree) * std::sin(20 * kDegree), std::cos(30 * kDegree));
  for (int ix = 0; ix < 6; ++ix)
    for (int iy = 0; iy < 6; ++iy) {
      const Vec3 r(0.5 * lambda * ix, 0.5 * lambda * iy, 0.0);
      a.Add(r, Vec3::UnitX(), lambda / 50, std::polar(1.0, -k * steer.dot(r)));
    }
  AnalysisOptions o;
  o.axial_ratio_phi_planes = 4;
  o.axial_ratio_theta_step_deg = 10;
  o.beam_rays = 4;
  o.beam_ray_samples = 1;
  struct Run {
    std::size_t directions = 0;
    double peak_bytes = 0;
    PatternAnalysis analysis;
  };
  auto run = [&](double step_deg) {
    const PatternResult g = ComputePattern(
        a, a.currents, AngularGrid::FromRanges({0, 180, step_deg}, {0, 360, step_deg}));
    Run r;
    r.directions = g.grid.size();
    const PeakAllocation peak;
    r.analysis = AnalyzePattern(a, a.currents, g, o);
    r.peak_bytes = static_cast<double>(peak.bytes());
    return r;
  };
  const Run c = run(1.0), f = run(0.25);
  // The same beam, refined off the grid, from both.
  EXPECT_NEAR(c.analysis.peak.direction.theta_deg, f.analysis.peak.direction.theta_deg, 1e-6);
  EXPECT_NEAR(c.analysis.peak.direction.phi_deg, f.analysis.peak.direction.phi_deg, 1e-6);
  const std::size_t coarse_n = c.directions, fine_n = f.directions;
  const double coarse = c.peak_bytes, fine = f.peak_bytes;
  const double per_direction = (fine - coarse) / static_cast<double>(fine_n - coarse_n);
  EXPECT_LT(per_direction, 2.0) << "analysis peak " << coarse << " B on " << coarse_n
                                << " directions, " << fine << " B on " << fine_n;
}

// GroupByProximity (null_geometry.h) against the pairwise flood fill it replaced: the
// same groups, numbered alike, on clustered and on spread directions, including pairs
// just inside and just outside the link.
TEST(GroupByProximity, MatchesPairwiseFloodFill) {
  testing::TestRng rng(11);
  for (const double link : {1e-3, 0.02, 0.3}) {
    std::vector<Vec3> dirs;
    for (int c = 0; c < 40; ++c) {
      const Vec3 centre = rng.UnitVector();
      for (int k = 0; k < 12; ++k) {
        const Vec3 off(rng.Uniform(-0.5, 0.5), rng.Uniform(-0.5, 0.5), rng.Uniform(-0.5, 0.5));
        dirs.push_back((centre + 3.0 * link * off).normalized());
      }
    }
    // A chain of steps 0.999 link (one group) and a pair 1.001 link apart (two).
    for (int k = 0; k < 5; ++k) dirs.push_back(UnitVectorAt(0.5 + 0.999 * link * k, 1.0));
    dirs.push_back(UnitVectorAt(2.0, 4.0));
    dirs.push_back(UnitVectorAt(2.0 + 1.001 * link, 4.0));
    std::vector<int> expected(dirs.size(), -1);
    int expected_groups = 0;
    for (std::size_t i = 0; i < dirs.size(); ++i) {
      if (expected[i] >= 0) continue;
      std::vector<std::size_t> stack = {i};
      expected[i] = expected_groups;
      while (!stack.empty()) {
        const std::size_t a = stack.back();
        stack.pop_back();
        for (std::size_t b = 0; b < dirs.size(); ++b)
          if (expected[b] < 0 && AngleBetween(dirs[a], dirs[b]) < link) {
            expected[b] = expected_groups;
            stack.push_back(b);
          }
      }
      ++expected_groups;
    }
    int groups = 0;
    EXPECT_EQ(GroupByProximity(dirs, link, &groups), expected) << "link " << link;
    EXPECT_EQ(groups, expected_groups);
    // The test's own cases (at the widest link the clusters may join anything).
    const std::size_t n = dirs.size();
    EXPECT_EQ(expected[n - 7], expected[n - 3]);  // the chain
    if (link < 0.1) {
      EXPECT_NE(expected[n - 2], expected[n - 1]);  // the pair just apart
    }
  }
}

}  // namespace
}  // namespace lobecast
