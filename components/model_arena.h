// ModelArena: the storage of a loaded case's models (network/case/case.h,
// one per loop). A case's models are read-only once loaded (a solver
// evaluates them shared, or works on its own heap clones), so they are
// packed one after another in large blocks instead of a heap allocation
// each, and identical parameter lists are stored once: a plant-size case of
// 10^6 alike bearings holds one copy of a bearing's parameters, not 10^6.
//
// A placed model's parameters are lent (components/param_array.h): any write
// through params() copies them into the model's own block first, and a
// clone owns its copy. ModelDeleter (components/component.h) destroys a
// placed model without freeing it; the arena frees its blocks when it goes,
// so it must outlive its models (LoopSpec declares it before its components).
#pragma once

#include <cstddef>
#include <cstdint>
#include <memory>
#include <vector>

#include "components/component.h"

namespace loopwright {

class ModelArena {
 public:
  ModelArena() = default;
  ModelArena(ModelArena&&) noexcept = default;
  ModelArena& operator=(ModelArena&&) noexcept = default;
  ModelArena(const ModelArena&) = delete;
  ModelArena& operator=(const ModelArena&) = delete;

  // Moves `model` into the arena, its parameters shared with an identical
  // list placed before when one is remembered. Null stays null.
  ModelPtr Place(std::unique_ptr<Component> model);
  // Bytes taken from the blocks (models and distinct parameter lists).
  size_t used_bytes() const { return used_; }

 private:
  void* Allocate(size_t bytes, size_t align);
  const double* ShareParams(const ParamArray& p);

  // The last list placed under each hash slot: a list seen again while its
  // slot still holds it is shared; a fixed number of slots, so a case whose
  // lists all differ spends nothing per model on finding none.
  struct Shared {
    const double* values = nullptr;
    size_t size = 0;
  };
  static constexpr size_t kSharedSlots = 1024;
  static constexpr size_t kBlockBytes = size_t(1) << 16;
  std::vector<std::unique_ptr<unsigned char[]>> blocks_;
  std::vector<Shared> shared_;  // kSharedSlots once the first list is placed
  unsigned char* next_ = nullptr;
  size_t left_ = 0;
  size_t used_ = 0;
};

}  // namespace loopwright
