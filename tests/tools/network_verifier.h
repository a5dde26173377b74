// Independent verification of solved points, and one campaign case end to
// end (generate, load through LoadCaseText, solve, verify), shared by
// tests/network/point/random_networks_test.cpp and `lw_bench --campaign N`.
//
// A converged point is checked from its results document (PointJson: what
// `solve --json` writes) and the case document alone, with the formulas of
// tests/tools/campaign_physics.h, never with the solver's own bookkeeping:
//  - mass balance at every free node, from the reported branch mass flows
//    (|sum| <= 1e-9 of the loop's largest branch flow);
//  - every reported volumetric flow against the mass flow and an independent
//    oil density at the branch's upstream temperature (1e-8);
//  - every absolute pressure above zero (oil) or above the IAPWS-IF97
//    saturation pressure (water), and reservoir/tank pressures = surface +
//    rho g level (oil);
//  - the law of every fixed-law component from its reported flow and
//    pressures (relative 1e-6 + 1e-4 Pa; valves 1e-5 for rho0): pipe/tube/hose
//    (Darcy-Weisbach, Churchill 1977 f, constant K), orifice and jet-fed
//    rolling bearing (beta = 0), valve (Kv, no viscous correction), journal
//    bearing side flow, filter (housing + element with its bypass ramp),
//    datasheet_loss and air-cooler liquid side, displacement pump (geometric
//    flow - laminar slip - internal relief ramp), centrifugal pump (quadratic
//    through its three curve points, affinity laws). Oil loops use
//    independent oil properties; water loops use the reported density
//    (m/Q) and check only laws that need no viscosity (pipes in water loops
//    are skipped: IAPWS 2008 viscosity is not re-implemented here).
//    relief_valve is checked shut, on the straight middle of its lift line
//    and at full open (its two rounded corners are skipped); check_valve is
//    not checked: counted as skipped;
//  - thermal points: per loop, sum of reported branch heats + node heats +
//    coupling duties - reservoir losses = 0 (1e-6 of the gross + 1e-3 W); at
//    every free oil node, the enthalpy balance with Cragoe's cp integrated
//    independently (1e-6 of the enthalpy flows + 1e-3 W); oil temperatures
//    outside -40..200 degC must carry a warning.
// A non-converged point must carry a cause: a non-empty cause in words
// (SolverSummary::cause, else it is counted as silent) and a place with
// non-empty largest residuals (SolverSummary::place and worst, else it is
// counted as unplaced; see README "Tests").
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

namespace loopwright::campaign {

struct PointCheck {
  int laws_checked = 0, laws_skipped = 0, nodes_checked = 0, energy_checked = 0;
  std::vector<std::string> failures;  // each names the place, the check and the numbers
};

// Verifies one converged point (`point` as written by PointJson) of the case
// document `case_doc` solved at ambient pressure `ambient_pa`.
PointCheck VerifyConverged(const nlohmann::json& case_doc, const nlohmann::json& point, double ambient_pa);

struct CaseOutcome {
  std::string name;
  bool loaded = false, converged = false;
  bool silent = false;           // converged but failing verification, or not converged without a cause
  bool unplaced = false;         // not converged with a cause but no place or no residual rows
  std::string cause;             // class of a non-converged point: termination and message head
  std::string detail;            // load errors, failures, or the full solver report
  bool thermal = false, water_loop = false;
  int pipes = 0, components = 0;
  double seconds = 0;            // load + solve + verify
  PointCheck check;
};

// Loads `doc` with LoadCaseText (as the CLI does), solves every envelope
// point cold, and verifies each.
CaseOutcome RunCaseDocument(const nlohmann::json& doc, const std::string& name);
// GenerateCase(seed), then RunCaseDocument.
CaseOutcome RunCampaignSeed(uint64_t seed);

}  // namespace loopwright::campaign
