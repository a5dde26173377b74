"""Opens every demo report in a real browser (Debian chromium, headless) and
checks what a reader would see:

- the page loads with no console error and no uncaught error (chromium's
  console log on stderr, and the page's own #lw-errors box, which collects
  console.error calls, error events and unhandled rejections);
- every plot rendered: the body's data-plots-rendered count equals the
  number of plot containers, and each container holds drawn marks (SVG
  elements under a Vega `role-mark` group, counted here from the DOM the
  browser produced after running the page's scripts, vega-embed's SVG
  renderer);
- the schematic's SVG names every component id of the case (a <text> of the
  drawing equals it);
- a report of a case with a point that does not converge says so on its
  first screen: in the verdict box and the paragraphs right under the title,
  before the drawing and the plots.

A screenshot of each page is saved in the build folder
(report_artefacts/NAME.png) as a test artefact. The cases are the demo
cases of cases/, tests/network/check_cases/bearing_film_sweep.json (a grid
envelope: its grid plots), tests/network/tolerance/spread_cases.json (the
tolerance study's histograms and contributors) and
tests/network/failure_cases/starved_bearing.json (two points do not
converge; data invented).
Prints "N passed, M failed" and exits non-zero on any failure.
"""

import html.parser
import json
import os
import re
import shutil
import subprocess
import sys

BIN = os.environ.get("LOOPWRIGHT_BIN", "loopwright")
SRC = os.environ.get("LOOPWRIGHT_SOURCE_DIR", os.path.join(os.path.dirname(__file__), "..", ".."))
OUT = os.path.join(os.path.dirname(os.path.abspath(BIN)), "report_artefacts")

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tools"))
from tally import check, finish  # noqa: E402

CHROMIUM = shutil.which("chromium") or shutil.which("chromium-browser")
BROWSER_FLAGS = ["--headless", "--no-sandbox", "--disable-gpu", "--hide-scrollbars", "--enable-logging=stderr",
                 "--v=0", "--virtual-time-budget=30000", "--run-all-compositor-stages-before-draw"]
MARK_TAGS = {"path", "rect", "line", "text", "circle", "image"}


class Dom(html.parser.HTMLParser):
    """Marks per plot container, the schematic's texts, the error box, the
    first screen's text (everything before the drawing's heading)."""

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.stack = []          # (tag, attrs)
        self.marks = {}          # plot id -> drawn mark elements
        self.schematic_texts = []
        self.errors = ""
        self.first_screen = ""
        self.past_first = False
        self.rendered = None
        self.plot_ids = []
        self.specs = ""

    def _inside(self, pred):
        return next((a for t, a in reversed(self.stack) if pred(t, a)), None)

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        if tag == "body":
            self.rendered = a.get("data-plots-rendered")
        if tag == "div" and "plot" in (a.get("class") or "").split():
            self.plot_ids.append(a.get("id"))
            self.marks.setdefault(a.get("id"), 0)
        if tag in MARK_TAGS:
            plot = self._inside(lambda t, x: t == "div" and "plot" in (x.get("class") or "").split())
            parent = self.stack[-1][1] if self.stack else {}
            if plot is not None and "role-mark" in (parent.get("class") or ""):
                self.marks[plot.get("id")] += 1
        self.stack.append((tag, a))

    def handle_endtag(self, tag):
        for i in range(len(self.stack) - 1, -1, -1):
            if self.stack[i][0] == tag:
                del self.stack[i:]
                break

    def handle_data(self, data):
        if not self.stack:
            return
        tag, a = self.stack[-1]
        if tag == "h2" and data.strip() == "The loops":
            self.past_first = True
        if not self.past_first and self._inside(lambda t, x: t == "body") is not None and tag not in ("script", "style", "textarea"):
            self.first_screen += data
        if tag == "text" and self._inside(lambda t, x: x.get("id") == "schematic") is not None:
            self.schematic_texts.append(data.strip())
        if a.get("id") == "lw-errors":
            self.errors += data
        if a.get("id") == "lw-plot-specs":
            self.specs += data


def component_ids(case):
    text = open(case, encoding="utf-8").read()
    text = re.sub(r"^\s*//.*$", "", text, flags=re.M)
    j = json.loads(text)
    return [c["id"] for loop in j["loops"] for c in loop["components"]]


def open_report(name, case, extra=()):
    page = os.path.join(OUT, name + ".html")
    r = subprocess.run([BIN, "report", case, "-o", page, "-q", *extra], capture_output=True, text=True, timeout=600)
    check(r.returncode == 0 and os.path.exists(page), f"{name}: report written", r.stderr[-2000:])
    if r.returncode != 0:
        return None, ""
    url = "file://" + os.path.abspath(page)
    d = subprocess.run([CHROMIUM, *BROWSER_FLAGS, "--dump-dom", url], capture_output=True, text=True, timeout=180)
    shot = os.path.join(OUT, name + ".png")
    subprocess.run([CHROMIUM, *BROWSER_FLAGS, "--window-size=1280,2400", f"--screenshot={shot}", url],
                   capture_output=True, text=True, timeout=180)
    check(os.path.exists(shot) and os.path.getsize(shot) > 10000, f"{name}: screenshot saved ({shot})")
    dom = Dom()
    dom.feed(d.stdout)
    console = [ln for ln in d.stderr.splitlines() if "CONSOLE" in ln or "Uncaught" in ln]
    check(not console, f"{name}: no console message (errors or warnings) while loading", "\n".join(console[:8]))
    check(dom.errors.strip() == "", f"{name}: the page's error box is empty", dom.errors[:800])
    return dom, d.stdout


def plots_rendered(name, dom):
    check(len(dom.plot_ids) > 0, f"{name}: the page has plots")
    check(dom.rendered == str(len(dom.plot_ids)), f"{name}: every plot's render finished",
          f"data-plots-rendered={dom.rendered}, containers={len(dom.plot_ids)}")
    for pid in dom.plot_ids:
        check(dom.marks.get(pid, 0) > 0, f"{name}: plot {pid} drew marks ({dom.marks.get(pid, 0)})")


def names_components(name, dom, case):
    texts = set(dom.schematic_texts)
    for cid in component_ids(case):
        check(cid in texts, f"{name}: the schematic names component {cid}")


os.makedirs(OUT, exist_ok=True)
check(CHROMIUM is not None, "chromium is installed (bash .ci/deps)")
if CHROMIUM:
    for stem in ("apu_test_cell", "gearbox_lube_skid", "turbo_test_stand"):
        case = os.path.join(SRC, "cases", stem + ".json")
        # The APU's four design questions take most of a minute: its page is
        # opened without them (the gearbox page draws sizing plots).
        dom, _ = open_report(stem, case, ("--run", "envelope") if stem == "apu_test_cell" else ())
        if dom is None:
            continue
        plots_rendered(stem, dom)
        names_components(stem, dom, case)
        if stem == "gearbox_lube_skid":
            check(any(p.startswith("plot-size-") for p in dom.plot_ids), f"{stem}: sizing plots are on the page",
                  str(dom.plot_ids))
        check("Cautions" in dom.first_screen, f"{stem}: the cautions are on the first screen")
    grid = os.path.join(SRC, "tests", "network", "check_cases", "bearing_film_sweep.json")
    dom, _ = open_report("bearing_film_sweep", grid)
    if dom is not None:
        plots_rendered("bearing_film_sweep", dom)
        check(any(p.startswith("plot-grid-") for p in dom.plot_ids), "grid envelope: plots against the grid axis")
        names_components("bearing_film_sweep", dom, grid)
    spread = os.path.join(SRC, "tests", "network", "tolerance", "spread_cases.json")
    dom, _ = open_report("spread_cases", spread, ("--run", "envelope,spread", "--spread-samples", "300"))
    if dom is not None:
        plots_rendered("spread_cases", dom)
        check(sum(p.startswith("plot-spread-hist-") for p in dom.plot_ids) == 3,
              "tolerance study: a margin histogram per check", str(dom.plot_ids))
    starved = os.path.join(SRC, "tests", "network", "failure_cases", "starved_bearing.json")
    dom, _ = open_report("starved_bearing", starved, ("--run", "envelope"))
    if dom is not None:
        first = " ".join(dom.first_screen.split())
        check("NOT CONVERGED" in first[:600], "starved bearing: NOT CONVERGED within the first lines of the page",
              first[:600])
        check(re.search(r"point \"[^\"]+\" (did not converge|reached a physically impossible state)", first) is not None,
              "starved bearing: the point and what happened are named on the first screen", first[:1200])
        plots_rendered("starved_bearing", dom)
        names_components("starved_bearing", dom, starved)
finish()
