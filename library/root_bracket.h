// A root of a scalar function inside a sign-changing bracket.
//
// IllinoisRoot: the Illinois variant of false position (Dowell & Jarratt,
// BIT 11, 1971, from memory): each step is the secant through the bracket's
// ends, and an end kept twice in a row has its function value halved, so
// the order of convergence is about 1.44 and the bracket never opens. It
// needs g(a) <= 0 <= g(b) with a < b (an increasing g; for a decreasing one
// pass -g) and returns x with |g(x)| < g_tol or a bracket narrower than
// x_tol around it, after at most 200 steps. Unlike a bisection stopped at a
// width, the answer is the root to the tolerance asked, so it moves smoothly
// with the inputs: a difference quotient of a law that embeds it (the
// tangents' directional differences, a step of 1e-7 of the state) sees no
// staircase.
#pragma once

#include <cmath>

namespace loopwright {

template <class G>
double IllinoisRoot(const G& g, double a, double b, double ga, double gb, double g_tol, double x_tol) {
  double x = a;
  int side = 0;
  for (int it = 0; it < 200; ++it) {
    x = gb == ga ? 0.5 * (a + b) : (a * gb - b * ga) / (gb - ga);
    const double gx = g(x);
    if (std::fabs(gx) < g_tol || b - a < x_tol) break;
    if (gx > 0) {
      b = x, gb = gx;
      if (side == -1) ga *= 0.5;
      side = -1;
    } else {
      a = x, ga = gx;
      if (side == +1) gb *= 0.5;
      side = +1;
    }
  }
  return x;
}

}  // namespace loopwright
