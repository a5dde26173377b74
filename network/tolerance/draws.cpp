#include "network/tolerance/draws.h"

#include <cmath>

namespace loopwright {

namespace {

uint64_t Mix(uint64_t z) {  // SplitMix64 finaliser
  z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ULL;
  z = (z ^ (z >> 27)) * 0x94d049bb133111ebULL;
  return z ^ (z >> 31);
}

// Streams of the Latin hypercube permutations, apart from the samples'.
constexpr uint64_t kPermutationStream = 0x8000000000000000ULL;

}  // namespace

uint64_t CounterHash(uint64_t seed, uint64_t a, uint64_t b) {
  return Mix(Mix(Mix(seed + 0x9e3779b97f4a7c15ULL) ^ a) + 0x9e3779b97f4a7c15ULL * (b + 1));
}

double CounterUniform(uint64_t seed, uint64_t a, uint64_t b) {
  return (static_cast<double>(CounterHash(seed, a, b) >> 11) + 0.5) * 0x1.0p-53;
}

SampleDraws::SampleDraws(const ToleranceSet& set, SampleMethod method, uint64_t seed, uint64_t samples)
    : set_(set), method_(method), seed_(seed), samples_(samples) {
  if (method_ != SampleMethod::kLatinHypercube) return;
  strata_.resize(set.size());
  for (size_t i = 0; i < set.size(); ++i) {
    std::vector<uint32_t>& p = strata_[i];
    p.resize(samples);
    for (uint64_t k = 0; k < samples; ++k) p[k] = static_cast<uint32_t>(k);
    for (uint64_t k = samples; k > 1; --k) {  // Fisher-Yates
      const uint64_t j = CounterHash(seed_, kPermutationStream + i, k) % k;
      std::swap(p[k - 1], p[j]);
    }
  }
}

void SampleDraws::Draw(uint64_t index, std::vector<double>* x) const {
  const size_t n = set_.size();
  std::vector<double> z(n);
  for (size_t i = 0; i < n; ++i) {
    double u = CounterUniform(seed_, index, i);
    if (method_ == SampleMethod::kLatinHypercube) u = (strata_[i][index] + u) / static_cast<double>(samples_);
    z[i] = NormalQuantile(u);
  }
  x->resize(n);
  for (size_t i = 0; i < n; ++i) {
    double zc = 0;
    for (size_t k = 0; k <= i; ++k) zc += set_.cholesky[i * n + k] * z[k];
    const Tolerance& t = set_.items[i];
    if (t.dist == Distribution::kNormal) (*x)[i] = t.a + t.b * zc;
    else if (t.dist == Distribution::kLogNormal) (*x)[i] = std::exp(t.a + t.b * zc);
    else (*x)[i] = t.Quantile(NormalCdf(zc));
  }
}

}  // namespace loopwright
