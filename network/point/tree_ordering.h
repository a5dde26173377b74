// Elimination order of the node-pressure matrix K (network/point/system.h),
// an ordering functor for Eigen's SimplicialLDLT.
//
// When the graph of K is a forest (no cycle among the free nodes: a supply
// header, a branched distribution tree) and large, the order is the reverse
// of a breadth-first order of each tree, taken from its lowest-numbered node:
// every node is then eliminated after all its children, with only its
// parent left uneliminated, so no entry fills in (the factor has the pattern
// of K's lower triangle), and nodes that are neighbours in the case stay
// neighbours in the factor, so the factorisation and the triangular solves
// run through memory in order. Any other graph, and any forest of fewer than
// kTreeOrderMinNodes nodes, gets the approximate minimum degree ordering
// (Amestoy, Davis & Duff 1996, as Eigen implements it), as before.
//
// Why a size floor: AMD also gives a forest no fill, and on a small system
// its cost and its scattered order do not matter; keeping AMD there keeps
// the rounding of every small case's factorisation as it was (the APU
// demo's late thermosiphon phase is sensitive to rounding: DEVELOPERS.md,
// "Open work"). At 10^6 header bearings AMD took 0.5 s once per solver and
// its scattered order made each factorisation miss the cache.
#pragma once

#include <Eigen/OrderingMethods>
#include <Eigen/SparseCore>

#include <vector>

namespace loopwright {

inline constexpr int kTreeOrderMinNodes = 2000;

// The reverse breadth-first order of a forest's pattern (column-major,
// symmetric, both triangles stored), as Eigen's orderings return it:
// order[k] = the node eliminated k-th. False when the graph has a cycle.
template <typename MatrixType>
bool ForestEliminationOrder(const MatrixType& sym, std::vector<int>* order) {
  const int n = static_cast<int>(sym.cols());
  // The neighbours of every node: read in place from a compressed pattern
  // (the ordering's own symmetric copy is one), else copied into
  // compressed form first. Diagonal entries are skipped as they come.
  std::vector<int> outer_copy, inner_copy;
  const int* outer = sym.isCompressed() ? sym.outerIndexPtr() : nullptr;
  const int* inner = sym.innerIndexPtr();
  if (!outer) {
    outer_copy.assign(n + 1, 0);
    inner_copy.reserve(sym.nonZeros());
    for (int j = 0; j < n; ++j) {
      for (typename MatrixType::InnerIterator it(sym, j); it; ++it) inner_copy.push_back(static_cast<int>(it.index()));
      outer_copy[j + 1] = static_cast<int>(inner_copy.size());
    }
    outer = outer_copy.data();
    inner = inner_copy.data();
  }
  long edges2 = 0;  // each edge twice: every node's list is walked once
  std::vector<char> seen(n, 0);
  std::vector<int> bfs;
  bfs.reserve(n);
  int trees = 0;
  for (int s = 0; s < n; ++s) {
    if (seen[s]) continue;
    ++trees;
    seen[s] = 1;
    size_t head = bfs.size();
    bfs.push_back(s);
    while (head < bfs.size()) {
      const int v = bfs[head++];
      for (int p = outer[v]; p < outer[v + 1]; ++p) {
        const int w = inner[p];
        if (w == v) continue;
        ++edges2;
        if (!seen[w]) {
          seen[w] = 1;
          bfs.push_back(w);
        }
      }
    }
  }
  if (edges2 / 2 != n - trees) return false;  // a forest has n - trees edges
  order->assign(bfs.rbegin(), bfs.rend());
  return true;
}

class TreeOrAmdOrdering {
 public:
  using PermutationType = Eigen::PermutationMatrix<Eigen::Dynamic, Eigen::Dynamic, int>;
  template <typename MatrixType>
  void operator()(const MatrixType& mat, PermutationType& perm) {
    std::vector<int> order;
    if (mat.cols() >= kTreeOrderMinNodes && ForestEliminationOrder(mat, &order)) {
      perm.resize(static_cast<int>(order.size()));
      for (size_t k = 0; k < order.size(); ++k) perm.indices()[k] = order[k];
      return;
    }
    Eigen::AMDOrdering<int>()(mat, perm);
  }
};

}  // namespace loopwright
