// ParamArray: a model's parameter values (components/component.h), 16 bytes
// beside the values instead of a std::vector's 24, with the part of the
// vector's interface the models and the network use (size, [], data, begin,
// end, assignment from a vector).
//
// The values are either owned (a heap block of exactly size() doubles, as a
// working copy's) or lent: they lie in storage someone else keeps and never
// writes (a loaded case's model arena, components/model_arena.h, which keeps
// one copy of identical parameter lists). A lent array is copied into its
// own block before anything is written through it (the non-const accessors),
// so a write never reaches another model's values. A copy of either kind owns
// its values.
#pragma once

#include <cstdint>
#include <cstring>
#include <limits>
#include <vector>

namespace loopwright {

class ParamArray {
 public:
  ParamArray() = default;
  ParamArray(const ParamArray& o) { Assign(o.data_, o.size_); }
  ParamArray(ParamArray&& o) noexcept : data_(o.data_), size_(o.size_), owned_(o.owned_) {
    o.data_ = nullptr, o.size_ = 0, o.owned_ = false;
  }
  ParamArray& operator=(const ParamArray& o) {
    if (this != &o) Assign(o.data_, o.size_);
    return *this;
  }
  ParamArray& operator=(const std::vector<double>& v) {
    Assign(v.data(), v.size());
    return *this;
  }
  ~ParamArray() { Free(); }

  size_t size() const { return size_; }
  bool empty() const { return size_ == 0; }
  const double& operator[](size_t i) const { return data_[i]; }
  const double* data() const { return data_; }
  const double* begin() const { return data_; }
  const double* end() const { return data_ + size_; }
  double& operator[](size_t i) { return Writable()[i]; }
  double* data() { return Writable(); }
  double* begin() { return Writable(); }
  double* end() { return Writable() + size_; }
  std::vector<double> ToVector() const { return std::vector<double>(begin(), end()); }
  // Same length and the same bits in every value (NaN equal to itself).
  bool SameBits(const double* values, size_t n) const {
    return n == size_ && (n == 0 || std::memcmp(data_, values, n * sizeof(double)) == 0);
  }

  // The values followed by state slots up to `slots` in all (NaN until
  // written), in one block of that size.
  void AssignWithSlots(const std::vector<double>& values, size_t slots) {
    const size_t n = values.size() > slots ? values.size() : slots;
    Reallocate(n);
    if (!values.empty()) std::memcpy(data_, values.data(), values.size() * sizeof(double));
    for (size_t i = values.size(); i < n; ++i) data_[i] = std::numeric_limits<double>::quiet_NaN();
  }
  // Reads `n` values at `values` from now on, without owning or writing
  // them (the caller keeps them for this array's life; model_arena.h).
  void Lend(const double* values, size_t n) {
    Free();
    data_ = const_cast<double*>(values);
    size_ = static_cast<uint32_t>(n);
  }
  bool lent() const { return data_ != nullptr && !owned_; }

 private:
  void Assign(const double* values, size_t n) {
    if (!owned_ || n != size_) Reallocate(n);
    if (n) std::memmove(data_, values, n * sizeof(double));
  }
  void Reallocate(size_t n) {
    Free();
    if (n == 0) return;
    data_ = new double[n];
    size_ = static_cast<uint32_t>(n);
    owned_ = true;
  }
  void Free() {
    if (owned_) delete[] data_;
    data_ = nullptr, size_ = 0, owned_ = false;
  }
  // The values as this array's own before a write (a lent array is copied).
  double* Writable() {
    if (lent()) {
      const double* shared = data_;
      const size_t n = size_;
      data_ = nullptr, size_ = 0;
      Reallocate(n);
      std::memcpy(data_, shared, n * sizeof(double));
    }
    return data_;
  }

  double* data_ = nullptr;
  uint32_t size_ = 0;
  bool owned_ = false;
};

}  // namespace loopwright
