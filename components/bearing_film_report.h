// The report items of a hydrodynamic film whose eccentricity follows from
// its load, shared by journal_bearing (one film) and floating_ring_bearing
// (an inner and an outer film, items prefixed "inner_" and "outer_").
//
// Items: Sommerfeld number (its text names the method), eccentricity,
// attitude angle [deg], minimum film thickness h0 = c (1 - eps), Trumpler's
// least h0 for the film's diameter d, 0.0002 in + 0.00004 d (Shigley's
// Mechanical Engineering Design, 9th ed., ch. 12, from memory), and the
// unit load W / (2 l' d). Warnings (prefixed with the film's name): a
// Sommerfeld number below the method's range (eccentricity extrapolated), a
// land length ratio outside it, eccentricity above 0.9 (film thin enough for
// roughness, elastic and thermal effects outside the isoviscous model).
//
// Inputs (SI): the film geometry (radius, clearance, land length [m]), its
// solution (components/correlations/journal_film.h), the load [N].
#pragma once

#include <string>

#include "components/component.h"
#include "components/correlations/journal_film.h"

namespace loopwright {

struct LoadedFilmView {
  std::string prefix;  // "" for a plain journal; "inner_" / "outer_"
  std::string name;    // for warnings: "" or "inner film: "
  int method = 1;      // 1 Ocvirk, 2 Raimondi & Boyd
  LandFilm geometry;
  FilmSolution film;
  double load = 0;     // [N]
};

// Trumpler's least minimum film thickness for a film of diameter d [m].
double TrumplerFilmThickness(double diameter);

void ReportLoadedFilm(const LoadedFilmView& v, ComponentReport* out);

}  // namespace loopwright
