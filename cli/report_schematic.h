// The loop drawn for the report: every loop of the case laid out by
// Graphviz's "dot" engine (libgvc/libcgraph, linked), rendered to SVG.
//
// Drawing: each loop is a framed cluster; its nodes are small ellipses
// labelled with their id and, at the annotated point, gauge pressure and
// temperature; its components are nodes of our own simple shapes by role
// (pump: circle, bearing: rounded box, filter: diamond, valves and
// regulators: hexagon, heat exchangers: double octagon, lines and drains:
// plain box, others: box) labelled with id, type, part and flow at the
// point; edges run from a component's from-node through it to its to-node
// (the positive flow direction). Every place with a check is drawn by the
// worst margin of its checks over the envelope: FAIL (bold outline, red),
// tight (dashed outline, amber) or pass (thin solid outline, light green),
// with the class also written in its label, so the drawing reads in
// grey scale; places without a check are white with a dotted outline.
#pragma once

#include <string>
#include <vector>

#include "library/units.h"
#include "network/case/case.h"
#include "network/envelope/checks.h"
#include "network/point/run.h"

namespace loopwright::cli {

// The SVG (without XML prolog) of the case's loops annotated at `at` (a
// converged point; nullptr: topology only), margins classed by `summary`
// with the tight band of `tight` (fixes.h TightBand). "" and *error set when
// Graphviz fails.
std::string LoopSchematicSvg(const Case& cs, const PointResult* at, const std::vector<CheckSummary>& summary,
                             double tight, UnitSystem us, std::string* error);

// The legend, as an HTML fragment with the same outline styles drawn in SVG.
std::string SchematicLegendHtml();

}  // namespace loopwright::cli
