#include "components/bearing_film_report.h"

#include <fmt/format.h>

namespace loopwright {

namespace {
constexpr double kRadToDeg = 57.29577951308232;
constexpr double kTrumplerBase = 0.0002 * 0.0254;  // m
constexpr double kTrumplerPerDiameter = 0.00004;   // m per m
}  // namespace

double TrumplerFilmThickness(double diameter) { return kTrumplerBase + kTrumplerPerDiameter * diameter; }

void ReportLoadedFilm(const LoadedFilmView& v, ComponentReport* out) {
  const FilmSolution& f = v.film;
  const LandFilm& g = v.geometry;
  const double h0 = g.clearance * (1.0 - f.eps);
  const bool rb = v.method >= 2;
  auto item = [&](const char* name, double value, Dimension dim, std::string text = "") {
    out->items.push_back({v.prefix + name, value, dim, std::move(text)});
  };
  item("sommerfeld_number", f.sommerfeld, Dimension::kDimensionless, rb ? "raimondi_boyd_1958" : "ocvirk_1952");
  item("eccentricity", f.eps, Dimension::kDimensionless);
  item("attitude_angle_deg", f.attitude_rad * kRadToDeg, Dimension::kDimensionless);
  item("min_film_thickness", h0, Dimension::kLength);
  item("film_thickness_trumpler", TrumplerFilmThickness(2.0 * g.radius), Dimension::kLength);
  item("unit_load", g.UnitLoad(v.load), Dimension::kPressureDifference);
  if (f.range & kFilmResting) {
    out->warnings.push_back(fmt::format("{}{}: the journal rests on its bush and the film carries no load; eccentricity held at "
                                        "{:.2f} (the land-flow law there)", v.name,
                                        f.sommerfeld > 0 ? fmt::format("lift-off not reached (Sommerfeld number {:.3g})",
                                                                       f.sommerfeld)
                                                         : std::string("rotor stopped"),
                                        f.eps));
  } else if (f.range & kFilmHeavierThanTable) {
    out->warnings.push_back(fmt::format("{}Sommerfeld number {:.3g} below the {} range (eccentricity above 0.97): eccentricity "
                                        "{:.3f} extrapolated", v.name, f.sommerfeld, rb ? "Raimondi & Boyd tables'" : "short-bearing", f.eps));
  }
  if (f.range & kFilmLengthOutside)
    out->warnings.push_back(rb ? fmt::format("{}land length ratio l'/D {:.3f} outside Raimondi & Boyd's tables (1/4 to 1): read at "
                                             "the nearer table", v.name, g.LengthRatio())
                               : fmt::format("{}land length ratio l'/D {:.3f} above 1: short-bearing theory under-predicts the "
                                             "eccentricity (use raimondi_boyd_1958)", v.name, g.LengthRatio()));
  if (f.eps > 0.9 && !(f.range & kFilmResting))
    out->warnings.push_back(fmt::format("{}eccentricity {:.3f} above 0.9: a film of {:.1f} um is thin enough for roughness, elastic "
                                        "and thermal effects outside the isoviscous film model", v.name, f.eps, h0 * 1e6));
}

}  // namespace loopwright
