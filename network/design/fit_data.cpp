// fit — reading the data of a fit (CSV or JSON) and the models' column
// specs; see fit.h.
#include "network/design/fit.h"

#include <fmt/format.h>
#include <fmt/ranges.h>

#include <algorithm>
#include <cmath>
#include <sstream>

#include "network/case/case.h"
#include "network/case/diagnostics.h"

namespace loopwright {

namespace {

using D = Dimension;

std::string Trim(const std::string& s) {
  size_t b = s.find_first_not_of(" \t\r\n");
  if (b == std::string::npos) return "";
  size_t e = s.find_last_not_of(" \t\r\n");
  return s.substr(b, e - b + 1);
}

std::string Lower(std::string s) {
  for (char& c : s) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return s;
}

// Text shown in a message, cut to a readable length.
std::string Shorten(const std::string& s) { return s.size() <= 60 ? s : s.substr(0, 57) + "..."; }

std::string JoinNames(const std::vector<FitQuantity>& q) {
  std::string s;
  for (size_t i = 0; i < q.size(); ++i) s += (i ? ", " : "") + q[i].name;
  return s;
}

const FitQuantity* FindQ(const std::vector<FitQuantity>& v, const std::string& name) {
  for (const auto& q : v)
    if (q.name == name) return &q;
  return nullptr;
}

}  // namespace

const std::vector<FitModelSpec>& FitModels() {
  static const std::vector<FitModelSpec> kModels = {
      {"centrifugal_pump",
       "quadratic head-flow curve H = a0 + a1 Q + a2 Q^2 at the rated speed",
       {{"flow", D::kVolumeFlow, "pump flow"}, {"head", D::kLength, "pump head"},
        {"efficiency", D::kDimensionless, "pump efficiency (optional)"}},
       {{"speed", D::kRotationalSpeed, "speed of the curve (required)"}}},
      {"displacement_pump",
       "Q = D n/(2 pi) - C_s dP/mu: displacement and laminar slip",
       {{"pressure_rise", D::kPressureDifference, "pressure rise"}, {"flow", D::kVolumeFlow, "delivered flow"},
        {"viscosity", D::kKinematicViscosity, "kinematic viscosity (with the density condition)"},
        {"dynamic_viscosity", D::kDynamicViscosity, "dynamic viscosity"},
        {"speed", D::kRotationalSpeed, "shaft speed (else the speed condition)"}},
       {{"speed", D::kRotationalSpeed, "shaft speed"},
        {"density", D::kDensity, "liquid density (needed with kinematic viscosity)"},
        {"viscosity", D::kKinematicViscosity, "kinematic viscosity of every point"},
        {"dynamic_viscosity", D::kDynamicViscosity, "dynamic viscosity of every point"},
        {"relief_crack", D::kPressureDifference, "internal relief cracking pressure: points above it are excluded"}}},
      {"filter",
       "dp = a mu Q + b rho Q^2: element (Darcy) and housing loss",
       {{"flow", D::kVolumeFlow, "flow"}, {"dp", D::kPressureDifference, "pressure drop"},
        {"viscosity", D::kKinematicViscosity, "kinematic viscosity"}},
       {{"density", D::kDensity, "liquid density (default 870 kg/m3)"},
        {"viscosity", D::kKinematicViscosity, "kinematic viscosity of every point"}}},
      {"air_cooler",
       "e-NTU crossflow (both unmixed), UA = UA_r (m_l/m_l,r)^n_l (m_a/m_a,r)^n_a",
       {{"heat", D::kPower, "heat rejected"}, {"liquid_flow", D::kVolumeFlow, "liquid volumetric flow"},
        {"air_flow", D::kMassFlow, "air mass flow"}, {"itd", D::kTemperatureDifference, "liquid inlet - air inlet"},
        {"dp", D::kPressureDifference, "liquid-side pressure drop (optional)"}},
       {{"liquid_specific_heat", D::kSpecificHeat, "liquid cp (default 2000 J/(kg K), mineral oil, common practice)"},
        {"liquid_density", D::kDensity, "liquid density (required)"},
        {"viscosity", D::kKinematicViscosity, "liquid kinematic viscosity (required with dp)"}}},
      {"valve",
       "Kv = Kvs phi(opening; R), inherent characteristic by RelativeKv",
       {{"opening", D::kDimensionless, "relative travel 0..1 (or %)"},
        {"kv", D::kFlowCoefficientKv, "flow coefficient (Kv, or Cv unit)"}},
       {{"characteristic", D::kDimensionless, "equal_percentage (default) | linear | quick_opening", true}}},
  };
  return kModels;
}

const FitModelSpec* FindFitModel(const std::string& name) {
  for (const auto& m : FitModels())
    if (m.name == name) return &m;
  return nullptr;
}

int FitData::Column(const std::string& name) const {
  for (size_t i = 0; i < columns.size(); ++i)
    if (columns[i] == name) return static_cast<int>(i);
  return -1;
}

std::string FitData::Where(size_t row) const {
  const int line = row < lines.size() ? lines[row] : 0;
  const std::string at = line > 0 ? fmt::format("{}:{}", file, line) : file;
  return json ? fmt::format("{} (rows[{}])", at, row) : at;
}

std::string FitData::WhereCondition(const std::string& name) const {
  auto it = condition_lines.find(name);
  return it == condition_lines.end() || it->second <= 0 ? file : fmt::format("{}:{}", file, it->second);
}

// ---------------------------------------------------------------- parsing

namespace {

// "name [unit]" -> name, unit. False on a malformed cell.
bool SplitHeader(const std::string& cell, std::string* name, std::string* unit) {
  const std::string c = Trim(cell);
  const size_t lb = c.find('[');
  if (lb == std::string::npos) {
    *name = c;
    unit->clear();
    return c.find(']') == std::string::npos;
  }
  const size_t rb = c.find(']', lb);
  if (rb == std::string::npos || Trim(c.substr(rb + 1)) != "") return false;
  *name = Trim(c.substr(0, lb));
  *unit = Trim(c.substr(lb + 1, rb - lb - 1));
  return true;
}

bool SetColumns(const std::string& where, const std::vector<std::string>& header, const FitModelSpec& spec,
                FitData* out, std::string* error) {
  for (size_t i = 0; i < header.size(); ++i) {
    std::string name, unit;
    const std::string col_where = fmt::format("{}, column {}", where, i + 1);
    if (!SplitHeader(header[i], &name, &unit)) {
      *error = fmt::format("{}: header cell \"{}\" is not of the form \"name [unit]\"", col_where, Trim(header[i]));
      return false;
    }
    const FitQuantity* q = FindQ(spec.columns, name);
    if (q == nullptr) {
      *error = fmt::format("{}: unknown column \"{}\" for model {}; accepted columns: {}", col_where, name, spec.name,
                           JoinNames(spec.columns));
      return false;
    }
    if (out->Column(name) >= 0) {
      *error = fmt::format("{}: column \"{}\" appears twice", col_where, name);
      return false;
    }
    if (unit.empty() && q->dim != D::kDimensionless && q->dim != D::kFlowCoefficientKv) {
      *error = fmt::format("{}: column \"{}\" needs a unit, e.g. \"{} [{}]\"; accepted units: {}", col_where, name, name,
                           DisplayUnit(q->dim, UnitSystem::kSI), fmt::join(AcceptedUnits(q->dim), ", "));
      return false;
    }
    if (!unit.empty()) {
      const ParsedQuantity p = ParseQuantity("1 " + unit, q->dim);
      if (!p.ok) {
        *error = fmt::format("{}: column \"{}\": {}", col_where, name, p.error);
        return false;
      }
    }
    out->columns.push_back(name);
    out->units.push_back(unit);
  }
  return true;
}

bool ParseCell(const std::string& where, const std::string& cell, const FitQuantity& q, const std::string& unit,
               double* si, std::string* error) {
  const std::string t = Trim(cell);
  const std::string lt = Lower(t);
  if (lt.find("nan") != std::string::npos || lt.find("inf") != std::string::npos) {
    *error = fmt::format("{} ({}): non-finite value \"{}\"", where, q.name, t);
    return false;
  }
  if (t.empty()) {
    *error = fmt::format("{} ({}): empty value", where, q.name);
    return false;
  }
  const ParsedQuantity p = ParseQuantity(unit.empty() ? t : t + " " + unit, q.dim);
  if (!p.ok || !std::isfinite(p.si)) {
    *error = fmt::format("{} ({}): \"{}\": {}", where, q.name, t, p.ok ? "non-finite value" : p.error);
    return false;
  }
  *si = p.si;
  return true;
}

// Sets condition `name` from its text, found at `where` (text line `line`,
// 0 when unknown). Every numeric condition is a positive physical quantity.
bool SetCondition(const std::string& where, int line, const std::string& name, const std::string& value,
                  const FitModelSpec& spec, FitData* out, std::string* error) {
  const FitQuantity* q = FindQ(spec.conditions, name);
  if (q == nullptr) {
    *error = fmt::format("{}: unknown condition \"{}\" for model {}; accepted conditions: {}", where, name, spec.name,
                         spec.conditions.empty() ? std::string("(none)") : JoinNames(spec.conditions));
    return false;
  }
  if (out->condition_text.count(name)) {
    *error = fmt::format("{}: condition {} is set twice (first at {}); give it once", where, name,
                         out->WhereCondition(name));
    return false;
  }
  out->condition_text[name] = Trim(value);
  out->condition_lines[name] = line;
  if (q->text) return true;
  const ParsedQuantity p = ParseQuantity(value, q->dim);
  if (!p.ok || !std::isfinite(p.si)) {
    *error = fmt::format("{}: condition {}: {}", where, name, p.ok ? "non-finite value" : p.error);
    return false;
  }
  if (!(p.si > 0)) {
    *error = fmt::format("{}: condition {} must be positive, got \"{}\"", where, name, Trim(value));
    return false;
  }
  out->conditions[name] = p.si;
  return true;
}

// A quantity given both as a column and as a condition is ambiguous.
bool CheckConditionsVersusColumns(const FitData& d, std::string* error) {
  for (const auto& [name, text] : d.condition_text) {
    (void)text;
    if (d.Column(name) >= 0) {
      *error = fmt::format("{}: {} is given both as a condition and as a column; give it one way", d.WhereCondition(name),
                           name);
      return false;
    }
  }
  return true;
}

std::vector<std::string> SplitCsv(const std::string& line) {
  std::vector<std::string> cells;
  std::string cur;
  bool quoted = false;
  for (char c : line) {
    if (c == '"') {
      quoted = !quoted;
    } else if (c == ',' && !quoted) {
      cells.push_back(cur);
      cur.clear();
    } else {
      cur += c;
    }
  }
  cells.push_back(cur);
  return cells;
}

bool ParseCsv(const std::string& text, const FitModelSpec& spec, FitData* out, std::string* error) {
  std::istringstream in(text);
  std::string line;
  int n = 0;
  bool have_header = false;
  while (std::getline(in, line)) {
    ++n;
    const std::string t = Trim(line);
    const std::string where = fmt::format("{}:{}", out->file, n);
    if (t.empty()) continue;
    if (t[0] == '#') {
      // "# name = value" sets a condition; any other comment is ignored.
      const std::string body = Trim(t.substr(1));
      const size_t eq = body.find('=');
      if (eq != std::string::npos) {
        const std::string key = Trim(body.substr(0, eq));
        const bool ident = !key.empty() && std::all_of(key.begin(), key.end(), [](char c) {
          return std::isalnum(static_cast<unsigned char>(c)) || c == '_';
        });
        if (ident && !SetCondition(where, n, key, body.substr(eq + 1), spec, out, error)) return false;
      }
      continue;
    }
    const std::vector<std::string> cells = SplitCsv(t);
    if (!have_header) {
      if (!SetColumns(where, cells, spec, out, error)) return false;
      have_header = true;
      continue;
    }
    if (cells.size() != out->columns.size()) {
      *error = fmt::format("{}: {} values, but the header has {} columns", where, cells.size(), out->columns.size());
      return false;
    }
    std::vector<double> row(cells.size());
    for (size_t c = 0; c < cells.size(); ++c) {
      const FitQuantity* q = FindQ(spec.columns, out->columns[c]);
      if (!ParseCell(fmt::format("{}, column {}", where, c + 1), cells[c], *q, out->units[c], &row[c], error))
        return false;
    }
    out->rows.push_back(row);
    out->lines.push_back(n);
  }
  if (!have_header) {
    *error = fmt::format("{}: no header row (expected e.g. \"flow [L/min],head [m]\")", out->file);
    return false;
  }
  return CheckConditionsVersusColumns(*out, error);
}

// Text line (1-based) where each value of JSON text starts, by JSON Pointer,
// for values at most `max_depth` levels deep ("/rows/3" -> 12). A light scan
// that skips strings and comments, run after the text parsed (so it may take
// the text as well-formed).
std::map<std::string, int> JsonValueLines(const std::string& text, size_t max_depth) {
  struct Frame {
    bool object;
    std::string key;
    long index;
  };
  std::vector<Frame> stack;
  std::map<std::string, int> lines;
  int line = 1;
  bool expect_key = false;
  auto on_value = [&]() {
    if (!stack.empty() && !stack.back().object) ++stack.back().index;
    if (stack.size() > max_depth) return;
    std::string p;
    for (const Frame& f : stack) p += "/" + (f.object ? PointerToken(f.key) : std::to_string(f.index));
    lines.emplace(p, line);
  };
  const size_t n = text.size();
  for (size_t i = 0; i < n; ++i) {
    const char c = text[i];
    if (c == '\n') {
      ++line;
    } else if (c == ' ' || c == '\t' || c == '\r' || c == ':') {
    } else if (c == '/' && i + 1 < n && text[i + 1] == '/') {
      while (i + 1 < n && text[i + 1] != '\n') ++i;
    } else if (c == '/' && i + 1 < n && text[i + 1] == '*') {
      for (i += 2; i + 1 < n && !(text[i] == '*' && text[i + 1] == '/'); ++i)
        if (text[i] == '\n') ++line;
      ++i;
    } else if (c == '"') {
      std::string str;
      size_t j = i + 1;
      for (; j < n && text[j] != '"'; ++j) {
        if (text[j] == '\\' && j + 1 < n) ++j;
        str += text[j];
      }
      i = j;
      if (expect_key) {
        stack.back().key = str;
        expect_key = false;
      } else {
        on_value();
      }
    } else if (c == '{' || c == '[') {
      on_value();
      stack.push_back({c == '{', "", -1});
      expect_key = c == '{';
    } else if (c == '}' || c == ']') {
      if (!stack.empty()) stack.pop_back();
      expect_key = false;
    } else if (c == ',') {
      expect_key = !stack.empty() && stack.back().object;
    } else {  // a number or a literal
      on_value();
      while (i + 1 < n && std::string_view(",]} \t\r\n/").find(text[i + 1]) == std::string_view::npos) ++i;
    }
  }
  return lines;
}

// Where values of the parsed JSON text are: "file:LINE" for a pointer
// whose line is known, else the file.
struct JsonPlaces {
  const std::string& file;
  std::map<std::string, int> lines;
  std::string At(const std::string& pointer) const {
    auto it = lines.find(pointer);
    return it == lines.end() ? file : fmt::format("{}:{}", file, it->second);
  }
  int Line(const std::string& pointer) const {
    auto it = lines.find(pointer);
    return it == lines.end() ? 0 : it->second;
  }
};

// The top level: an object with "columns" and "rows" and no unknown key.
bool CheckJsonShape(const nlohmann::json& j, const JsonPlaces& at, const std::string& file, std::string* error) {
  if (!j.is_object() || !j.contains("columns") || !j["columns"].is_array() || !j.contains("rows") ||
      !j["rows"].is_array()) {
    *error = fmt::format("{}: expected an object with \"columns\" (array of \"name [unit]\") and \"rows\" (array of arrays)",
                         file);
    return false;
  }
  for (auto it = j.begin(); it != j.end(); ++it) {
    if (it.key() != "columns" && it.key() != "rows" && it.key() != "conditions" && it.key() != "//" &&
        it.key() != "comment") {
      *error = fmt::format("{}: unknown key \"{}\" (accepted: columns, rows, conditions, comment)",
                           at.At("/" + PointerToken(it.key())), it.key());
      return false;
    }
  }
  return true;
}

bool ReadJsonColumns(const nlohmann::json& j, const JsonPlaces& at, const FitModelSpec& spec, FitData* out,
                     std::string* error) {
  std::vector<std::string> header;
  for (size_t i = 0; i < j["columns"].size(); ++i) {
    if (!j["columns"][i].is_string()) {
      *error = fmt::format("{}: columns[{}] must be a string \"name [unit]\"", at.At(fmt::format("/columns/{}", i)), i);
      return false;
    }
    header.push_back(j["columns"][i].get<std::string>());
  }
  return SetColumns(at.At("/columns") + ": columns", header, spec, out, error);
}

bool ReadJsonConditions(const nlohmann::json& j, const JsonPlaces& at, const FitModelSpec& spec, FitData* out,
                        std::string* error) {
  if (!j.contains("conditions")) return true;
  if (!j["conditions"].is_object()) {
    *error = fmt::format("{}: \"conditions\" must be an object of \"value unit\" strings", at.At("/conditions"));
    return false;
  }
  for (auto it = j["conditions"].begin(); it != j["conditions"].end(); ++it) {
    const std::string ptr = "/conditions/" + PointerToken(it.key());
    std::string v;
    if (it.value().is_string()) {
      v = it.value().get<std::string>();
    } else if (it.value().is_number()) {
      // A bare JSON number is SI, as in a case file: written with the SI
      // unit, since text without a unit is refused.
      const FitQuantity* q = FindQ(spec.conditions, it.key());
      const std::vector<std::string> units = q && !q->text ? AcceptedUnits(q->dim) : std::vector<std::string>();
      v = fmt::format("{:.17g}{}", it.value().get<double>(), units.empty() ? "" : " " + units[0]);
    } else {
      *error = fmt::format("{}: conditions.{} must be a string or a number", at.At(ptr), it.key());
      return false;
    }
    if (!SetCondition(at.At(ptr) + ": conditions." + it.key(), at.Line(ptr), it.key(), v, spec, out, error)) return false;
  }
  return true;
}

bool ReadJsonRows(const nlohmann::json& rows, const JsonPlaces& at, const FitModelSpec& spec, FitData* out,
                  std::string* error) {
  for (size_t r = 0; r < rows.size(); ++r) {
    const std::string ptr = fmt::format("/rows/{}", r);
    const std::string where = fmt::format("{} (rows[{}])", at.At(ptr), r);
    if (!rows[r].is_array() || rows[r].size() != out->columns.size()) {
      *error = fmt::format("{}: a row must be an array of {} values ({}), got {}", where, out->columns.size(),
                           fmt::join(out->columns, ", "), Shorten(rows[r].dump()));
      return false;
    }
    std::vector<double> row(out->columns.size());
    for (size_t c = 0; c < row.size(); ++c) {
      const auto& cell = rows[r][c];
      const FitQuantity* q = FindQ(spec.columns, out->columns[c]);
      std::string s;
      if (cell.is_number()) {
        s = fmt::format("{:.17g}", cell.get<double>());
      } else if (cell.is_string()) {
        s = cell.get<std::string>();
      } else {
        *error = fmt::format("{}, value {} ({}): expected a number, got {}", where, c + 1, q->name, Shorten(cell.dump()));
        return false;
      }
      if (!ParseCell(fmt::format("{}, value {}", where, c + 1), s, *q, out->units[c], &row[c], error)) return false;
    }
    out->rows.push_back(row);
    out->lines.push_back(at.Line(ptr));
  }
  return true;
}

bool ParseJson(const std::string& text, const FitModelSpec& spec, FitData* out, std::string* error) {
  nlohmann::json j;
  Diagnostics diag;
  const bool parsed = ParseJsonText(text, &j, &diag);
  const JsonPlaces at{out->file, parsed ? JsonValueLines(text, 3) : std::map<std::string, int>()};
  if (!parsed || diag.HasErrors()) {
    for (const Diagnostic& e : diag.items()) {
      if (e.warning) continue;
      const std::string place = e.line > 0 ? fmt::format("{}:{}:{}", out->file, e.line, e.column) : at.At(e.pointer);
      *error = fmt::format("{}: {}{}", place, e.pointer.empty() ? "" : e.pointer + ": ", e.message);
      return false;
    }
  }
  if (!CheckJsonShape(j, at, out->file, error) || !ReadJsonColumns(j, at, spec, out, error) ||
      !ReadJsonConditions(j, at, spec, out, error) || !ReadJsonRows(j["rows"], at, spec, out, error))
    return false;
  return CheckConditionsVersusColumns(*out, error);
}

}  // namespace

bool ParseFitData(const std::string& file, const std::string& text, const FitModelSpec& spec, FitData* out,
                  std::string* error) {
  *out = FitData();
  out->file = file;
  const std::string t = Trim(text);
  const bool json = (file.size() >= 5 && Lower(file.substr(file.size() - 5)) == ".json") || (!t.empty() && t[0] == '{');
  out->json = json;
  return json ? ParseJson(text, spec, out, error) : ParseCsv(text, spec, out, error);
}

}  // namespace loopwright
