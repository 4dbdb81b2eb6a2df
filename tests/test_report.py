"""Tests of the report layer: figures, tables, the HTML report and the plain-words summary.

This is plumbing rather than science: the checks are on file formats (PNG signature, SVG that
parses, JSON that parses and agrees with the CSV), on what a reader needs (axis labels with
units, no overlapping tick labels, fonts of at least 7 pt, every figure embedded, no address
outside the file, escaped text) and on the counting in the summary. The example data are made up
for the tests.
"""

from __future__ import annotations

import html
import json
import math
import re
import shutil
import subprocess
import sys
import xml.etree.ElementTree as ET
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from tfa.errors import InputError
from tfa.report import figures as F
from tfa.report.html import ReportSection, build_report
from tfa.report.sections import environment_section, sources_section
from tfa.report.text import h2_line, mode_line, number_in_words
from tfa.report.tables import compare_table_files, read_json_table, write_table

ROOT = Path(__file__).resolve().parents[1]
PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"


# ---------------------------------------------------------------------------------------------
# example frames
# ---------------------------------------------------------------------------------------------


def profile_frame(n: int = 6) -> pd.DataFrame:
    dg = [-12.0, 4.5, -30.0, 8.0, -2.5, -6.0, 3.0, -9.0, 1.0, -4.0, -7.0, 2.0, -1.0, -3.0, 5.0]
    steps = [f"step_{k:02d}_with_a_rather_long_reaction_name" for k in range(n)]
    return pd.DataFrame({"step": steps, "delta_g_kJ_per_mol": dg[:n],
                         "delta_g_standard_kJ_per_mol": [v + 3.0 for v in dg[:n]]})


def scan_frame() -> pd.DataFrame:
    h2 = np.logspace(-7, -3, 9)
    feasible = h2 >= 1e-5
    return pd.DataFrame({
        "h2_activity": h2,
        "feasible": feasible,
        "uphill_set_size": np.where(feasible, 0, [3, 2, 2, 1, 0, 0, 0, 0, 0]),
        "driving_force_kJ_per_mol": np.where(feasible, np.log10(h2 / 1e-5) * 2.0, np.nan),
    })


def census_frame() -> pd.DataFrame:
    rows = []
    for mode, values in {"native": [-10.0, 5.0, -1.0], "no_atp_strict": [-3.0, 2.0, 7.0]}.items():
        for k, v in enumerate(values):
            rows.append({"mode": mode, "reaction": f"r{k}", "delta_g_standard_kJ_per_mol": v,
                         "delta_g_1mM_kJ_per_mol": v})
    return pd.DataFrame(rows)


def ranges_frame(n: int) -> pd.DataFrame:
    rng = np.random.default_rng(7)
    low = rng.uniform(-40, 10, n)
    width = rng.uniform(0.5, 30, n)
    return pd.DataFrame({"reaction": [f"reaction_{k:03d}" for k in range(n)],
                         "delta_g_min_kJ_per_mol": low, "delta_g_max_kJ_per_mol": low + width,
                         "delta_g_kJ_per_mol": low + width / 2})


def _rectangles(fig, texts) -> list[np.ndarray]:
    """Corners (4x2, display pixels) of each drawn text, rotated as drawn.

    Each text is measured unrotated and its box turned about the text's anchor point, so
    slanted labels are compared by their real outline, not by their axis-aligned bounding box.
    """
    fig.canvas.draw()
    renderer = fig.canvas.get_renderer()
    corners = []
    for text in texts:
        if not text.get_text() or not text.get_visible():
            continue
        angle = math.radians(text.get_rotation())
        text.set_rotation(0)
        box = text.get_window_extent(renderer)
        text.set_rotation(math.degrees(angle))
        ax_ = {"left": box.x0, "center": (box.x0 + box.x1) / 2, "right": box.x1}
        ay_ = {"top": box.y1, "center": (box.y0 + box.y1) / 2, "bottom": box.y0,
               "baseline": box.y0, "center_baseline": (box.y0 + box.y1) / 2}
        anchor = np.array([ax_[text.get_horizontalalignment()],
                           ay_[text.get_verticalalignment()]])
        points = np.array([[box.x0, box.y0], [box.x1, box.y0], [box.x1, box.y1],
                           [box.x0, box.y1]]) - anchor
        turn = np.array([[math.cos(angle), -math.sin(angle)], [math.sin(angle), math.cos(angle)]])
        corners.append(points @ turn.T + anchor)
    return corners


def _overlaps(rectangles, tolerance: float = 0.5) -> list[tuple[int, int]]:
    """Pairs of rectangles that overlap by more than ``tolerance`` pixels (separating axes)."""

    def separated(a, b) -> bool:
        for shape in (a, b):
            for k in range(4):
                edge = shape[(k + 1) % 4] - shape[k]
                axis = np.array([-edge[1], edge[0]])
                norm = np.linalg.norm(axis)
                if norm == 0:
                    continue
                axis /= norm
                pa, pb = a @ axis, b @ axis
                if pa.max() <= pb.min() + tolerance or pb.max() <= pa.min() + tolerance:
                    return True
        return False

    return [(i, j) for i in range(len(rectangles)) for j in range(i + 1, len(rectangles))
            if not separated(rectangles[i], rectangles[j])]


def _text_boxes(fig, texts):
    return _rectangles(fig, texts)


def _all_font_sizes(fig) -> list[float]:
    from matplotlib.text import Text

    return [t.get_fontsize() for t in fig.findobj(Text) if t.get_text().strip()]


# ---------------------------------------------------------------------------------------------
# figures
# ---------------------------------------------------------------------------------------------


@pytest.mark.parametrize("name", ["profile", "scan", "census", "ranges"])
def test_figures_written_as_png_and_svg(tmp_path, name):
    fig = {
        "profile": lambda: F.energy_profile_figure(profile_frame()),
        "scan": lambda: F.h2_scan_figure(scan_frame(), threshold=1e-5),
        "census": lambda: F.census_figure(census_frame()),
        "ranges": lambda: F.ranges_figure(ranges_frame(10)),
    }[name]()
    labels = " ".join(ax.get_xlabel() + " " + ax.get_ylabel() for ax in fig.axes)
    png, svg = F.save_figure(fig, tmp_path / name)
    assert png.read_bytes()[:8] == PNG_SIGNATURE
    root = ET.parse(svg).getroot()
    assert root.tag.endswith("svg")
    assert float(root.get("width").rstrip("pt")) > 100
    assert "kJ/mol" in labels  # every figure has an energy axis with its unit
    assert "kJ/mol" in svg.read_text(encoding="utf-8")  # the label is in the SVG (as a comment)
    assert not list(tmp_path.glob(".*.part"))  # no temporary file left behind


def test_energy_profile_bars_whiskers_colours_and_labels_do_not_overlap():
    """One horizontal bar per step whose length is the step's own ΔrG' (never a running sum),
    a ± σ whisker, the near-equilibrium colour exactly for |ΔrG'| < the limit, uphill bars
    hatched; the step labels do not overlap."""
    from matplotlib.colors import to_hex

    frame = profile_frame(15)
    frame["sigma_kJ_per_mol"] = 1.5
    fig = F.energy_profile_figure(frame, near_equilibrium=5.0)
    ax = fig.axes[0]
    assert ax.get_xlabel() == "ΔrG' of the step (kJ/mol)"
    bars = list(ax.containers[0])
    assert len(bars) == 15
    widths = [bar.get_width() for bar in bars]
    assert widths == pytest.approx(list(frame["delta_g_kJ_per_mol"]))   # not cumulative
    for bar, g in zip(bars, frame["delta_g_kJ_per_mol"]):
        near = abs(g) < 5.0
        assert to_hex(bar.get_facecolor()) == ("#e69f00" if near else "#0072b2")
        assert bool(bar.get_hatch()) == (g > 0)
    whiskers = [c for c in ax.containers[1:] if hasattr(c, "has_xerr") and c.has_xerr]
    assert whiskers   # the error bars are drawn
    boxes = _text_boxes(fig, ax.get_yticklabels())
    assert len(boxes) == 15
    assert _overlaps(boxes) == []
    assert min(_all_font_sizes(fig)) >= 7.0


def test_energy_profile_rejects_missing_values():
    frame = profile_frame(3)
    frame.loc[1, "delta_g_kJ_per_mol"] = np.nan
    with pytest.raises(InputError, match="step_01"):
        F.energy_profile_figure(frame)
    with pytest.raises(InputError, match="delta_g_kJ_per_mol"):
        F.energy_profile_figure(frame.drop(columns="delta_g_kJ_per_mol"))


def test_h2_scan_panels_axis_and_threshold():
    fig = F.h2_scan_figure(scan_frame(), threshold=1e-5)
    assert len(fig.axes) == 3
    assert fig.axes[-1].get_xlabel() == "dissolved H2 (mol/L)"
    assert fig.axes[-1].get_xscale() == "log"
    assert "kJ/mol" in fig.axes[2].get_ylabel()
    for ax in fig.axes:  # the threshold line is drawn on every panel
        xs = [line.get_xdata()[0] for line in ax.get_lines() if line.get_linestyle() == "--"]
        assert any(math.isclose(x, 1e-5) for x in xs)
    fig_bar = F.h2_scan_figure(scan_frame(), unit="bar")
    assert fig_bar.axes[-1].get_xlabel() == "H2 partial pressure (bar)"
    with pytest.raises(InputError, match="unit"):
        F.h2_scan_figure(scan_frame(), unit="ppm")
    bad = scan_frame()
    bad.loc[0, "h2_activity"] = 0.0
    with pytest.raises(InputError, match="positive"):
        F.h2_scan_figure(bad)


def test_census_counts_exergonic_in_legend():
    fig = F.census_figure(census_frame())
    texts = [t.get_text() for t in fig.legends[0].get_texts()]
    # native: -10, 5, -1 -> two of three below zero; without ATP: -3, 2, 7 -> one of three
    assert "native, ΔrG'°: 2 of 3 exergonic" in texts
    assert "without ATP, ΔrG' at 1 mM: 1 of 3 exergonic" in texts
    assert fig.axes[0].get_xlabel() == "ΔrG' (kJ/mol)"
    assert _overlaps(_text_boxes(fig, fig.axes[0].get_yticklabels())) == []


def test_ranges_many_reactions_keep_readable_fonts_and_say_so():
    small = F.ranges_figure(ranges_frame(10))
    big_frame = ranges_frame(150)
    big = F.ranges_figure(big_frame)
    assert big.get_figheight() > small.get_figheight()
    ax = big.axes[0]
    shown = [t.get_text() for t in ax.get_yticklabels()]
    assert len(shown) == F.MAX_RANGE_ROWS
    assert "most constrained" in ax.get_title() and "150" in ax.get_title()
    # the kept ones are the narrowest intervals
    widths = (big_frame["delta_g_max_kJ_per_mol"] - big_frame["delta_g_min_kJ_per_mol"]).to_numpy()
    kept = big_frame.loc[big_frame["reaction"].isin(shown)]
    kept_widths = kept["delta_g_max_kJ_per_mol"] - kept["delta_g_min_kJ_per_mol"]
    assert kept_widths.max() <= np.sort(widths)[F.MAX_RANGE_ROWS - 1] + 1e-12
    assert min(_all_font_sizes(big)) >= 7.0
    assert _overlaps(_text_boxes(big, ax.get_yticklabels())) == []


def test_ranges_rejects_inverted_interval():
    frame = pd.DataFrame({"reaction": ["a"], "delta_g_min_kJ_per_mol": [3.0],
                          "delta_g_max_kJ_per_mol": [-1.0]})
    with pytest.raises(InputError, match="exceeds the largest for a"):
        F.ranges_figure(frame)


# ---------------------------------------------------------------------------------------------
# tables
# ---------------------------------------------------------------------------------------------


def test_write_table_csv_and_json_agree(tmp_path):
    frame = pd.DataFrame({
        "reaction": ["001", "a,b", 'say "x"', "ΔrG'°"],
        "dg": [-12.345678901234567, np.nan, np.inf, 1e-300],
        "count": pd.array([1, None, 3, 4], dtype="Int64"),
        "feasible": [True, False, True, False],
        "set": [["a", "b"], [], ["c"], ["d"]],
    })
    csv_path, json_path = write_table(frame, tmp_path / "t")
    records = json.loads(json_path.read_text(encoding="utf-8"))  # parses
    assert records[1]["dg"] is None and records[2]["dg"] is None  # NaN and inf -> null
    assert records[0]["reaction"] == "001" and records[0]["set"] == "a; b"
    assert compare_table_files(csv_path, json_path) == []
    back = read_json_table(json_path)
    assert list(back.columns) == list(frame.columns)
    # a planted disagreement is found
    json_path.write_text(json_path.read_text(encoding="utf-8").replace("-12.3456", "-12.3457"),
                         encoding="utf-8")
    problems = compare_table_files(csv_path, json_path)
    assert len(problems) == 1 and "row 1, column 'dg'" in problems[0]


def test_write_table_rejects_duplicate_columns(tmp_path):
    frame = pd.DataFrame([[1, 2]], columns=["a", "a"])
    with pytest.raises(InputError, match="duplicate column"):
        write_table(frame, tmp_path / "dup")


# ---------------------------------------------------------------------------------------------
# HTML
# ---------------------------------------------------------------------------------------------


@pytest.fixture(scope="module")
def report_page(tmp_path_factory):
    folder = tmp_path_factory.mktemp("report")
    F.save_figure(F.energy_profile_figure(profile_frame()), folder / "profile")
    F.save_figure(F.h2_scan_figure(scan_frame(), threshold=1e-5), folder / "scan")
    png, _ = F.save_figure(F.census_figure(census_frame()), folder / "census")
    sources = pd.DataFrame({"key": ["K1"], "authors": ["A. Author"], "year": [2001],
                            "citation": ["J. Test 1, 1-2"], "doi": ["10.0000/test"],
                            "peer_reviewed": ["yes"]})
    from tfa.conditions import Conditions

    sections = [
        ReportSection("Summary", "runs without ATP: no <script>alert('x')</script> & more"),
        environment_section(Conditions.from_celsius(70, 6.5, 0.2), {"H2": 1e-3},
                            {"formate": (1e-6, 1e-2)}, name="made-up vent"),
        ReportSection("Energy profile", "", figure_paths=[folder / "profile"],
                      figure_captions=["cumulative energy"]),
        ReportSection("H2 scan and threshold", "", table=scan_frame(),
                      figure_paths=[folder / "scan.svg"]),
        ReportSection("Census", "", figure_paths=[png],
                      table=pd.DataFrame({"reaction": ["<b>r1</b>"],
                                          "delta_g_kJ_per_mol": [-1.5]})),
        sources_section(sources),
    ]
    path = build_report(sections, folder / "report.html", title="Test <report>")
    return path, path.read_text(encoding="utf-8")


def test_html_is_self_contained(report_page):
    _, page = report_page
    attributes = re.findall(r"""\b(?:src|href)\s*=\s*["']([^"']*)""", page)
    assert attributes, "the page should have src/href attributes to check"
    assert not [a for a in attributes if a.lower().startswith(("http:", "https:", "//"))]
    assert "http://" not in page and "https://" not in page
    assert "Content-Security-Policy" in page and "default-src 'none'" in page
    assert "<link" not in page and "@import" not in page


def test_html_embeds_every_figure(report_page):
    _, page = report_page
    images = re.findall(r"<img [^>]*>", page)
    assert len(images) == 3
    for tag in images:
        assert 'src="data:image/' in tag
        width = int(re.search(r'width="(\d+)"', tag).group(1))
        height = int(re.search(r'height="(\d+)"', tag).group(1))
        assert width > 100 and height > 100
    assert page.count("data:image/svg+xml;base64,") == 2  # stems and .svg paths embed SVG
    assert page.count("data:image/png;base64,") == 1


def test_html_tables_are_sortable_and_text_is_escaped(report_page):
    _, page = report_page
    assert page.count('<table class="sortable"') >= 4
    assert "addEventListener(\"click\"" in page and "sortTable" in page
    assert "<script>alert" not in page
    assert html.escape("<script>alert('x')</script>") in page
    assert "&lt;b&gt;r1&lt;/b&gt;" in page
    assert "<title>Test &lt;report&gt;</title>" in page
    # numbers carry their full value for sorting
    assert 'data-value="-1.5"' in page


def test_html_carries_the_standard_sections(report_page):
    _, page = report_page
    for title in ("Environment", "Data sources", "Conventions and their limits", "Cautions"):
        assert f"{title}</h2>" in page
    assert "hazardous" in page and "not safety guidance" in page
    assert "10.0000/test" in page  # the DOI, as text
    assert "70.0 degC" in page


def test_html_missing_figure_is_a_clear_error(tmp_path):
    with pytest.raises(InputError, match="nothing_here"):
        build_report([ReportSection("Ranges", "", figure_paths=[tmp_path / "nothing_here"])],
                     tmp_path / "r.html")
    assert not (tmp_path / "r.html").exists()


def _render(path: Path, shot: Path) -> subprocess.CompletedProcess:
    """Open a report in Debian's headless Chromium (.ci/run installs it; without it this is a
    failure, not a skip)."""
    assert shutil.which("chromium") or Path("/usr/bin/chromium").exists(), (
        "Debian's chromium package is needed for the report's browser test: "
        "apt-get install -y chromium")
    return subprocess.run([sys.executable, str(ROOT / "scripts" / "check_report_in_browser.py"),
                           str(path), "--screenshot", str(shot), "--window-size", "1280,2000"],
                          capture_output=True, text=True, timeout=300)


def test_html_renders_in_headless_chromium(report_page, tmp_path):
    path, _ = report_page
    shot = tmp_path / "shot.png"
    run = _render(path, shot)
    assert run.returncode == 0, run.stdout + run.stderr
    assert "3 figure(s) rendered" in run.stdout
    assert shot.read_bytes()[:8] == PNG_SIGNATURE


@pytest.mark.slow
def test_bundled_assessment_report_renders_in_headless_chromium(bundled_run, tmp_path):
    """The report of the bundled assessment: every figure decodes, tables sort, no console
    error, nothing loaded from outside the file."""
    shot = tmp_path / "bundled.png"
    run = _render(bundled_run.out / "report.html", shot)
    assert run.returncode == 0, run.stdout + run.stderr
    figures = len(list(bundled_run.out.glob("*.svg")))
    assert figures >= 4 and f"{figures} figure(s) rendered" in run.stdout


# ---------------------------------------------------------------------------------------------
# summary
# ---------------------------------------------------------------------------------------------


def test_numbers_in_words():
    assert [number_in_words(n) for n in (1, 2, 10, 11)] == ["one", "two", "ten", "11"]


def test_summary_sentences():
    assert (mode_line("runs without ATP", False, [["acs", "fdh", "mtr"], ["fdh", "mtr", "pfor"]])
            == "runs without ATP: no; three steps must be driven uphill: acs, fdh, mtr "
               "(the first of at least two sets of this size in the order of reaction ids)")
    assert (mode_line("runs without ATP", False, [["acs", "fdh", "mtr"]], count=4)
            == "runs without ATP: no; three steps must be driven uphill: acs, fdh, mtr "
               "(the first of four sets of this size in the order of reaction ids)")
    assert (mode_line("runs without ATP", False, [["acs"]], count=1)
            == "runs without ATP: no; one step must be driven uphill: acs (the only set of this "
               "size)")
    assert (mode_line("runs as bare chemistry (ATP coupling stripped)", False, [["acs"]])
            == "runs as bare chemistry (ATP coupling stripped): no; one step must be driven "
               "uphill: acs")
    assert mode_line("runs with H2 in place of the carriers", None).startswith(
        "runs with H2 in place of the carriers: undetermined")
    assert mode_line("runs with the ATP its own reactions make", True) == (
        "runs with the ATP its own reactions make: yes")
    assert (h2_line(None, (1e-7, 1e-2))
            == "H2 needed: no amount between 1.00e-07 mol/L and 0.01 mol/L lets the network run")


def test_overlap_check_can_fail():
    """The overlap measure itself: long horizontal labels side by side must be caught."""
    fig = F.energy_profile_figure(profile_frame(15))
    labels = fig.axes[0].get_yticklabels()
    for label in labels:   # all step labels moved onto one line
        label.set_y(0)
        label.set_position((0, 0))
    fig.axes[0].set_yticks([0] * len(labels))
    assert _overlaps(_text_boxes(fig, fig.axes[0].get_yticklabels()))


def test_html_text_keeps_line_breaks_and_lists(tmp_path):
    text = "runs with ATP: yes\nruns without ATP: no\n\n- first <point>\n- second"
    page = build_report([ReportSection("Summary", text)], tmp_path / "r.html").read_text()
    assert "<p>runs with ATP: yes<br>runs without ATP: no</p>" in page
    assert "<ul><li>first &lt;point&gt;</li><li>second</li></ul>" in page
