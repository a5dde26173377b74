// Small helpers for fixed-pattern sparse matrices (internal to network/).
#pragma once

#include <Eigen/SparseCore>

#include <algorithm>

namespace loopwright {

// Position of (row, col) in the compressed-column value array of `a`, or -1
// when the entry is not in the pattern (or row/col is negative).
inline int FindSlot(const Eigen::SparseMatrix<double>& a, int row, int col) {
  if (row < 0 || col < 0) return -1;
  const int* outer = a.outerIndexPtr();
  const int* inner = a.innerIndexPtr();
  const int* begin = inner + outer[col];
  const int* end = inner + outer[col + 1];
  const int* it = std::lower_bound(begin, end, row);
  return (it != end && *it == row) ? static_cast<int>(it - inner) : -1;
}

}  // namespace loopwright
