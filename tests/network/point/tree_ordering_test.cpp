// The elimination order of the node-pressure matrix (network/point/
// tree_ordering.h): on a forest, every node is eliminated with at most one
// neighbour left (the definition of an elimination without fill, checked
// here on the graph itself, not through the code's own construction), the
// factor then holds exactly one entry per edge (a tree's factor: n - 1
// below the diagonal), and the solve agrees with a dense factorisation of
// the same matrix; a graph with a cycle, or a small forest, gets AMD's order.
#include <doctest/doctest.h>

#include <Eigen/Dense>
#include <Eigen/SparseCholesky>

#include <vector>

#include "network/point/tree_ordering.h"

namespace loopwright {
namespace {

using SpMat = Eigen::SparseMatrix<double>;

// The supply header's pattern: header nodes 2i in a path, each with a
// pendant feed node 2i + 1 (tests/tools/header_case.py), as a weighted
// Laplacian plus a diagonal to the boundaries (lower triangle).
SpMat HeaderMatrix(int n_segments) {
  std::vector<Eigen::Triplet<double>> t;
  const int n = 2 * n_segments;
  for (int i = 0; i < n; ++i) t.emplace_back(i, i, 3.0 + (i % 5));
  for (int i = 0; i < n_segments; ++i) {
    if (i + 1 < n_segments) t.emplace_back(2 * i + 2, 2 * i, -1.0);
    t.emplace_back(2 * i + 1, 2 * i, -0.5);
  }
  SpMat k(n, n);
  k.setFromTriplets(t.begin(), t.end());
  return k;
}

SpMat Full(const SpMat& lower) { return lower.selfadjointView<Eigen::Lower>(); }

TEST_CASE("a large forest is eliminated leaves first with no fill") {
  const SpMat k = HeaderMatrix(3000);
  const SpMat full = Full(k);
  std::vector<int> order;
  REQUIRE(ForestEliminationOrder(full, &order));
  const int n = static_cast<int>(full.cols());
  REQUIRE(static_cast<int>(order.size()) == n);
  std::vector<char> gone(n, 0);
  for (int v : order) {
    REQUIRE(v >= 0);
    REQUIRE(v < n);
    REQUIRE_FALSE(gone[v]);  // a permutation
    int left = 0;
    for (SpMat::InnerIterator it(full, v); it; ++it) left += it.index() != v && !gone[it.index()];
    CHECK(left <= 1);  // eliminated with at most its parent left: no fill
    gone[v] = 1;
  }

  Eigen::SimplicialLDLT<SpMat, Eigen::Lower, TreeOrAmdOrdering> ldlt(k);
  REQUIRE(ldlt.info() == Eigen::Success);
  // A tree's factor: one entry below the diagonal per edge (n - 1 edges;
  // Eigen's unit-lower L stores only the strict lower part).
  CHECK(ldlt.matrixL().nestedExpression().nonZeros() == n - 1);
  const Eigen::VectorXd b = Eigen::VectorXd::LinSpaced(n, -1.0, 2.0);
  const Eigen::VectorXd x = ldlt.solve(b);
  const Eigen::VectorXd xd = Eigen::MatrixXd(full).ldlt().solve(b);  // dense reference
  CHECK((x - xd).norm() <= 1e-12 * xd.norm());
}

TEST_CASE("a cycle or a small forest keeps the approximate minimum degree order") {
  // A ring of 3000 nodes: one cycle.
  const int n = 3000;
  std::vector<Eigen::Triplet<double>> t;
  for (int i = 0; i < n; ++i) {
    t.emplace_back(i, i, 4.0);
    t.emplace_back(std::max(i, (i + 1) % n), std::min(i, (i + 1) % n), -1.0);
  }
  SpMat ring(n, n);
  ring.setFromTriplets(t.begin(), t.end());
  std::vector<int> order;
  CHECK_FALSE(ForestEliminationOrder(Full(ring), &order));
  for (const SpMat& k : {ring, HeaderMatrix(kTreeOrderMinNodes / 2 - 1)}) {
    TreeOrAmdOrdering::PermutationType ours, amd;
    TreeOrAmdOrdering()(Full(k), ours);
    Eigen::AMDOrdering<int>()(Full(k), amd);
    CHECK(ours.indices() == amd.indices());
  }
}

}  // namespace
}  // namespace loopwright
