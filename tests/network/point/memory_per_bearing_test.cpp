// Memory per bearing of a supply header, counted, not timed: the heap bytes
// in use (a replaced global operator new/delete in this test executable
// counts every live byte and its peak) for the loaded case alone, and at the
// peak of load + solve + checks + the summary results document streamed to a
// sink, on generated headers (tests/tools/header_text.h, invented data) of
// N = 1,000 and 4,000 bearings (three components and two nodes each). A
// per-component string, a copy of the parsed document kept, a vector grown
// by doubling without a reserve or a report held as text for every
// component shows as more bytes per bearing; a quadratic structure as bytes
// per bearing that grow with N.
//
// The budgets are regression bounds on our own measurement (not a physical
// reference): measured at this commit with malloc_usable_size, at N = 4,000,
// case 1,562 B and peak 6,191 B per bearing; the goal is
// 1,500 B per bearing at the peak, results included (DEVELOPERS.md, "Memory
// layout", says what holds the rest). Lower the budget when memory falls.

#include <doctest/doctest.h>

#include <malloc.h>

#include <algorithm>
#include <atomic>
#include <cerrno>
#include <cstdlib>
#include <new>
#include <ostream>
#include <streambuf>
#include <string>

#include "network/case/case.h"
#include "network/envelope/checks.h"
#include "network/envelope/results.h"
#include "network/point/run.h"
#include "tests/tools/header_text.h"

// What a plant-size case holds per component and node (DEVELOPERS.md, "The
// case in fewer bytes"): a boundary's data, a component's part, bindings and
// feed margin apart; a check site without its place's name; a model's
// parameters as a pointer and a length (the values in the loop's arena).
static_assert(sizeof(loopwright::NodeSpec) <= sizeof(std::string) + 32, "a node: id, index, volume, elevation, kind, limits, conditions");
static_assert(sizeof(loopwright::ComponentSpec) <= sizeof(std::string) + 48, "a component: id, type, ends, model, limits, extras");
static_assert(sizeof(loopwright::CheckSite) <= 24, "a check site: parameter indices and kinds, no name");
static_assert(sizeof(loopwright::ParamArray) == 16, "a model's parameters: a pointer and a length");
static_assert(sizeof(loopwright::BranchOutcome) <= 72, "a branch's outcome: flows, internal unknowns, model in effect");

namespace {
// operator new's live bytes and peak; and every heap block's (the malloc
// family below), which also sees what Eigen allocates with malloc.
std::atomic<long long> live_bytes{0}, peak_bytes{0};
std::atomic<long long> heap_live{0}, heap_peak{0};

void Count(std::atomic<long long>& live, std::atomic<long long>& peak, long long delta) {
  const long long now = live += delta;
  long long was = peak.load();
  while (now > was && !peak.compare_exchange_weak(was, now)) {
  }
}
void Count(long long delta) { Count(live_bytes, peak_bytes, delta); }
long long Usable(void* p) { return p ? static_cast<long long>(malloc_usable_size(p)) : 0; }
void* Counted(void* p) {
  Count(heap_live, heap_peak, Usable(p));
  return p;
}
}  // namespace

void* operator new(std::size_t n) {
  void* p = std::malloc(n ? n : 1);
  if (!p) throw std::bad_alloc();
  Count(static_cast<long long>(malloc_usable_size(p)));
  return p;
}
void operator delete(void* p) noexcept {
  if (p) Count(-static_cast<long long>(malloc_usable_size(p)));
  std::free(p);
}
void operator delete(void* p, std::size_t) noexcept { operator delete(p); }

// glibc's malloc family replaced in this executable, each forwarding to
// glibc's own entry (the GNU C Library manual, "Replacing malloc"), so that
// the peak of the heap inside one call (a Newton iteration's work, Eigen's
// vectors included) is counted, which mallinfo2 before and after cannot see.
extern "C" {
void* __libc_malloc(std::size_t);
void* __libc_calloc(std::size_t, std::size_t);
void* __libc_realloc(void*, std::size_t);
void* __libc_memalign(std::size_t, std::size_t);
void* __libc_valloc(std::size_t);
void* __libc_pvalloc(std::size_t);
void __libc_free(void*);

void* malloc(std::size_t n) { return Counted(__libc_malloc(n)); }
void* calloc(std::size_t n, std::size_t size) { return Counted(__libc_calloc(n, size)); }
void* memalign(std::size_t align, std::size_t n) { return Counted(__libc_memalign(align, n)); }
void* aligned_alloc(std::size_t align, std::size_t n) { return Counted(__libc_memalign(align, n)); }
void* valloc(std::size_t n) { return Counted(__libc_valloc(n)); }
void* pvalloc(std::size_t n) { return Counted(__libc_pvalloc(n)); }
int posix_memalign(void** out, std::size_t align, std::size_t n) {
  void* p = __libc_memalign(align, n);
  if (!p) return ENOMEM;
  *out = Counted(p);
  return 0;
}
void free(void* p) {
  Count(heap_live, heap_peak, -Usable(p));
  __libc_free(p);
}
void* realloc(void* p, std::size_t n) {
  const long long before = Usable(p);
  void* q = __libc_realloc(p, n);
  if (q || n == 0) Count(heap_live, heap_peak, Usable(q) - before);  // moved, resized or freed (n == 0)
  return q;
}
}

namespace {

using loopwright::test::HeaderText;

// Discards what is written (the results document's bytes are not the subject).
class NullBuffer : public std::streambuf {
 protected:
  int overflow(int c) override { return c; }
  std::streamsize xsputn(const char*, std::streamsize n) override { return n; }
};

struct PerBearing {
  double case_bytes = 0;   // the loaded case, the text and the parsed document released
  double peak_bytes = 0;   // load, solve, checks and the summary document
  double point_bytes = 0;  // the point's own peak over the case: solver, result, checks, writing
  double result_bytes = 0;  // the point's result (nodes, branch outcomes, loop states)
  // glibc's heap in use (HeapInUse), which also sees what Eigen allocates
  // with malloc (its vectors and sparse matrices; the operator new count
  // does not): the CaseSolver as built, and a one-shot solve's solver and
  // result together once its Newton work is freed (CaseSolver::one_shot).
  double solver_heap = 0, one_shot_heap = 0;
  // Every heap block (the malloc family's count): the CaseSolver as built
  // and applied with its starting guess, and the peak of its solve from
  // that guess over the case (NetworkSolver::Solve, from_guess: the Newton
  // phase of a one-shot solve, before any result).
  double newton_heap = 0;
};

// glibc's heap in use: arena chunks and mmapped blocks, headers included.
long long HeapInUse() {
  const struct mallinfo2 mi = mallinfo2();
  return static_cast<long long>(mi.uordblks + mi.hblkhd);
}

// The heap a CaseSolver of `cs` holds as built, and with one_shot what it
// still holds with its result after solving the first point.
void MeasureSolverHeap(const loopwright::Case& cs, int n, PerBearing* out) {
  const long long at_case = HeapInUse();
  loopwright::CaseSolver solver(cs);
  out->solver_heap = double(HeapInUse() - at_case) / n;
  solver.one_shot = true;
  const loopwright::PointResult res = solver.Solve(cs.envelope.points[0], false);
  REQUIRE(res.converged);
  out->one_shot_heap = double(HeapInUse() - at_case) / n;
  MESSAGE("N = " << n << ": glibc heap: the solver as built " << out->solver_heap << " B per bearing, a one-shot solve's "
                 << "solver and result " << out->one_shot_heap << " B");
}

// The Newton phase's heap (PerBearing::newton_heap).
void MeasureNewtonHeap(const loopwright::Case& cs, int n, PerBearing* out) {
  const long long at_case = heap_live.load();
  loopwright::CaseSolver solver(cs);
  solver.Apply(cs.envelope.points[0]);
  solver.sys.StartingGuess(&solver.u);
  heap_peak = heap_live.load();
  const loopwright::SolverSummary s = solver.solver.Solve(&solver.u, true);
  REQUIRE(s.converged());
  out->newton_heap = double(heap_peak.load() - at_case) / n;
  MESSAGE("N = " << n << ": the Newton phase's heap (solver and its work at their peak) " << out->newton_heap
                 << " B per bearing");
}

PerBearing Measure(int n) {
  PerBearing out;
  const long long base = live_bytes.load();
  peak_bytes = base;
  std::unique_ptr<loopwright::Case> cs;
  {
    const std::string text = HeaderText(n);
    const long long text_bytes = live_bytes.load() - base;
    loopwright::LoadResult r = loopwright::LoadCaseText(text, "header", loopwright::DefaultLibraryDir(), text.size());
    INFO(r.diagnostics.Format("header"));
    REQUIRE(r.value != nullptr);
    cs = std::move(r.value);
    out.case_bytes = double(live_bytes.load() - base - text_bytes) / n;
  }
  const double load_peak = double(peak_bytes.load() - base) / n;
  {
    // The point's own bytes, counted from the loaded case: its peak apart
    // from the load's, and what each part holds.
    const long long at_case = live_bytes.load(), peak_before = peak_bytes.load();
    peak_bytes = at_case;
    loopwright::CaseSolver solver(*cs);
    const long long at_solver = live_bytes.load();
    const loopwright::OperatingPoint& op = cs->envelope.points[0];
    const loopwright::PointResult res = solver.Solve(op, false);
    REQUIRE(res.converged);
    const long long at_result = live_bytes.load();
    std::vector<loopwright::CheckWarning> warnings;
    const std::vector<loopwright::CheckOutcome> checks = loopwright::EvaluateChecks(*cs, op, res, &warnings);
    const long long at_checks = live_bytes.load();
    NullBuffer sink;
    std::ostream os(&sink);
    loopwright::ResultsExtras extras;
    extras.point_checks = {&checks};
    loopwright::WriteResultsJson(os, *cs, {&res}, "pass", extras, loopwright::JsonDetail::kSummary);
    out.point_bytes = double(peak_bytes.load() - at_case) / n;
    out.result_bytes = double(at_result - at_solver) / n;
    MESSAGE("N = " << n << ": the point's peak " << out.point_bytes << " B per bearing: solver " << double(at_solver - at_case) / n
                   << " B, result " << double(at_result - at_solver) / n << " B, checks " << double(at_checks - at_result) / n
                   << " B (" << checks.size() << " outcomes)");
    peak_bytes = std::max(peak_before, peak_bytes.load());
  }
  out.peak_bytes = double(peak_bytes.load() - base) / n;
  MeasureSolverHeap(*cs, n, &out);
  MeasureNewtonHeap(*cs, n, &out);
  MESSAGE("N = " << n << ": case " << out.case_bytes << " B, peak " << out.peak_bytes << " B per bearing (of the load alone "
                << load_peak << " B)");
  return out;
}

// The solver's pins, by glibc's count (Eigen's vectors included), at N = 4,000.
void CheckSolverHeap(const PerBearing& small, const PerBearing& large) {
  // The solver as built: 521 B per bearing on 2026-12-05 (677 B before
  // "The Newton phase in fewer bytes", 966 B before "The solver in fewer
  // bytes"; DEVELOPERS.md). 3.6 % over: a double more per unknown (40 B per
  // bearing) or per branch (24 B) crosses it.
  CHECK(large.solver_heap <= 540);
  CHECK(small.solver_heap / large.solver_heap == doctest::Approx(1).epsilon(0.1));
  // The Newton phase (the solver as built, its point applied and its start
  // guessed, at the peak of its solve; the malloc family's count): 593 B
  // (about 790 B before that day's work). A vector of the unknowns held
  // beside the iteration's (40 B per bearing) crosses the bound, 3.7 % over.
  CHECK(large.newton_heap <= 615);
  CHECK(small.newton_heap / large.newton_heap == doctest::Approx(1).epsilon(0.1));
  // A one-shot solve's solver and result once its Newton work is freed:
  // 597 B (945 B before the result and the Newton phase in fewer bytes);
  // holding the work beside the result (about 1,700 B by lw_bench) crosses
  // the bound, 4.5 % over.
  CHECK(large.one_shot_heap <= 625);
}

}  // namespace

// Regression budgets per bearing at N = 4,000, each a few per cent over its
// measurement of 2026-12-05 (DEVELOPERS.md has each step's history: "The
// case in fewer bytes", "The solver in fewer bytes", "The result in fewer
// bytes", "The Newton phase in fewer bytes", "Reading in windows").
TEST_CASE("heap bytes per header bearing: the case and the peak of load, solve, checks and summary results") {
  const PerBearing small = Measure(1000), large = Measure(4000);
  // The case: 586 B (1,682 B on 2026-12-03). A component's `type` view back
  // in ComponentSpec (16 B), or a heap block per model again (about 100 B
  // with its parameters), crosses it; 1.5 % over.
  CHECK(large.case_bytes <= 595);
  // The point's own peak over the case (solver, result, checks, writing):
  // 991 B (2,831 B on 2026-12-04); 4 % over.
  CHECK(large.point_bytes <= 1035);
  // The result alone: 312 B (two nodes at 40 B, three outcomes at 72 B, and
  // their vectors' slack; 600 B with 168 B outcomes). One double more per
  // outcome (24 B per bearing) crosses the bound.
  CHECK(large.result_bytes <= 330);
  CheckSolverHeap(small, large);
  // The whole peak: 1,713 B, the load's (the case beside a window of its
  // text); about 4 % over.
  CHECK(large.peak_bytes <= 1780);
  // Linear: what a bearing costs does not grow with N. The case: the bytes
  // a bearing adds from N = 1,000 to 4,000 against its share at 4,000,
  // which holds the fixed part spread over it (the parts library, fluids,
  // the check table, an arena's first block and its table of shared lists:
  // about 190 kB, 48 B a bearing at 4,000, so the share per bearing at
  // 1,000 is 23 % over; bytes per bearing that grew with N would make the
  // added bytes exceed the share).
  const double case_added = (large.case_bytes * 4000 - small.case_bytes * 1000) / 3000;
  MESSAGE("the case: " << case_added << " B added per bearing from N = 1,000 to 4,000");
  CHECK(case_added / large.case_bytes == doctest::Approx(1).epsilon(0.1));
  CHECK(small.peak_bytes / large.peak_bytes == doctest::Approx(1).epsilon(0.1));
  CHECK(small.point_bytes / large.point_bytes == doctest::Approx(1).epsilon(0.1));
}
