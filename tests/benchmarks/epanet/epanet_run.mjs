// Runs one EPANET hydraulic snapshot (epanet-js, the OWA-EPANET toolkit
// compiled to WebAssembly) for tests/benchmarks/header_bench.py and prints
// its timings and answer as one JSON line. Not a test.
// Usage: node epanet_run.mjs NETWORK.inp RESULTS.json FEED_LINK_ID
//   (feed_flow: the flow of FEED_LINK_ID in the flow units of the .inp)
//   solve_s: EN_solveH alone (the network read and the module load apart);
//   the flows and heads of every link and node are then written to
//   RESULTS.json (the counterpart of loopwright's compact --json).
import fs from "fs";
import { performance } from "perf_hooks";
import { Project, Workspace, LinkProperty, NodeProperty, AnalysisStatistic } from "epanet-js";

const [inp, results, feed] = process.argv.slice(2);
const t0 = performance.now();
const ws = new Workspace();
await ws.loadModule();
const t1 = performance.now();
ws.writeFile("net.inp", fs.readFileSync(inp));
const model = new Project(ws);
model.open("net.inp", "net.rpt", "");
const t2 = performance.now();
model.solveH();
const t3 = performance.now();
const flows = model.getLinkValues(LinkProperty.Flow);
const heads = model.getNodeValues(NodeProperty.Head);
const feedFlow = model.getLinkValue(model.getLinkIndex(feed), LinkProperty.Flow);
const iterations = model.getStatistic(AnalysisStatistic.Iterations);
const relError = model.getStatistic(AnalysisStatistic.RelativeError);
const out = fs.openSync(results, "w");
fs.writeSync(out, '{"link_flow_lps": [');
const chunk = 100000;
for (let i = 0; i < flows.length; i += chunk) {
  fs.writeSync(out, (i ? "," : "") + flows.slice(i, i + chunk).join(","));
}
fs.writeSync(out, '],\n"node_head_m": [');
for (let i = 0; i < heads.length; i += chunk) {
  fs.writeSync(out, (i ? "," : "") + heads.slice(i, i + chunk).join(","));
}
fs.writeSync(out, "]}\n");
fs.closeSync(out);
model.close();
const t4 = performance.now();
console.log(JSON.stringify({
  module_s: (t1 - t0) / 1e3, read_s: (t2 - t1) / 1e3, solve_s: (t3 - t2) / 1e3, write_s: (t4 - t3) / 1e3,
  feed_flow: feedFlow, iterations, relative_error: relError,
  peak_rss_kB: process.resourceUsage().maxRSS,
}));
