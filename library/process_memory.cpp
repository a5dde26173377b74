#include "library/process_memory.h"

#include <climits>

#if defined(__GLIBC__)
#include <malloc.h>
#endif

namespace loopwright {

void KeepFreedMemory() {
#if defined(__GLIBC__)
  mallopt(M_MMAP_MAX, 0);              // every block from the heap: freed memory is reused
  mallopt(M_TRIM_THRESHOLD, INT_MAX);  // the heap's free top is kept, not given back
  mallopt(M_TOP_PAD, 16 << 20);        // the heap grows 16 MiB at a time (fewer brk calls)
#endif
}

void GiveBackFreedMemory() {
#if defined(__GLIBC__)
  malloc_trim(0);
#endif
}

}  // namespace loopwright
