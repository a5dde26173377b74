// A per-thread memo of a pure function of a few doubles, keyed by their
// exact bits: a remembered value is the value the function returns for
// those inputs, so results do not change by a single bit (the fluid models'
// properties: library/water.cpp, library/oil.cpp). Direct-mapped (a
// colliding key replaces the slot), kSize entries. Use one `thread_local`
// instance per function; every input the value depends on (the state and
// any parameter that can change, such as an oil's Walther constants) must be
// part of the key.
#pragma once

#include <array>
#include <cstdint>
#include <cstring>

namespace loopwright {

template <class V, size_t N = 2, size_t kSize = 512>
struct Memo {
  static_assert((kSize & (kSize - 1)) == 0, "kSize must be a power of two");
  struct Entry {
    std::array<uint64_t, N> key;
    bool used = false;
    V value{};
  };
  Entry e[kSize];

  // The value for `x` (exact bits), computed by `compute()` on a miss.
  template <class F>
  const V& Get(const std::array<double, N>& x, F compute) {
    std::array<uint64_t, N> key;
    std::memcpy(key.data(), x.data(), sizeof(uint64_t) * N);
    uint64_t h = 0;
    for (uint64_t k : key) h = (h ^ k) * 0x9E3779B97F4A7C15ULL;
    Entry& slot = e[(h >> 55) & (kSize - 1)];
    if (!slot.used || slot.key != key) {
      slot.value = compute();
      slot.key = key;
      slot.used = true;
    }
    return slot.value;
  }
};

}  // namespace loopwright
