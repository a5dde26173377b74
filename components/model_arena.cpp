#include "components/model_arena.h"

#include <cstring>

namespace loopwright {

void* ModelArena::Allocate(size_t bytes, size_t align) {
  const size_t pad = (align - reinterpret_cast<uintptr_t>(next_) % align) % align;
  if (!next_ || pad + bytes > left_) {
    const size_t size = bytes + align > kBlockBytes ? bytes + align : kBlockBytes;
    blocks_.emplace_back(new unsigned char[size]);  // not zeroed: a page is touched when a model is placed on it
    next_ = blocks_.back().get();
    left_ = size;
    return Allocate(bytes, align);
  }
  unsigned char* at = next_ + pad;
  next_ = at + bytes;
  left_ -= pad + bytes;
  used_ += bytes;
  return at;
}

const double* ModelArena::ShareParams(const ParamArray& p) {
  // FNV-1a over the values' 64-bit words (a word at a time: a byte at a
  // time was a fifth of a header component's load), then folded.
  uint64_t h = 14695981039346656037ull;
  for (size_t i = 0; i < p.size(); ++i) {
    uint64_t word;
    std::memcpy(&word, p.data() + i, sizeof word);
    h = (h ^ word) * 1099511628211ull;
    h ^= h >> 29;
  }
  if (shared_.empty()) shared_.resize(kSharedSlots);
  Shared& slot = shared_[(h ^ (h >> 32)) % kSharedSlots];
  if (slot.values && p.SameBits(slot.values, slot.size)) return slot.values;
  double* copy = static_cast<double*>(Allocate(p.size() * sizeof(double), alignof(double)));
  std::memcpy(copy, p.data(), p.size() * sizeof(double));
  slot = {copy, p.size()};
  return copy;
}

ModelPtr ModelArena::Place(std::unique_ptr<Component> model) {
  if (!model) return nullptr;
  Component* placed = model->MoveTo(Allocate(model->Footprint(), model->FootprintAlign()));
  placed->placed_ = true;
  const ParamArray& values = static_cast<const Component*>(placed)->params();
  if (!values.empty()) {
    const double* shared = ShareParams(values);
    placed->params().Lend(shared, values.size());
  }
  return ModelPtr(placed);
}

}  // namespace loopwright
