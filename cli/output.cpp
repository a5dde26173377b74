#include "cli/output.h"

#include <fcntl.h>
#include <signal.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <cmath>
#include <cstdint>
#include <cstring>
#include <filesystem>
#include <map>
#include <optional>
#include <numeric>
#include <regex>
#include <streambuf>

#include <fmt/format.h>

#include "components/registry.h"
#include "library/oil.h"
#include "network/case/fluid_spec.h"
#include "network/envelope/results.h"
#include "network/envelope/warning_tally.h"

namespace loopwright::cli {

// A CSV field, quoted (RFC 4180) when it holds a comma, quote or line break:
// grid point names such as "sweep[0,1]" do.
std::string CsvField(const std::string& s) {
  if (s.find_first_of(",\"\r\n") == std::string::npos) return s;
  std::string out = "\"";
  for (char ch : s) {
    if (ch == '"') out += '"';
    out += ch;
  }
  return out + "\"";
}


namespace {

constexpr const char* kTempTag = ".lw-tmp-";

// Removes the temporaries a killed run left beside `target`: files named
// ".<target>.lw-tmp-<pid>" whose process no longer exists (a live pid may be
// another loopwright writing the same file: left alone).
void RemoveStaleTemporaries(const std::filesystem::path& dir, const std::string& target) {
  namespace fs = std::filesystem;
  const std::string prefix = "." + target + kTempTag;
  std::error_code ec;
  for (fs::directory_iterator it(dir, ec), end; !ec && it != end; it.increment(ec)) {
    const std::string name = it->path().filename().string();
    if (name.rfind(prefix, 0) != 0) continue;
    const std::string digits = name.substr(prefix.size());
    if (digits.empty() || digits.size() > 9 || digits.find_first_not_of("0123456789") != std::string::npos) continue;
    const pid_t pid = static_cast<pid_t>(std::stol(digits));
    if (pid == ::getpid() || !(::kill(pid, 0) != 0 && errno == ESRCH)) continue;
    std::error_code rm;
    if (it->is_regular_file(rm) && !it->is_symlink(rm)) fs::remove(it->path(), rm);
  }
}

}  // namespace

namespace {

// A stream buffer writing to a file descriptor, 64 KiB at a time; errno_value()
// is the error of the first failed write (0: none).
class FdStreamBuf : public std::streambuf {
 public:
  explicit FdStreamBuf(int fd) : fd_(fd), buf_(size_t(1) << 16) { setp(buf_.data(), buf_.data() + buf_.size()); }
  int errno_value() const { return err_; }

 protected:
  int_type overflow(int_type ch) override {
    if (!Flush()) return traits_type::eof();
    if (traits_type::eq_int_type(ch, traits_type::eof())) return traits_type::not_eof(ch);
    *pptr() = traits_type::to_char_type(ch);
    pbump(1);
    return ch;
  }
  int sync() override { return Flush() ? 0 : -1; }

 private:
  bool Flush() {
    for (const char* p = pbase(); p < pptr();) {
      const ssize_t n = ::write(fd_, p, static_cast<size_t>(pptr() - p));
      if (n < 0 && errno == EINTR) continue;
      if (n < 0) {
        err_ = errno;
        return false;
      }
      p += n;
    }
    setp(buf_.data(), buf_.data() + buf_.size());
    return true;
  }
  int fd_;
  std::vector<char> buf_;
  int err_ = 0;
};

// Writes through `write` into `fd`, flushes it to disk and closes it; 0 or
// the errno of the failure.
int WriteAndClose(int fd, const std::function<void(std::ostream&)>& write) {
  FdStreamBuf buf(fd);
  std::ostream os(&buf);
  try {
    write(os);
  } catch (...) {
    ::close(fd);
    throw;
  }
  os.flush();
  int err = buf.errno_value();
  if (!err && !os) err = EIO;
  if (!err && ::fsync(fd) != 0) err = errno;
  if (::close(fd) != 0 && !err) err = errno;
  return err;
}

}  // namespace

bool WriteFileAtomicStream(const std::string& path, const std::function<void(std::ostream&)>& write,
                           std::string* error) {
  namespace fs = std::filesystem;
  fs::path target(path);
  fs::path dir = target.has_parent_path() ? target.parent_path() : fs::path(".");
  RemoveStaleTemporaries(dir, target.filename().string());
  std::string tmp = (dir / ("." + target.filename().string() + kTempTag + std::to_string(::getpid()))).string();
  int fd = ::open(tmp.c_str(), O_WRONLY | O_CREAT | O_TRUNC | O_CLOEXEC, 0644);
  if (fd < 0) {
    *error = fmt::format("cannot write \"{}\": {}", path, std::strerror(errno));
    return false;
  }
  int err = 0;
  try {
    err = WriteAndClose(fd, write);
  } catch (...) {
    ::unlink(tmp.c_str());
    throw;
  }
  if (err != 0) {
    *error = fmt::format("cannot write \"{}\": {}", path, std::strerror(err));
    ::unlink(tmp.c_str());
    return false;
  }
  if (::rename(tmp.c_str(), path.c_str()) != 0) {
    *error = fmt::format("cannot replace \"{}\": {}", path, std::strerror(errno));
    ::unlink(tmp.c_str());
    return false;
  }
  return true;
}

bool WriteFileAtomic(const std::string& path, const std::string& content, std::string* error) {
  return WriteFileAtomicStream(
      path, [&](std::ostream& os) { os.write(content.data(), static_cast<std::streamsize>(content.size())); }, error);
}

namespace {

// A plain text table with aligned columns.
class TextTable {
 public:
  explicit TextTable(std::vector<std::string> header) : rows_{std::move(header)} {}
  void Add(std::vector<std::string> row) { rows_.push_back(std::move(row)); }
  std::string Render() const {
    std::vector<size_t> w;
    for (const auto& r : rows_)
      for (size_t i = 0; i < r.size(); ++i) {
        if (w.size() <= i) w.push_back(0);
        w[i] = std::max(w[i], r[i].size());
      }
    std::string out;
    for (size_t k = 0; k < rows_.size(); ++k) {
      std::string line;
      for (size_t i = 0; i < rows_[k].size(); ++i) {
        line += rows_[k][i];
        if (i + 1 < rows_[k].size()) line += std::string(w[i] - rows_[k][i].size() + 2, ' ');
      }
      while (!line.empty() && line.back() == ' ') line.pop_back();
      out += "  " + line + "\n";
      if (k == 0) {
        size_t total = 0;
        for (size_t i = 0; i < w.size(); ++i) total += w[i] + (i + 1 < w.size() ? 2 : 0);
        out += "  " + std::string(total, '-') + "\n";
      }
    }
    return out;
  }

 private:
  std::vector<std::vector<std::string>> rows_;
};

std::string Fmt(double si, Dimension dim, UnitSystem us, int sig = 4) {
  double v = FromSI(si, dim, us);
  if (!std::isfinite(v)) return "-";
  if (std::abs(si) < 1e-15 && dim != Dimension::kTemperature) v = 0;  // numerical zero
  if (v != 0 && (std::abs(v) >= 1e6 || std::abs(v) < 1e-3)) return fmt::format("{:.{}e}", v, sig - 1);
  return fmt::format("{:.{}g}", v, sig);
}

std::string Unit(Dimension dim, UnitSystem us) { return DisplayUnit(dim, us); }

// An envelope variable's value with its unit, to six digits as a case
// writes it ("18000 rpm", not "1.8e+04 rpm"; "0" with no unit after it).
std::string VariableValueText(double si, Dimension dim, UnitSystem us) {
  const std::string unit = Unit(dim, us);
  return Fmt(si, dim, us, 6) + (unit.empty() ? "" : " " + unit);
}

// The rows to print of a table whose row i ranks rank[i] (lowest: worst),
// in table order: every row up to kFullTableRows, else the first kHeadRows
// and the kWorstRows worst of the others (NaN ranks last).
std::vector<size_t> RowsToShow(const std::vector<double>& rank) {
  std::vector<size_t> rows(rank.size());
  std::iota(rows.begin(), rows.end(), size_t(0));
  if (rows.size() <= kFullTableRows) return rows;
  std::vector<size_t> rest(rows.begin() + kHeadRows, rows.end());
  auto key = [&](size_t i) { return std::isnan(rank[i]) ? HUGE_VAL : rank[i]; };
  std::stable_sort(rest.begin(), rest.end(), [&](size_t a, size_t b) { return key(a) < key(b); });
  rest.resize(kWorstRows);
  std::sort(rest.begin(), rest.end());
  rows.resize(kHeadRows);
  rows.insert(rows.end(), rest.begin(), rest.end());
  return rows;
}

// The line under a summarised table ("" when every row was printed).
std::string OmittedRows(size_t total, size_t shown, const char* worst) {
  if (shown == total) return "";
  return fmt::format("  ... {} of {} rows not listed: above {} rows a table shows the first {} and the {} with the {} "
                     "(--json or --csv has every row)\n",
                     total - shown, total, kFullTableRows, kHeadRows, kWorstRows, worst);
}

const ReportItem* Item(const ComponentReport& r, const std::string& key) {
  for (const auto& it : r.items)
    if (it.key == key) return &it;
  return nullptr;
}

}  // namespace

std::string FormatValue(double si, Dimension dim, UnitSystem us, int sig) { return Fmt(si, dim, us, sig); }

std::string ViscosityIndexText(const Fluid& f) {
  const auto* oil = dynamic_cast<const OilFluid*>(&f);
  if (!oil) return "-";
  const double vi = oil->ViscosityIndex();
  return std::isfinite(vi) ? fmt::format("{:.0f}", vi) : "n/a (KV100 < 2 cSt)";
}

std::string CaseSummary(const Case& cs, UnitSystem us) {
  std::string out = fmt::format("Case: {}\n", cs.name);
  if (!cs.description.empty()) out += fmt::format("  {}\n", cs.description);
  out += fmt::format("  ambient pressure {} {} abs\n", Fmt(cs.ambient_pa, Dimension::kPressureDifference, us),
                     Unit(Dimension::kPressureDifference, us));
  out += "\nFluids\n";
  TextTable ft({"id", "kind", "rho@40C " + Unit(Dimension::kDensity, us), "nu@40C cSt", "nu@100C cSt",
                "VI (ASTM D2270)"});
  for (const auto& [id, f] : cs.fluids) {
    if (!f) continue;
    FluidProps p40 = f->Evaluate(313.15, cs.ambient_pa), p100 = f->Evaluate(373.15, cs.ambient_pa + 2e5);
    ft.Add({id, f->Kind(), Fmt(p40.rho, Dimension::kDensity, us), fmt::format("{:.4g}", p40.mu / p40.rho * 1e6),
            fmt::format("{:.4g}", p100.mu / p100.rho * 1e6), ViscosityIndexText(*f)});
  }
  out += ft.Render();
  for (const auto& loop : cs.loops) {
    out += fmt::format("\nLoop {} ({}), {} nodes, {} components\n", loop.id, loop.fluid_id, loop.nodes.size(),
                       loop.components.size());
    std::map<std::string, int> by_type;
    for (const auto& c : loop.components) by_type[std::string(c.type())]++;
    std::string types;
    for (const auto& [t, n] : by_type) types += fmt::format("{}{} x{}", types.empty() ? "" : ", ", t, n);
    out += "  types: " + types + "\n";
    TextTable ct({"component", "type", "from", "to", "part"});
    size_t shown = 0;
    for (const auto& c : loop.components) {
      if (++shown > 40) {
        ct.Add({fmt::format("... {} more", loop.components.size() - 40), "", "", "", ""});
        break;
      }
      ct.Add({c.id, std::string(c.type()), loop.nodes[c.from].id, loop.nodes[c.to].id,
              c.part().empty() ? "-" : std::string(c.part())});
    }
    out += ct.Render();
  }
  out += fmt::format("\nEnvelope: {} variable(s), {} operating point(s)\n", cs.envelope.variables.size(),
                     cs.envelope.points.size());
  for (const auto& v : cs.envelope.variables)
    out += fmt::format("  ${} ({}), default {}\n", v.name, DimensionName(v.dim),
                       VariableValueText(v.default_si, v.dim, us));
  out += fmt::format("\n{}\n", SafetyCautions());
  return out;
}

namespace {

// The entries of `all` (nodes or branches) in loop l to print, in order
// (RowsToShow, ranked by rank(entry)); *total: how many are in the loop.
template <class T, class Rank>
std::vector<const T*> LoopRows(const std::vector<T>& all, size_t l, Rank rank, size_t* total) {
  std::vector<const T*> in_loop;
  std::vector<double> ranks;
  for (const T& e : all)
    if (e.loop == static_cast<int>(l)) {
      in_loop.push_back(&e);
      ranks.push_back(rank(e));
    }
  *total = in_loop.size();
  std::vector<const T*> shown;
  for (size_t i : RowsToShow(ranks)) shown.push_back(in_loop[i]);
  return shown;
}

// The node table of loop l at a solved point.
std::string NodeTable(const Case& cs, const PointResult& p, size_t l, UnitSystem us) {
  const Dimension P = Dimension::kPressure;
  const LoopSpec& loop = cs.loops[l];
  bool boils = false;
  for (const auto& n : p.nodes)
    if (n.loop == static_cast<int>(l) && !std::isnan(n.boiling_margin_k)) boils = true;
  std::vector<std::string> head = {"node", "kind", "p gauge " + Unit(P, us), "p abs " + Unit(P, us),
                                   "T " + Unit(Dimension::kTemperature, us), "elevation " + Unit(Dimension::kLength, us)};
  if (boils) head.push_back("boiling margin " + Unit(Dimension::kTemperatureDifference, us));
  TextTable nt(head);
  size_t total = 0;
  const auto shown = LoopRows(p.nodes, l, [](const NodeResult& n) { return n.pressure_pa; }, &total);
  for (const NodeResult* np : shown) {
    const NodeResult& n = *np;
    const NodeSpec& ns = loop.nodes[n.node];
    std::vector<std::string> row = {ns.id, n.boundary ? "boundary" : "-", Fmt(n.pressure_pa, P, us),
                                    Fmt(n.pressure_pa + cs.ambient_pa, Dimension::kPressureDifference, us),
                                    Fmt(n.temperature_k, Dimension::kTemperature, us), Fmt(ns.elevation, Dimension::kLength, us)};
    if (boils) row.push_back(Fmt(n.boiling_margin_k, Dimension::kTemperatureDifference, us));
    nt.Add(row);
  }
  return fmt::format("\nLoop {} — nodes\n", loop.id) + nt.Render() +
         OmittedRows(total, shown.size(), "lowest gauge pressure");
}

// The model's own notes on one component (velocity, Re, pump rise, ...).
std::string ComponentNotes(const ComponentReport& r, bool thermal, UnitSystem us) {
  std::string notes;
  auto add = [&](const std::string& s) { notes += (notes.empty() ? "" : "; ") + s; };
  if (auto* v = Item(r, "velocity")) add(fmt::format("V {} {}", Fmt(v->value, v->dim, us, 3), Unit(v->dim, us)));
  if (auto* re = Item(r, "reynolds")) add(fmt::format("Re {:.0f} {}", re->value, re->text));
  if (auto* pr = Item(r, "pressure_rise")) add(fmt::format("rise {} {}", Fmt(pr->value, pr->dim, us), Unit(pr->dim, us)));
  if (auto* ve = Item(r, "volumetric_efficiency")) add(fmt::format("eta_v {:.3f}", ve->value));
  if (auto* rf = Item(r, "relief_flow")) add(fmt::format("relief {}", rf->text));
  if (r.shaft_power_W > 0) add(fmt::format("shaft {} {}", Fmt(r.shaft_power_W, Dimension::kPower, us, 3), Unit(Dimension::kPower, us)));
  if (auto* bf = Item(r, "bypass_fraction")) add(fmt::format("bypass {:.1f}% {}", 100 * bf->value, bf->text));
  if (auto* fp = Item(r, "feed_pressure_above_drain")) add(fmt::format("feed above drain {} {}", Fmt(fp->value, fp->dim, us), Unit(fp->dim, us)));
  if (auto* re = Item(r, "bore_reynolds")) add(fmt::format("Re_d {:.0f}", re->value));
  if (auto* y = Item(r, "travel")) add(fmt::format("travel {:.0f}%", 100 * y->value));
  if (auto* d = Item(r, "drain_flow")) {
    std::string state = d->text.str();  // "part_full", "flooding", "scavenging"
    std::replace(state.begin(), state.end(), '_', ' ');
    add(state);
  }
  if (auto* f = Item(r, "fill")) add(fmt::format("fill {:.2f}", f->value));
  if (auto* h = Item(r, "head")) add(us == UnitSystem::kUS ? fmt::format("head {:.4g} ft", h->value / 0.3048) : fmt::format("head {:.4g} m", h->value));
  if (thermal) {
    if (auto* to = Item(r, "outlet_temperature"))
      add(fmt::format("T out {} {}", Fmt(to->value, to->dim, us), Unit(to->dim, us)));
    if (std::abs(r.heat_W) > 0.5) add(fmt::format("heat {} {}", Fmt(r.heat_W, Dimension::kPower, us, 3), Unit(Dimension::kPower, us)));
    if (auto* e = Item(r, "effectiveness")) add(fmt::format("eff {:.3f}", e->value));
  }
  return notes;
}

// The component table of loop l, with its energy summary at thermal points.
std::string ComponentTable(const Case& cs, const PointResult& p, size_t l, UnitSystem us) {
  const LoopSpec& loop = cs.loops[l];
  TextTable ct({"component", "type", "from -> to", "flow " + Unit(Dimension::kVolumeFlow, us),
                "dp " + Unit(Dimension::kPressureDifference, us), "notes"});
  size_t total = 0;
  const auto shown = LoopRows(p.branches, l, [](const BranchOutcome& b) { return b.flow_m3s; }, &total);
  for (const BranchOutcome* bp : shown) {
    const BranchOutcome& b = *bp;
    const ComponentSpec& c = loop.components[b.comp];
    const BranchResult st = BranchState(cs, p, b);
    ct.Add({c.id, std::string(c.type()), loop.nodes[c.from].id + " -> " + loop.nodes[c.to].id, Fmt(b.flow_m3s, Dimension::kVolumeFlow, us),
            Fmt(st.p_from - st.p_to, Dimension::kPressureDifference, us), ComponentNotes(BranchReport(cs, p, b), p.thermal, us)});
  }
  std::string out = fmt::format("\nLoop {} — components\n", loop.id) + ct.Render() +
                    OmittedRows(total, shown.size(), "lowest flow");
  if (p.thermal && l < p.thermal_report.loop_heat_added.size()) {
    const ThermalReport& tr = p.thermal_report;
    const std::string W = Unit(Dimension::kPower, us);
    out += fmt::format("  energy: heat added {} {}, removed {} {}, balance closes to {:.1e}\n",
                       Fmt(tr.loop_heat_added[l], Dimension::kPower, us), W,
                       Fmt(tr.loop_heat_removed[l], Dimension::kPower, us), W, tr.loop_closure[l]);
    out += fmt::format("  work heat (pump losses and pressure-drop dissipation): {} {}, {}\n",
                       Fmt(tr.loop_work_heat[l], Dimension::kPower, us), W,
                       cs.work_heat ? "included" : "left out (\"work_heat\": false)");
  }
  return out;
}

// The warnings of a point, each once with a count ("" for none). Above
// kFullTableRows lines, the same warning of different components is one
// line ("l/b0: ... (x2000 components; the first shown)").
// Each component warning of a point as ("loop/component: text", "loop/component").
void ComponentWarnings(const Case& cs, const PointResult& p,
                              std::vector<std::pair<std::string, std::string>>* warnings) {
  ComponentReport report;
  for (size_t k = 0; k < p.branches.size(); ++k) {
    const BranchOutcome& b = p.branches[k];
    DescribeBranch(cs, p, k, &report);
    for (const auto& w : report.warnings) {
      const std::string where = cs.loops[b.loop].id + "/" + cs.loops[b.loop].components[b.comp].id;
      warnings->push_back({where + ": " + w, where});
    }
  }
}

std::string WarningLines(const Case& cs, const PointResult& p, UnitSystem us) {
  std::vector<std::pair<std::string, std::string>> warnings;  // (text, component)
  for (const auto& w : p.warnings) warnings.push_back({w, ""});
  ComponentWarnings(cs, p, &warnings);
  if (warnings.empty()) return "";
  WarningTally tally;
  for (const auto& w : warnings) tally.Add(Localize(w.first, us));
  std::vector<std::string> lines = tally.Lines(SIZE_MAX, "times");
  if (lines.size() > kFullTableRows) {
    WarningTally by_kind;
    for (const auto& w : warnings) by_kind.Add(Localize(w.first, us), w.second);
    lines = by_kind.Lines(kFullTableRows, "components");
  }
  std::string out = "\nWarnings\n";
  for (const auto& line : lines) out += "  - " + line + "\n";
  return out;
}

// Couplings, warnings (each once with a count), mass closure and cautions.
std::string SolveTail(const Case& cs, const PointResult& p, UnitSystem us) {
  std::string out;
  if (p.thermal && !cs.couplings.empty()) {
    out += "\nCouplings\n";
    for (size_t i = 0; i < cs.couplings.size() && i < p.thermal_report.coupling_duty.size(); ++i)
      out += fmt::format("  {}: duty {} {}, effectiveness {:.3f}\n", cs.couplings[i].id,
                         Fmt(p.thermal_report.coupling_duty[i], Dimension::kPower, us), Unit(Dimension::kPower, us),
                         p.thermal_report.coupling_effectiveness[i]);
  }
  out += WarningLines(cs, p, us);
  const std::string node = MassImbalanceNode(cs, p);
  out += fmt::format("\nMass balance closes to {:.1e} kg/s at worst ({:.1e} of the loop's largest branch flow{}).\n",
                     p.max_mass_imbalance_kg_s, p.max_mass_imbalance_rel, node.empty() ? "" : ", at node " + node);
  out += fmt::format("{}\n", SafetyCautions());
  return out;
}

}  // namespace

std::string SolveTables(const Case& cs, const PointResult& p, UnitSystem us) {
  std::string out = fmt::format("Case: {} — point \"{}\"\n", cs.name, p.name);
  std::string fluids;
  for (const auto& [id, f] : cs.fluids) {
    if (!f) continue;
    const std::string vi = ViscosityIndexText(*f);
    fluids += fmt::format("{}{} ({}{})", fluids.empty() ? "" : ", ", id, f->Kind(), vi == "-" ? "" : ", VI " + vi);
  }
  if (!fluids.empty()) out += "  fluids: " + fluids + "\n";
  for (size_t i = 0; i < cs.envelope.variables.size() && i < p.values.size(); ++i)
    out += fmt::format("  ${} = {}\n", cs.envelope.variables[i].name,
                       VariableValueText(p.values[i], cs.envelope.variables[i].dim, us));
  for (size_t l = 0; l < cs.loops.size(); ++l) out += NodeTable(cs, p, l, us) + ComponentTable(cs, p, l, us);
  return out + SolveTail(cs, p, us);
}

// One row per component: flows and pressures, and the temperatures of its
// two nodes, its outlet temperature (thermal points; empty otherwise) and the
// heat it adds to the stream.
std::string PointCsv(const Case& cs, const PointResult& p) {
  std::string out =
      "point,loop,component,type,from,to,flow_m3_s,mass_flow_kg_s,dp_Pa,p_from_Pa,p_to_Pa,"
      "T_from_K,T_to_K,T_out_K,heat_W\n";
  std::map<std::pair<int, int>, double> temperature;
  for (const auto& n : p.nodes) temperature[{n.loop, n.node}] = n.temperature_k;
  ComponentReport report;
  for (size_t k = 0; k < p.branches.size(); ++k) {
    const BranchOutcome& b = p.branches[k];
    const LoopSpec& loop = cs.loops[b.loop];
    const ComponentSpec& c = loop.components[b.comp];
    DescribeBranch(cs, p, k, &report);
    const BranchResult st = BranchState(cs, p, k);
    const ReportItem* to = p.thermal ? Item(report, "outlet_temperature") : nullptr;
    out += fmt::format("{},{},{},{},{},{},{:.10g},{:.10g},{:.10g},{:.10g},{:.10g},{:.10g},{:.10g},{},{:.10g}\n",
                       CsvField(p.name), loop.id, c.id, c.type(), loop.nodes[c.from].id, loop.nodes[c.to].id, b.flow_m3s,
                       b.m, st.p_from - st.p_to, st.p_from, st.p_to,
                       temperature[{b.loop, c.from}], temperature[{b.loop, c.to}],
                       to ? fmt::format("{:.10g}", to->value) : "", report.heat_W);
  }
  return out;
}

// The catalog size a suggested line diameter snaps to, and its re-solve.
static std::string CatalogText(const FixSuggestion& f, UnitSystem us) {
  if (!f.snapped) return "";
  const CatalogSnap& s = f.snap;
  if (s.part.empty()) return "; catalog: " + Localize(s.note, us);
  std::string out = fmt::format("; catalog: {} (bore {} {}), re-solved: ", s.part, Fmt(s.bore, Dimension::kLength, us),
                                Unit(Dimension::kLength, us));
  // With points that did not converge the check cannot pass "at every
  // point": say whether it passes at those that did.
  const bool unconverged = !s.note.empty();
  out += s.envelope_passes_check                   ? "the check passes at every point"
         : unconverged && !(s.worst_margin < 0.0) ? "the check passes at every point that converged"
                                                   : "the check still fails";
  out += s.broken.empty() ? ", no other check breaks" : fmt::format(", but it breaks: {}", fmt::join(s.broken, "; "));
  if (!s.note.empty()) out += " (" + Localize(s.note, us) + ")";
  return out;
}

// The knob that restores the margin without breaking anything, where the
// first suggestion breaks a check (or the knobs tried for one).
static std::string AlternativeText(const FixSuggestion& f, UnitSystem us) {
  if (f.has_alternative) {
    const FixSuggestion::Alternative& a = f.alternative;
    const std::string u = a.dim == Dimension::kDimensionless ? "" : " " + Unit(a.dim, us);
    const std::string mu = f.margin_dim == Dimension::kDimensionless ? "" : " " + Unit(f.margin_dim, us);
    int sig = 4;
    while (sig < 9 && Fmt(a.current, a.dim, us, sig) == Fmt(a.suggested, a.dim, us, sig)) ++sig;
    return fmt::format("    or, breaking nothing: {} {}{} -> {}{} (margin {}{} per +1 % of it); re-solved: the check "
                       "passes at every point, no other check breaks\n",
                       a.knob, Fmt(a.current, a.dim, us, sig), u, Fmt(a.suggested, a.dim, us, sig), u,
                       Fmt(a.per_percent, f.margin_dim, us), mu);
  }
  if (f.alternatives_tried.empty()) return "";
  return fmt::format("    no clean alternative: {} {} not restore the margin without breaking a check\n",
                     fmt::join(f.alternatives_tried, " and "), f.alternatives_tried.size() == 1 ? "does" : "do");
}

std::string FixTable(const std::vector<FixSuggestion>& fixes, UnitSystem us) {
  std::string failing, tight;
  for (const auto& f : fixes) {
    std::string& out = f.tight ? tight : failing;
    out += fmt::format("  - {} at {} ({}): ", f.check, f.where, f.point);
    if (f.knob.empty()) {
      out += Localize(f.note, us) + "\n";
      continue;
    }
    const std::string u = f.dim == Dimension::kDimensionless ? "" : " " + Unit(f.dim, us);
    const std::string mu = f.margin_dim == Dimension::kDimensionless ? "" : " " + Unit(f.margin_dim, us);
    const std::string per = fmt::format("margin {}{} per +1 % of it", Fmt(f.sensitivity_per_percent, f.margin_dim, us), mu);
    if (f.tight) out += fmt::format("passes with {}{} to spare; for {}{}: ", Fmt(f.margin, f.margin_dim, us), mu,
                                    Fmt(f.target, f.margin_dim, us), mu);
    if (!f.found) {
      out += fmt::format("{} moves it most ({}), but {}\n", f.knob, per, Localize(f.note, us));
      continue;
    }
    // As many digits as it takes for the two values to read differently (a
    // tight check's fix may move a knob by a few parts in ten thousand).
    int sig = 4;
    while (sig < 9 && Fmt(f.current, f.dim, us, sig) == Fmt(f.suggested, f.dim, us, sig)) ++sig;
    out += fmt::format("{} {}{} -> {}{} ({})", f.knob, Fmt(f.current, f.dim, us, sig), u, Fmt(f.suggested, f.dim, us, sig),
                       u, per);
    const bool unconverged = f.note.rfind("some points did not converge", 0) == 0;
    out += f.envelope_passes_check ? "; re-solved: the check passes at every point"
           : unconverged           ? "; re-solved: " + f.note
                                   : "; re-solved: the check still fails elsewhere";
    if (f.broken.empty()) out += ", no other check breaks";
    else out += fmt::format(", but it breaks: {}", fmt::join(f.broken, "; "));
    out += CatalogText(f, us);
    out += f.note.empty() || unconverged ? "\n" : " (" + Localize(f.note, us) + ")\n";
    out += AlternativeText(f, us);
  }
  std::string out;
  if (!failing.empty())
    out += "\nWhat would fix it (the knob that moves each failing margin most at its governing point)\n" + failing;
  if (!tight.empty())
    out += "\nTight checks (passing with little to spare): the knob that moves each most, and the value that clears the band\n" + tight;
  return out;
}

// The component models' warnings over an envelope (a law used outside its
// stated range), each kind once per component with the points raising it;
// "" for none.
std::vector<std::string> PointModelWarnings(const Case& cs, const PointResult& p) {
  std::vector<std::pair<std::string, std::string>> warnings;
  ComponentWarnings(cs, p, &warnings);
  std::vector<std::string> texts;
  for (auto& w : warnings) texts.push_back(std::move(w.first));
  return texts;
}

std::string ModelWarningLines(const std::vector<std::string>& point_names,
                              const std::vector<std::vector<std::string>>& point_warnings, UnitSystem us) {
  struct Group {
    std::string example;
    std::vector<std::string> points;
  };
  std::vector<Group> groups;
  std::unordered_map<std::string, size_t> index;  // WarningKey -> group
  for (size_t i = 0; i < point_names.size() && i < point_warnings.size(); ++i) {
    for (const std::string& raw : point_warnings[i]) {
      const std::string text = Localize(raw, us);
      const auto [it, added] = index.emplace(WarningKey(text), groups.size());
      if (added) groups.push_back({text, {}});
      std::vector<std::string>& at = groups[it->second].points;
      if (at.empty() || at.back() != point_names[i]) at.push_back(point_names[i]);
    }
  }
  if (groups.empty()) return "";
  std::string out = "\nModel warnings (a component's law used outside its stated range: less certain there; "
                    "each point's in --json)\n";
  constexpr size_t kNamed = 4;  // points named per warning, then a count
  for (size_t g = 0; g < groups.size(); ++g) {
    if (g == kFullTableRows) {
      out += fmt::format("  ... and {} more kind(s) of model warning\n", groups.size() - g);
      break;
    }
    const std::vector<std::string>& at = groups[g].points;
    std::string where = at[0];
    for (size_t i = 1; i < std::min(at.size(), kNamed); ++i) where += ", " + at[i];
    if (at.size() > kNamed) where += fmt::format(" and {} more points", at.size() - kNamed);
    out += fmt::format("  - {} (at {}{})\n", groups[g].example, where, at.size() > 1 ? "; the first's numbers" : "");
  }
  return out;
}

Dimension MarginDimension(Dimension dim) {
  return dim == Dimension::kTemperature ? Dimension::kTemperatureDifference
         : dim == Dimension::kPressure  ? Dimension::kPressureDifference
                                        : dim;
}


std::string PointCheckLines(const std::vector<CheckOutcome>& checks, UnitSystem us) {
  std::vector<const CheckOutcome*> failing;
  for (const CheckOutcome& o : checks)
    if (!o.pass) failing.push_back(&o);
  std::string out = fmt::format("\nChecks at this point: {} of {} pass", checks.size() - failing.size(), checks.size());
  if (failing.empty()) return out + " (`check` judges every envelope point)\n";
  out += fmt::format("; {} fail (`check` judges every envelope point and says what would fix them):\n", failing.size());
  std::stable_sort(failing.begin(), failing.end(),
                   [](const CheckOutcome* a, const CheckOutcome* b) { return MarginRank(*a) < MarginRank(*b); });
  constexpr size_t kListed = 10;
  for (size_t i = 0; i < failing.size() && i < kListed; ++i) {
    const CheckOutcome& o = *failing[i];
    const Dimension md = MarginDimension(o.dim);
    const std::string u = o.dim == Dimension::kDimensionless ? "" : " " + Unit(o.dim, us);
    const std::string mu = md == Dimension::kDimensionless ? "" : " " + Unit(md, us);
    out += fmt::format("  FAIL {} at {}: {}{} against {}{} (margin {}{})\n", o.name(), o.where, Fmt(o.value, o.dim, us), u,
                       Fmt(o.limit, o.dim, us), u, Fmt(o.margin, md, us), mu);
  }
  if (failing.size() > kListed) out += fmt::format("  ... and {} more failing\n", failing.size() - kListed);
  return out;
}

std::string CheckTable(const Case& cs, const std::vector<CheckSummary>& summary, const std::vector<CheckWarning>& warnings,
                       UnitSystem us) {
  std::string out = fmt::format("Case: {} — envelope checks ({} points)\n\n", cs.name, cs.envelope.points.size());
  TextTable t({"check", "where", "worst point", "value", "limit", "limit from", "margin", "unit", "verdict"});
  std::vector<double> rank;
  for (const auto& s : summary) rank.push_back(MarginRank(s.worst));
  const std::vector<size_t> shown = RowsToShow(rank);
  for (size_t i : shown) {
    const CheckSummary& s = summary[i];
    const CheckOutcome& o = s.worst;
    const Dimension md = MarginDimension(o.dim);
    std::string unit = Unit(o.dim, us);
    if (o.dim == Dimension::kDimensionless) unit = "-";
    t.Add({std::string(o.name()), o.where, s.point, Fmt(o.value, o.dim, us), Fmt(o.limit, o.dim, us), LimitSourceText(cs, o),
           Fmt(o.margin, md, us), unit, o.pass ? "PASS" : "FAIL"});
  }
  out += t.Render() + OmittedRows(summary.size(), shown.size(), "smallest margin relative to the limit");
  if (!warnings.empty()) {
    // Each kind of warning once, with the count of points raising it.
    WarningTally tally;
    for (const auto& w : warnings) tally.Add(w.where + ": " + Localize(w.text, us), w.point);
    out += "\nWarnings\n";
    for (const auto& line : tally.Lines()) out += "  - " + line + "\n";
  }
  out += "\nLimit from: default (common practice, see README \"Checks\"), the case's \"checks\", a loop's, or a "
         "component's or node's (its own \"checks\" or parameter); the most specific wins.\n";
  out += fmt::format("{}\n", SafetyCautions());
  return out;
}

std::string LibraryTable(const PartsCatalog& cat) {
  TextTable t({"id", "category", "type", "description"});
  for (const auto& p : cat.parts) t.Add({p.id, p.category, p.type, p.description});
  return t.Render() + fmt::format("{} parts. Every shipped entry is invented and illustrative: use makers' data.\n",
                                  cat.parts.size());
}

}  // namespace loopwright::cli

namespace loopwright::cli {

namespace {

// The units printed in model and check warnings, with the dimension each is
// read in ("bar" in a warning is a pressure or a difference: the same factor).
struct TextUnit {
  const char* unit;
  Dimension dim;
};
constexpr TextUnit kTextUnits[] = {
    {"bar", Dimension::kPressureDifference}, {"L/min", Dimension::kVolumeFlow}, {"degC", Dimension::kTemperature},
    {"mm", Dimension::kLength},              {"m/s", Dimension::kVelocity},      {"cSt", Dimension::kKinematicViscosity},
    {"kW", Dimension::kPower},               {"W", Dimension::kPower},           {"K", Dimension::kTemperatureDifference},
    {"m", Dimension::kLength},               {"kg/m3", Dimension::kDensity},     {"W/K", Dimension::kConductance},
    {"rpm", Dimension::kRotationalSpeed},    {"cm3/rev", Dimension::kDisplacement},
};

}  // namespace

std::string Localize(const std::string& text, UnitSystem us) {
  if (us == UnitSystem::kSI) return text;
  static const std::regex number_unit(R"((-?\d+(?:\.\d+)?(?:[eE][-+]?\d+)?) ?(cm3/rev|W/K|kg/m3|L/min|m/s|degC|bar|cSt|rpm|kW|mm|W|K|m)(?![A-Za-z0-9/_]))");
  std::string out;
  auto begin = std::sregex_iterator(text.begin(), text.end(), number_unit);
  size_t last = 0;
  for (auto it = begin; it != std::sregex_iterator(); ++it) {
    const std::smatch& m = *it;
    const size_t at = static_cast<size_t>(m.position(0));
    // A number glued to a word ("gp-08", "Re_d") is no quantity.
    if (at > 0 && (std::isalnum(static_cast<unsigned char>(text[at - 1])) || text[at - 1] == '_')) continue;
    for (const TextUnit& u : kTextUnits) {
      if (m[2].str() != u.unit) continue;
      ParsedQuantity q = ParseQuantity(m[1].str() + " " + u.unit, u.dim);
      if (!q.ok) break;
      out += text.substr(last, at - last);
      out += Fmt(q.si, u.dim, us) + " " + Unit(u.dim, us);
      last = at + static_cast<size_t>(m.length(0));
      break;
    }
  }
  return out + text.substr(last);
}

std::string SizeAnswers(const std::vector<SizingAnswer>& answers, UnitSystem us) {
  std::string out;
  auto margin_text = [&](double si, Dimension dim) {
    if (std::isnan(si)) return std::string("-");
    const std::string u = dim == Dimension::kDimensionless ? "" : " " + Unit(dim, us);
    return Fmt(si, dim, us) + u;
  };
  for (const auto& a : answers) {
    std::string value = a.value_text;
    if (value.empty() && !std::isnan(a.value)) value = Fmt(a.value, a.dim, us) + " " + Unit(a.dim, us);
    out += fmt::format("  {} ({}): {}{}\n", a.question, a.kind, a.feasible ? "" : "INFEASIBLE ", value);
    if (!a.binding_check.empty())
      out += fmt::format("      binding: {} at {}, point {}, margin {}\n", a.binding_check, a.binding_where, a.point,
                         margin_text(a.margin, a.margin_dim));
    for (const auto& r : a.reasons) out += "      why: " + r + "\n";
    for (const auto& r : a.ranking) out += "      - " + Localize(r, us) + "\n";
    for (const auto& r : a.rejected) {
      if (r.check.empty()) out += fmt::format("      rejected {}: {}\n", r.candidate, r.reason.empty() ? "no check ran" : r.reason);
      else
        out += fmt::format("      rejected {}: {} at {} fails at point {}, margin {}{}\n", r.candidate, r.check, r.where,
                           r.point, margin_text(r.margin, r.dim), r.reason.empty() ? "" : " (" + r.reason + ")");
    }
    if (!a.method.empty()) out += "      settled by: " + a.method + "\n";
    for (const auto& w : a.warnings) out += "      warning with this answer: " + Localize(w, us) + "\n";
    if (!a.note.empty()) out += "      note: " + Localize(a.note, us) + "\n";
    if (!std::isnan(a.range_lo))
      out += fmt::format("      searched: {} .. {}\n", margin_text(a.range_lo, a.dim), margin_text(a.range_hi, a.dim));
    out += fmt::format("      ({:.2f} s)\n", a.seconds);
  }
  return out;
}

}  // namespace loopwright::cli

namespace loopwright::cli {

namespace {

// The dimension of a part's parameter: its component type's, or for a fluid
// entry the first of its likely dimensions its unit reads in.
std::optional<Dimension> PartParamDimension(const PartEntry& p, const std::string& key, const std::string& text) {
  if (const ComponentType* t = FindComponentType(p.type)) {
    const int i = t->ParamIndex(key);
    if (i >= 0) return t->params[i].dim;
  }
  for (Dimension d : {Dimension::kKinematicViscosity, Dimension::kDynamicViscosity, Dimension::kDensity,
                      Dimension::kTemperature, Dimension::kSpecificHeat, Dimension::kThermalConductivity})
    if (ParseQuantity(text, d).ok) return d;
  return std::nullopt;
}

// Properties derived from a fluid entry, so a user compares oils by them
// (viscosity index by ASTM D2270).
nlohmann::json FluidDerivedJson(const PartEntry& p) {
  std::string err;
  FluidPtr f = FluidFromPartParams(p.params, &err);
  if (!f) return {{"error", err}};
  nlohmann::json d = {{"kind", f->Kind()}};
  if (const auto* oil = dynamic_cast<const OilFluid*>(f.get())) {
    const double vi = oil->ViscosityIndex();
    d["kv40_cSt"] = oil->KinematicViscosity(313.15) * 1e6;
    d["kv100_cSt"] = oil->KinematicViscosity(373.15) * 1e6;
    d["viscosity_index"] = std::isfinite(vi) ? nlohmann::json(vi) : nlohmann::json(nullptr);
    d["viscosity_index_method"] = "ASTM D2270 (procedure A to VI 100, B above)";
  }
  return d;
}

}  // namespace

nlohmann::json PartJson(const PartEntry& p, UnitSystem us) {
  nlohmann::json params = p.params;
  if (us == UnitSystem::kUS && params.is_object())
    for (auto it = params.begin(); it != params.end(); ++it) {
      if (!it.value().is_string()) continue;
      const std::string text = it.value().get<std::string>();
      const std::optional<Dimension> dim = PartParamDimension(p, it.key(), text);
      if (!dim) continue;
      ParsedQuantity q = ParseQuantity(text, *dim);
      if (q.ok) it.value() = Fmt(q.si, *dim, us) + " " + Unit(*dim, us);
    }
  nlohmann::json j = {{"id", p.id}, {"category", p.category}, {"type", p.type}, {"source", p.source},
                      {"description", Localize(p.description, us)}, {"file", p.file}, {"params", params}};
  if (p.type == "fluid") j["derived"] = FluidDerivedJson(p);
  return j;
}


namespace {

}  // namespace

// The dimension a results document names (DimensionName), or dimensionless.
Dimension DimensionNamed(const std::string& name) {
  for (int d = 0; d <= static_cast<int>(Dimension::kForce); ++d)
    if (DimensionName(static_cast<Dimension>(d)) == name) return static_cast<Dimension>(d);
  return Dimension::kDimensionless;
}

// The top contributors of a check's first-order variance, "name 62 %, ...".
std::string Contributors(const nlohmann::json& fo, size_t n) {
  std::string s;
  if (!fo.value("available", false)) return fo.value("note", "");
  for (size_t i = 0; i < fo["contributors"].size() && i < n; ++i) {
    const auto& c = fo["contributors"][i];
    if (std::abs(c["share"].get<double>()) < 0.005) break;  // ranked: the rest are smaller
    s += fmt::format("{}{} {:.0f} %", i ? ", " : "", c["tolerance"].get<std::string>(), 100 * c["share"].get<double>());
  }
  return s;
}

std::string Probability(const nlohmann::json& p) {
  if (!p.is_number()) return "-";
  const double v = p.get<double>();
  return v == 0 ? "0" : fmt::format("{:.3g}", v);
}

// The larger of a check's two probabilities (for the order of the table).
double Likelihood(const nlohmann::json& c) {
  double p = c["sampled"]["probability"].is_number() ? c["sampled"]["probability"].get<double>() : 0;
  if (c["first_order"].value("available", false)) p = std::max(p, c["first_order"]["probability"].get<double>());
  return p;
}

// Samples without a result are left out of the sampled probabilities (never
// counted as passes). Were all K of N failures of a check that failed f of
// the S = N - K solved, its probability would be (f + K) / N instead of
// f / S: higher by K (S - f) / (N S) <= K / N.
std::string UnsolvedBound(uint64_t unsolved, uint64_t samples, size_t listed) {
  if (unsolved == 0 || samples == 0) return "";
  return fmt::format(
      "The sampled probabilities are over the {} solved samples. Were the {} without a result all failures, "
      "a check's sampled probability would be higher by at most {:.3g} ({} listed at the end with their causes; "
      "--margins-csv leaves their cells empty).\n\n",
      samples - unsolved, unsolved, static_cast<double>(unsolved) / static_cast<double>(samples),
      listed == unsolved ? std::string("all") : fmt::format("{}", listed));
}

std::string SpreadSummary(const nlohmann::json& r, UnitSystem us) {
  const auto& st = r["settings"];
  std::string out = fmt::format(
      "Case: {} — tolerance study: {} samples ({}, seed {}), {} points each; {} sample(s) without a result\n\n",
      r["case"].get<std::string>(), st["samples"].get<uint64_t>(),
      st["method"] == "lhs" ? "Latin hypercube" : "Monte Carlo", st["seed"].get<uint64_t>(), r["points"].size(),
      r["samples_unsolved"].get<uint64_t>());
  out += UnsolvedBound(r["samples_unsolved"].get<uint64_t>(), st["samples"].get<uint64_t>(), r["unsolved_samples"].size());
  std::vector<size_t> order(r["checks"].size());
  std::iota(order.begin(), order.end(), size_t(0));
  std::stable_sort(order.begin(), order.end(),
                   [&](size_t a, size_t b) { return Likelihood(r["checks"][a]) > Likelihood(r["checks"][b]); });
  TextTable t({"check", "where", "nominal margin", "unit", "governing", "P(fail) 1st order", "P(fail) sampled",
               "95 % interval (Wilson)", "1st order"});
  std::vector<double> rank;
  for (size_t i : order) rank.push_back(-Likelihood(r["checks"][i]));
  const std::vector<size_t> shown = RowsToShow(rank);
  std::string notes, contributors;
  for (size_t k : shown) {
    const auto& c = r["checks"][order[k]];
    const Dimension md = MarginDimension(DimensionNamed(c["dimension"].get<std::string>()));
    const auto& sm = c["sampled"];
    const auto& fo = c["first_order"];
    const std::string reliable = c["first_order_reliable"].is_boolean()
                                     ? (c["first_order_reliable"].get<bool>() ? "ok" : "UNRELIABLE")
                                     : "-";
    t.Add({c["name"].get<std::string>(), c["where"].get<std::string>(), Fmt(c["nominal"]["margin"].get<double>(), md, us),
           md == Dimension::kDimensionless ? "-" : Unit(md, us), c["nominal"]["point"].get<std::string>(),
           fo.value("available", false) ? Probability(fo["probability"]) : "-", Probability(sm["probability"]),
           fmt::format("{} ... {}", Probability(sm["interval"]["low"]), Probability(sm["interval"]["high"])),
           reliable});
    const std::string where = c["name"].get<std::string>() + " at " + c["where"].get<std::string>();
    if (!c["note"].get<std::string>().empty()) notes += "  - " + where + ": " + c["note"].get<std::string>() + "\n";
    if (k < 10 && Likelihood(c) > 0) contributors += "  - " + where + ": " + Contributors(fo, 3) + "\n";
  }
  out += t.Render() + OmittedRows(order.size(), shown.size(), "least likely to fail");
  if (!contributors.empty()) out += "\nTop contributors (first order, share of the margin's variance):\n" + contributors;
  if (!notes.empty()) out += "\nNotes:\n" + notes;
  for (const auto& u : r["unsolved_samples"])
    out += fmt::format("  sample {} has no result at {}: {}\n", u["sample"].get<uint64_t>(),
                       u["point"].get<std::string>().empty() ? std::string("any point") : u["point"].get<std::string>(),
                       Localize(u["cause"].get<std::string>(), us));
  return out;
}

std::string SpreadCsv(const nlohmann::json& r) {
  std::string out =
      "check,where,unit,limit,nominal_margin,governing_point,first_order_mean,first_order_sd,first_order_probability,"
      "top_contributor,top_share,sampled_solved,sampled_failures,sampled_probability,wilson95_low,wilson95_high,"
      "sampled_margin_mean,sampled_margin_sd,first_order_reliable\n";
  auto num = [](const nlohmann::json& v) { return v.is_number() ? fmt::format("{:.17g}", v.get<double>()) : std::string(); };
  for (const auto& c : r["checks"]) {
    const auto& fo = c["first_order"];
    const bool a = fo.value("available", false);
    const auto& sm = c["sampled"];
    const bool top = a && !fo["contributors"].empty();
    out += fmt::format("{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{}\n", CsvField(c["name"].get<std::string>()),
                       CsvField(c["where"].get<std::string>()), CsvField(c["unit"].get<std::string>()), num(c["limit"]), num(c["nominal"]["margin"]),
                       CsvField(c["nominal"]["point"].get<std::string>()), a ? num(fo["mean"]) : "", a ? num(fo["sd"]) : "",
                       a ? num(fo["probability"]) : "", top ? CsvField(fo["contributors"][0]["tolerance"].get<std::string>()) : "",
                       top ? num(fo["contributors"][0]["share"]) : "", sm["solved"].get<uint64_t>(),
                       sm["failures"].get<uint64_t>(), num(sm["probability"]), num(sm["interval"]["low"]),
                       num(sm["interval"]["high"]), num(sm["margin_mean"]), num(sm["margin_sd"]),
                       c["first_order_reliable"].is_boolean() ? (c["first_order_reliable"].get<bool>() ? "yes" : "no") : "");
  }
  return out;
}

}  // namespace loopwright::cli
