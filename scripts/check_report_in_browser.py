#!/usr/bin/env python3
"""Open a tfa HTML report in headless Chromium: screenshot, console errors, figures, sorting.

Usage::

    python scripts/check_report_in_browser.py REPORT.html [--screenshot OUT.png]
        [--window-size 1280,4000] [--chromium /usr/bin/chromium] [--timeout 120]

Installs nothing. Needs Debian's ``chromium`` package (``apt-get install -y chromium``).

What it does
------------
1. Copies the report into a new temporary folder with a small probe script put first in
   ``<head>``. The probe records uncaught errors, ``console.error``/``console.warn`` calls and
   Content-Security-Policy violations (e.g. an attempt to load anything from outside the file);
   after the page has loaded it checks that every ``<img>`` and ``<svg>`` has decoded with a
   non-zero size, and clicks the header of each table's first numeric column twice to check
   that rows sort ascending then descending by number. It writes its findings into the
   ``data-probe`` attribute of ``<body>``.
2. Runs Chromium headless on the copy with ``--dump-dom`` and ``--enable-logging=stderr``, reads
   the probe's findings from the dumped page and scans Chromium's log for console messages
   (the report itself never writes to the console, so every console line counts).
3. Runs Chromium headless on the unmodified report to take the screenshot.

Exit code 0 when all is well, 1 when a check failed, 2 when the report or Chromium is missing.
"""

from __future__ import annotations

import argparse
import html.parser
import json
import logging
import re
import shutil
import subprocess
import sys
import tempfile
from pathlib import Path

logger = logging.getLogger("check_report")

CHROMIUM_FLAGS = [
    "--headless",
    "--no-sandbox",
    "--disable-gpu",
    "--disable-quic",
    "--no-first-run",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
    "--hide-scrollbars",
]

#: Console lines in Chromium's log: ``[...:INFO:CONSOLE(12)] "message", source: ... (12)``.
CONSOLE_LINE = re.compile(r":CONSOLE[:(]")

PROBE = r"""
<script>
(function () {
  "use strict";
  var found = { errors: [], figures: 0, bad_figures: [], tables: 0, sort_checked: 0,
                sort_failures: [] };
  window.__tfaProbe = found;
  window.addEventListener("error", function (e) {
    if (e.target && e.target !== window && e.target.tagName) {
      var src = String(e.target.src || e.target.href || "").slice(0, 60);
      found.errors.push("failed to load <" + e.target.tagName.toLowerCase() + "> " + src);
      return;
    }
    found.errors.push("uncaught: " + (e.message || String(e.error)) + " (line " + e.lineno + ")");
  }, true);
  document.addEventListener("securitypolicyviolation", function (e) {
    found.errors.push("blocked by the content policy: " + e.blockedURI + " (" +
                      e.violatedDirective + ")");
  });
  ["error", "warn"].forEach(function (level) {
    var original = console[level];
    console[level] = function () {
      found.errors.push("console." + level + ": " + Array.prototype.join.call(arguments, " "));
      return original.apply(console, arguments);
    };
  });
  function checkFigures() {
    var images = document.querySelectorAll("img");
    Array.prototype.forEach.call(images, function (img, i) {
      found.figures += 1;
      var box = img.getBoundingClientRect();
      if (!img.complete || img.naturalWidth === 0 || box.width < 50 || box.height < 50) {
        found.bad_figures.push("img " + (i + 1) + " (" + (img.alt || "no alt") + "): natural " +
          img.naturalWidth + "x" + img.naturalHeight + ", shown " + Math.round(box.width) + "x" +
          Math.round(box.height));
      }
    });
    var svgs = document.querySelectorAll("body svg");
    Array.prototype.forEach.call(svgs, function (svg, i) {
      if (svg.parentElement && svg.parentElement.closest("svg")) { return; }
      found.figures += 1;
      var box = svg.getBoundingClientRect();
      if (box.width < 50 || box.height < 50) {
        found.bad_figures.push("svg " + (i + 1) + ": shown " + Math.round(box.width) + "x" +
                               Math.round(box.height));
      }
    });
  }
  function numbers(table, column) {
    return Array.prototype.map.call(table.tBodies[0].rows, function (row) {
      var v = row.cells[column].getAttribute("data-value");
      return v === null || v === "" ? null : Number(v);
    }).filter(function (v) { return v !== null; });
  }
  function ordered(values, sign) {
    for (var i = 1; i < values.length; i++) {
      if (sign * (values[i] - values[i - 1]) < 0) { return false; }
    }
    return true;
  }
  function checkSorting() {
    var tables = document.querySelectorAll("table.sortable");
    Array.prototype.forEach.call(tables, function (table, t) {
      found.tables += 1;
      if (!table.tBodies.length || table.tBodies[0].rows.length < 2) { return; }
      var first = table.tBodies[0].rows[0];
      var column = -1;
      for (var c = 0; c < first.cells.length; c++) {
        if (first.cells[c].classList.contains("num")) { column = c; break; }
      }
      if (column < 0) { return; }
      var header = table.tHead.rows[0].cells[column];
      header.click();
      var up = ordered(numbers(table, column), 1);
      header.click();
      var down = ordered(numbers(table, column), -1);
      found.sort_checked += 1;
      if (!up || !down) {
        found.sort_failures.push("table " + (table.id || t + 1) + ", column '" +
          header.textContent + "': " + (up ? "" : "ascending ") + (down ? "" : "descending ") +
          "order wrong");
      }
    });
  }
  window.addEventListener("load", function () {
    try { checkFigures(); checkSorting(); }
    catch (e) { found.errors.push("probe failed: " + e); }
    document.body.setAttribute("data-probe", JSON.stringify(found));
  });
})();
</script>
"""


class _FigureCounter(html.parser.HTMLParser):
    """Counts ``<img>`` elements, their sizes and sources, and reads ``body[data-probe]``."""

    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.images: list[dict[str, str]] = []
        self.probe: str | None = None

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        attributes = {k: (v or "") for k, v in attrs}
        if tag == "img":
            self.images.append(attributes)
        elif tag == "body" and "data-probe" in attributes:
            self.probe = attributes["data-probe"]


def _chromium(binary: str, profile: Path, extra: list[str], target: str, timeout: float
              ) -> subprocess.CompletedProcess:
    command = [binary, *CHROMIUM_FLAGS, f"--user-data-dir={profile}", *extra, target]
    logger.debug("running %s", " ".join(command))
    return subprocess.run(command, capture_output=True, text=True, timeout=timeout, check=False)


def _inject_probe(page: str) -> str:
    match = re.search(r"<head[^>]*>", page, flags=re.IGNORECASE)
    if match:
        return page[: match.end()] + PROBE + page[match.end():]
    return PROBE + page


def check_report(report: Path, screenshot: Path, window_size: str, chromium: str,
                 timeout: float) -> list[str]:
    """Run every check; return the list of problems (empty when all is well)."""
    problems: list[str] = []
    page = report.read_text(encoding="utf-8")
    static = _FigureCounter()
    static.feed(page)
    for i, image in enumerate(static.images, start=1):
        src = image.get("src", "")
        if not src.startswith("data:"):
            problems.append(f"figure {i} is not embedded (src starts {src[:40]!r})")
        for key in ("width", "height"):
            try:
                if float(image.get(key, "0")) <= 0:
                    raise ValueError
            except ValueError:
                problems.append(f"figure {i} ({image.get('alt', '')}) has no positive {key}")
    external = re.findall(r"""(?:src|href)\s*=\s*["']?\s*(?:https?:)?//""", page, re.IGNORECASE)
    if external:
        problems.append(f"{len(external)} src/href attribute(s) point outside the file")

    with tempfile.TemporaryDirectory(prefix="tfa-report-check-") as tmp:
        folder = Path(tmp)
        probe_page = folder / "probed.html"
        probe_page.write_text(_inject_probe(page), encoding="utf-8")
        run = _chromium(chromium, folder / "profile-dom",
                        ["--enable-logging=stderr", "--v=0", "--virtual-time-budget=15000",
                         "--window-size=" + window_size, "--dump-dom"],
                        probe_page.as_uri(), timeout)
        if run.returncode != 0:
            problems.append(f"chromium exited with {run.returncode} on the probed page")
        console = [line for line in run.stderr.splitlines() if CONSOLE_LINE.search(line)]
        for line in console:
            problems.append("console: " + line.split("] ", 1)[-1][:300])
        dumped = _FigureCounter()
        dumped.feed(run.stdout)
        if dumped.probe is None:
            problems.append("the probe did not report (page did not finish loading?)")
        else:
            found = json.loads(dumped.probe)
            problems.extend(found.get("errors", []))
            problems.extend("figure not rendered: " + b for b in found.get("bad_figures", []))
            problems.extend("sorting: " + s for s in found.get("sort_failures", []))
            if found.get("figures", 0) < len(static.images):
                problems.append(f"the browser saw {found.get('figures')} figures, the file has "
                                f"{len(static.images)}")
            logger.info("browser: %d figure(s) rendered, %d table(s), sorting checked on %d",
                        found.get("figures", 0) - len(found.get("bad_figures", [])),
                        found.get("tables", 0), found.get("sort_checked", 0))

        screenshot.parent.mkdir(parents=True, exist_ok=True)
        shot = _chromium(chromium, folder / "profile-shot",
                         [f"--screenshot={screenshot.resolve()}", f"--window-size={window_size}"],
                         report.resolve().as_uri(), timeout)
        if shot.returncode != 0 or not screenshot.is_file() or screenshot.stat().st_size == 0:
            problems.append(f"no screenshot written (chromium exit code {shot.returncode})")
        else:
            logger.info("screenshot: %s", screenshot)
    return problems


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("report", type=Path, help="the HTML report to check")
    parser.add_argument("--screenshot", type=Path, default=None,
                        help="PNG to write (default: <report>.screenshot.png beside the report)")
    parser.add_argument("--window-size", default="1280,4000", help="width,height in pixels")
    parser.add_argument("--chromium", default="/usr/bin/chromium", help="Chromium executable")
    parser.add_argument("--timeout", type=float, default=120.0, help="seconds per Chromium run")
    parser.add_argument("-v", "--verbose", action="store_true")
    args = parser.parse_args(argv)
    logging.basicConfig(level=logging.DEBUG if args.verbose else logging.INFO,
                        format="%(message)s", stream=sys.stdout)
    if not args.report.is_file():
        logger.error("report %s not found", args.report)
        return 2
    chromium = shutil.which(args.chromium) or (args.chromium if Path(args.chromium).is_file()
                                                 else None)
    if chromium is None:
        logger.error("Chromium not found at %s; install it with: apt-get install -y chromium",
                     args.chromium)
        return 2
    if not re.fullmatch(r"\d+,\d+", args.window_size):
        logger.error("--window-size must be WIDTH,HEIGHT in pixels, e.g. 1280,4000")
        return 2
    screenshot = args.screenshot or args.report.with_suffix(".screenshot.png")
    try:
        problems = check_report(args.report, screenshot, args.window_size, chromium, args.timeout)
    except subprocess.TimeoutExpired as err:
        logger.error("Chromium did not finish within %.0f s (%s)", args.timeout, err.cmd[0])
        return 1
    if problems:
        logger.error("%d problem(s) in %s:", len(problems), args.report)
        for problem in problems:
            logger.error("  - %s", problem)
        return 1
    logger.info("OK: %s renders without console errors; every figure shows", args.report)
    return 0


if __name__ == "__main__":
    sys.exit(main())
