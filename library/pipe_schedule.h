// Nominal pipe sizes and their bores: ASME B36.10M, Schedule 40 (standard
// wall), NPS 1/8 to 4, outside diameter minus twice the nominal wall, in
// inches (from memory). The catalog a suggested pipe diameter is snapped to
// (network/envelope/fixes.h); tubes and hoses snap to the parts library
// (library/parts/lines.json). Kept here as data rather than as library parts:
// every case load reads every part file, and twelve more parts would cost
// each load more than a 1,000-bearing case's per-bearing share
// (tests/cases/load_linear_test.cpp).
#pragma once

namespace loopwright {

struct PipeSize {
  const char* id;   // "NPS 3/8 Sch 40"
  double od_in, wall_in;
  double BoreMetres() const { return (od_in - 2 * wall_in) * 0.0254; }  // 1 in = 25.4 mm exactly
};

inline constexpr PipeSize kPipeSchedule40[] = {
    {"NPS 1/8 Sch 40", 0.405, 0.068},   {"NPS 1/4 Sch 40", 0.540, 0.088},   {"NPS 3/8 Sch 40", 0.675, 0.091},
    {"NPS 1/2 Sch 40", 0.840, 0.109},   {"NPS 3/4 Sch 40", 1.050, 0.113},   {"NPS 1 Sch 40", 1.315, 0.133},
    {"NPS 1-1/4 Sch 40", 1.660, 0.140}, {"NPS 1-1/2 Sch 40", 1.900, 0.145}, {"NPS 2 Sch 40", 2.375, 0.154},
    {"NPS 2-1/2 Sch 40", 2.875, 0.203}, {"NPS 3 Sch 40", 3.500, 0.216},     {"NPS 4 Sch 40", 4.500, 0.237},
};

}  // namespace loopwright
