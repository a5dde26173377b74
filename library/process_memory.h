// How the process takes memory from the system: one setting at start-up.
//
// A plant-size case is read, solved and written through a few large,
// short-lived buffers (the parsed document of the case file beside the Case
// being built, the solver's arrays, the results). With glibc's defaults each
// buffer over 128 KiB (up to 32 MiB after the dynamic threshold has grown) is
// a fresh mmap that is unmapped when freed, and the top of the heap is given
// back past 128 KiB free: every such buffer is first touched page by page
// (a minor page fault and the kernel zeroing 4 KiB), and what one phase
// freed, the next phase faults in again. At N = 10^5 header bearings that
// was about a third of the load's wall time (system time) and a good part
// of the solve's.
//
// KeepFreedMemory() makes every block come from the heap (M_MMAP_MAX = 0)
// and never trims it (M_TRIM_THRESHOLD at its largest), so memory freed by
// one phase is reused by the next without new page faults. The peak
// resident size does not grow (the peak is reached while loading, when both
// the parsed document and the Case are alive); the process simply keeps it
// until it exits, which for a command-line run is moments later.
// Measured (supply header, `lw_bench --case`, 2 idle cores, alternated,
// 2026-12-04): N = 10^5 load 0.52 -> 0.42-0.44 s, solve 0.33-0.34 ->
// 0.27-0.28 s, peak RSS 413 MB both (DEVELOPERS.md, "The allocator kept").
//
// glibc only (mallopt, <malloc.h>); elsewhere it does nothing. Call once at
// program start, before any allocation worth keeping; idempotent.
#pragma once

namespace loopwright {

void KeepFreedMemory();

// Gives the pages of every free heap block back to the system (glibc's
// malloc_trim(0)); elsewhere nothing. For a phase boundary of a one-shot
// run of a plant-size case, where what one phase freed would otherwise stay
// resident beside the next phase's larger blocks: a one-shot solve calls it
// after its Newton work and after its solver are freed (10^6 header: peak
// 1.85 -> 1.55 GB; DEVELOPERS.md "After the three merges").
void GiveBackFreedMemory();

}  // namespace loopwright
