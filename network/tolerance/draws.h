// Drawing tolerance samples: a pure function of (tolerances, method, seed,
// number of samples, global sample index), so any thread or shard draws the
// same values for a sample.
//
// Random numbers are counter-based: the uniform for (sample s, tolerance i)
// is U(seed, s, i) = (SplitMix64 finaliser of a mix of the three) / 2^64,
// no state carried from one number to the next (Steele, Lea & Flood,
// "Fast splittable pseudorandom number generators", OOPSLA 2014, for the
// SplitMix64 finaliser; from memory).
//   Monte Carlo     u_i = U(seed, s, i)
//   Latin hypercube u_i = (pi_i(s) + U(seed, s, i)) / S, pi_i a random
//                   permutation of 0..S-1 per tolerance (Fisher-Yates driven
//                   by the same counter stream), so each of the S equal-
//                   probability strata of every tolerance holds one sample
//                   (McKay, Beckman & Conover, Technometrics 21 (1979) 239).
// Then z = Phi^-1(u), the correlated z' = L z (L the Cholesky factor of the
// case's correlation matrix; identity without correlations), and
// x_i = F_i^-1(Phi(z'_i)) (normal: mean + sd z'_i exactly; log-normal:
// exp(ln median + sd_log z'_i)).
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "network/case/tolerances.h"

namespace loopwright {

enum class SampleMethod { kMonteCarlo, kLatinHypercube };

// 64-bit counter-based hash and the uniform in (0, 1) it gives.
uint64_t CounterHash(uint64_t seed, uint64_t a, uint64_t b);
double CounterUniform(uint64_t seed, uint64_t a, uint64_t b);

class SampleDraws {
 public:
  SampleDraws(const ToleranceSet& set, SampleMethod method, uint64_t seed, uint64_t samples);
  // The values (SI) of every tolerance for global sample `index` into *x.
  void Draw(uint64_t index, std::vector<double>* x) const;

 private:
  const ToleranceSet& set_;
  SampleMethod method_;
  uint64_t seed_, samples_;
  std::vector<std::vector<uint32_t>> strata_;  // Latin hypercube: per tolerance, stratum of each sample
};

}  // namespace loopwright
