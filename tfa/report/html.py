"""One self-contained HTML report: text, sortable tables and embedded figures in a single file.

Nothing in the file points outside it: the style sheet and the sorting script are inline,
figures are embedded as ``data:`` URIs (SVG preferred, PNG otherwise), and a Content Security
Policy forbids the browser to load anything else. Every piece of text is escaped with
:func:`html.escape`.

The caller fills a list of :class:`ReportSection` (title, plain-words text, an optional table,
figures) and calls :func:`build_report`; :mod:`tfa.report.sections` builds the sections that do
not depend on the analyses (environment, data sources, conventions, cautions).
"""

from __future__ import annotations

import base64
import html
import logging
import math
import re
import struct
import xml.etree.ElementTree as ET
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Sequence

import numpy as np
import pandas as pd

from ..errors import InputError
from ..util.files import write_text

logger = logging.getLogger(__name__)

#: Most rows of one table written into the report (the CSV/JSON files hold all of them).
MAX_TABLE_ROWS = 2000

#: Policy that forbids loading anything from outside the file.
CONTENT_SECURITY_POLICY = ("default-src 'none'; img-src data:; style-src 'unsafe-inline'; "
                           "script-src 'unsafe-inline'")

@dataclass
class ReportSection:
    """One section of the HTML report.

    Attributes
    ----------
    title : str
        Heading.
    text : str
        Plain words. Blank lines separate paragraphs, a single line break is kept as one;
        lines starting with "- " become a list.
    table : DataFrame or None
        A table shown below the text (sortable by clicking a column header).
    figure_paths : sequence of Path
        Figures to embed: ``.svg`` or ``.png`` files, or a path stem, for which ``.svg`` is
        preferred and ``.png`` used otherwise.
    figure_captions : sequence of str
        Caption per figure (same order; missing captions are left empty).
    table_caption : str
        Caption of the table.
    more_tables : sequence of (str, DataFrame)
        Further tables with their captions, shown after ``table``.
    """

    title: str
    text: str = ""
    table: pd.DataFrame | None = None
    figure_paths: Sequence[str | Path] = ()
    figure_captions: Sequence[str] = ()
    table_caption: str = ""
    more_tables: Sequence[tuple[str, pd.DataFrame]] = ()

    @property
    def anchor(self) -> str:
        """Id of the section in the page, derived from the title."""
        slug = re.sub(r"[^a-z0-9]+", "-", self.title.lower()).strip("-")
        return "sec-" + (slug or "section")


@dataclass
class EmbeddedFigure:
    """A figure ready for the page: a data URI and its display size in CSS pixels."""

    data_uri: str
    width: int
    height: int
    source: Path


# ---------------------------------------------------------------------------------------------
# figures
# ---------------------------------------------------------------------------------------------


def _svg_size_px(data: bytes, path: Path) -> tuple[int, int]:
    try:
        root = ET.fromstring(data)
    except ET.ParseError as err:
        raise InputError(f"{path}: not a well-formed SVG ({err}); write the figure again") from err

    def to_px(value: str | None) -> float:
        if not value:
            return 0.0
        match = re.fullmatch(r"\s*([0-9.]+)\s*(pt|px|in|cm|mm)?\s*", value)
        if not match:
            return 0.0
        number, unit = float(match.group(1)), match.group(2) or "px"
        return number * {"px": 1.0, "pt": 96 / 72, "in": 96.0, "cm": 96 / 2.54,
                          "mm": 96 / 25.4}[unit]

    width, height = to_px(root.get("width")), to_px(root.get("height"))
    if (not width or not height) and root.get("viewBox"):
        parts = root.get("viewBox", "").replace(",", " ").split()
        if len(parts) == 4:
            width, height = float(parts[2]), float(parts[3])
    return int(round(width)), int(round(height))


def _png_size_px(data: bytes, path: Path) -> tuple[int, int]:
    if data[:8] != b"\x89PNG\r\n\x1a\n" or data[12:16] != b"IHDR":
        raise InputError(f"{path}: not a PNG file; write the figure again")
    width, height = struct.unpack(">II", data[16:24])
    dpi = 96.0
    offset = 8
    while offset + 8 <= len(data):  # find pHYs (pixels per metre) to show the intended size
        length, kind = struct.unpack(">I4s", data[offset:offset + 8])
        if kind == b"pHYs" and length >= 9:
            ppm_x, _, unit = struct.unpack(">IIB", data[offset + 8:offset + 17])
            if unit == 1 and ppm_x > 0:
                dpi = ppm_x * 0.0254
            break
        if kind in (b"IDAT", b"IEND"):
            break
        offset += 12 + length
    scale = 96.0 / dpi
    return int(round(width * scale)), int(round(height * scale))


def _resolve_figure(path: str | Path) -> Path:
    path = Path(path)
    if path.suffix.lower() in (".svg", ".png"):
        if not path.is_file():
            raise InputError(f"figure {path} not found; write it first (tfa.report.figures)")
        return path
    for suffix in (".svg", ".png"):
        candidate = path.with_name(path.name + suffix)
        if candidate.is_file():
            return candidate
    raise InputError(f"figure {path}: neither {path.name}.svg nor {path.name}.png exists; "
                     "write the figure first (tfa.report.figures.save_figure)")


def embed_figure(path: str | Path) -> EmbeddedFigure:
    """Read a figure file and turn it into a ``data:`` URI with its display size.

    Parameters
    ----------
    path : str or Path
        A ``.svg`` or ``.png`` file, or a stem (``.svg`` preferred).

    Returns
    -------
    EmbeddedFigure
    """
    source = _resolve_figure(path)
    data = source.read_bytes()
    if source.suffix.lower() == ".svg":
        width, height = _svg_size_px(data, source)
        mime = "image/svg+xml"
    else:
        width, height = _png_size_px(data, source)
        mime = "image/png"
    if width <= 0 or height <= 0:
        raise InputError(f"figure {source} has no size; write it again")
    uri = f"data:{mime};base64," + base64.b64encode(data).decode("ascii")
    return EmbeddedFigure(uri, width, height, source)


# ---------------------------------------------------------------------------------------------
# text and tables
# ---------------------------------------------------------------------------------------------


def _text_html(text: str) -> str:
    """Plain words to paragraphs and lists, everything escaped."""
    blocks = [b for b in re.split(r"\n\s*\n", text.strip()) if b.strip()] if text else []
    out = []
    for block in blocks:
        lines = block.splitlines()
        items: list[str] = []
        paragraph: list[str] = []

        def flush_paragraph() -> None:
            if paragraph:
                out.append("<p>" + "<br>".join(html.escape(s.strip()) for s in paragraph)
                           + "</p>")
                paragraph.clear()

        def flush_items() -> None:
            if items:
                out.append("<ul>" + "".join(f"<li>{html.escape(i)}</li>" for i in items) + "</ul>")
                items.clear()

        for line in lines:
            stripped = line.strip()
            if stripped.startswith("- "):
                flush_paragraph()
                items.append(stripped[2:].strip())
            elif items and line.startswith((" ", "\t")):
                items[-1] += " " + stripped
            else:
                flush_items()
                paragraph.append(stripped)
        flush_paragraph()
        flush_items()
    return "\n".join(out)


def format_cell(value: Any) -> tuple[str, str]:
    """Text shown for a table cell and the key it sorts by.

    Numbers are shown with five significant digits at most, trailing zeros dropped (no
    exponent between 0.001 and one million) and sort by their full value; booleans show as yes/no; missing values show
    as an en dash and sort last.

    >>> format_cell(-38.51249), format_cell(343.15), format_cell(True), format_cell(2.5e-7)
    (('-38.512', '-38.51249'), ('343.15', '343.15'), ('yes', '1'), ('2.500e-07', '2.5e-07'))
    """
    if value is None:
        return "\u2013", ""
    if isinstance(value, (bool, np.bool_)):
        return ("yes", "1") if value else ("no", "0")
    if isinstance(value, (int, np.integer)):
        return str(int(value)), str(int(value))
    if isinstance(value, (float, np.floating)):
        number = float(value)
        if math.isnan(number):
            return "\u2013", ""
        if math.isinf(number):
            return ("\u221e" if number > 0 else "\u2212\u221e"), ("1e308" if number > 0 else "-1e308")
        magnitude = abs(number)
        if number == 0:
            shown = "0"
        elif 1e-3 <= magnitude < 1e6:
            decimals = max(0, 4 - int(math.floor(math.log10(magnitude))))
            shown = f"{number:.{decimals}f}"
            if "." in shown:
                shown = shown.rstrip("0").rstrip(".")
        else:
            shown = f"{number:.3e}"
        return shown, repr(number)
    if isinstance(value, (list, tuple, set, frozenset)):
        text = "; ".join(str(v) for v in value)
        return text, text
    try:
        if pd.isna(value):
            return "\u2013", ""
    except (TypeError, ValueError):
        pass
    return str(value), str(value)


def _table_html(frame: pd.DataFrame, caption: str, table_id: str) -> str:
    total = len(frame)
    shown = frame.head(MAX_TABLE_ROWS)
    parts = [f'<div class="table-wrap"><table class="sortable" id="{html.escape(table_id)}">']
    if caption or total > MAX_TABLE_ROWS:
        text = caption
        if total > MAX_TABLE_ROWS:
            text += f" (first {MAX_TABLE_ROWS} of {total} rows; the CSV and JSON files hold all)"
        parts.append(f"<caption>{html.escape(text.strip())}</caption>")
    parts.append("<thead><tr>")
    for column in shown.columns:
        parts.append(f'<th scope="col" tabindex="0" aria-sort="none">{html.escape(str(column))}'
                     '<span class="arrow" aria-hidden="true"></span></th>')
    parts.append("</tr></thead><tbody>")
    for row in shown.itertuples(index=False, name=None):
        parts.append("<tr>")
        for value in row:
            text, key = format_cell(value)
            numeric = ' class="num"' if _is_number(value) else ""
            parts.append(f'<td{numeric} data-value="{html.escape(key)}">{html.escape(text)}</td>')
        parts.append("</tr>")
    parts.append("</tbody></table></div>")
    return "".join(parts)


def _is_number(value: Any) -> bool:
    return isinstance(value, (int, float, np.integer, np.floating)) and not isinstance(
        value, (bool, np.bool_))


_CSS = """
:root { --ink: #1b1b1b; --muted: #5a5a5a; --rule: #d8d8d8; --accent: #0072B2;
        --band: #f4f6f8; --warn: #D55E00; }
* { box-sizing: border-box; }
body { font-family: "DejaVu Sans", "Helvetica Neue", Arial, sans-serif; color: var(--ink);
       margin: 0; line-height: 1.45; font-size: 15px; background: #fff; }
header { background: var(--band); border-bottom: 1px solid var(--rule); padding: 18px 28px; }
header h1 { margin: 0 0 4px 0; font-size: 24px; }
header p { margin: 0; color: var(--muted); }
main { max-width: 980px; margin: 0 auto; padding: 8px 28px 40px 28px; }
nav.toc { border: 1px solid var(--rule); padding: 8px 16px; margin: 18px 0; }
nav.toc ol { margin: 4px 0; padding-left: 22px; columns: 2; }
nav.toc a { color: var(--accent); text-decoration: none; }
section { border-top: 1px solid var(--rule); padding-top: 6px; margin-top: 22px; }
h2 { font-size: 20px; margin: 10px 0; }
figure { margin: 14px 0; }
figure img { max-width: 100%; height: auto; display: block; border: 1px solid var(--rule); }
figcaption { color: var(--muted); font-size: 13px; margin-top: 4px; }
.table-wrap { max-height: 560px; overflow: auto; border: 1px solid var(--rule); margin: 10px 0; }
table.sortable { border-collapse: collapse; width: 100%; font-size: 13px; }
table.sortable caption { text-align: left; color: var(--muted); padding: 6px 8px;
                         caption-side: top; }
table.sortable th { position: sticky; top: 0; background: var(--band); cursor: pointer;
                    text-align: left; padding: 5px 8px; border-bottom: 2px solid var(--rule);
                    white-space: nowrap; user-select: none; }
table.sortable th:focus { outline: 2px solid var(--accent); }
table.sortable td { padding: 3px 8px; border-bottom: 1px solid #eee; vertical-align: top; }
table.sortable td.num { text-align: right; font-variant-numeric: tabular-nums;
                        white-space: nowrap; }
table.sortable tbody tr:nth-child(even) { background: #fafafa; }
th[aria-sort="ascending"] .arrow::after { content: " \\25B2"; }
th[aria-sort="descending"] .arrow::after { content: " \\25BC"; }
section#sec-cautions { border: 2px solid var(--warn); padding: 6px 16px; }
footer { color: var(--muted); font-size: 12px; max-width: 980px; margin: 0 auto;
         padding: 0 28px 30px 28px; }
@media print { .table-wrap { max-height: none; overflow: visible; } nav.toc { display: none; } }
"""

_SORT_SCRIPT = """
(function () {
  "use strict";
  function sortKey(cell) {
    var raw = cell.getAttribute("data-value");
    if (raw === null) { raw = cell.textContent; }
    if (raw === "") { return { empty: true, num: false, value: "" }; }
    var number = Number(raw);
    if (!isNaN(number)) { return { empty: false, num: true, value: number }; }
    return { empty: false, num: false, value: raw };
  }
  function compare(a, b) {
    if (a.empty || b.empty) { return (a.empty ? 1 : 0) - (b.empty ? 1 : 0); }
    if (a.num && b.num) { return a.value - b.value; }
    if (a.num !== b.num) { return a.num ? -1 : 1; }
    return a.value.localeCompare(b.value, undefined, { numeric: true, sensitivity: "base" });
  }
  function sortTable(table, column, header) {
    var ascending = header.getAttribute("aria-sort") !== "ascending";
    var headers = table.tHead.rows[0].cells;
    for (var h = 0; h < headers.length; h++) { headers[h].setAttribute("aria-sort", "none"); }
    header.setAttribute("aria-sort", ascending ? "ascending" : "descending");
    var body = table.tBodies[0];
    var rows = Array.prototype.slice.call(body.rows);
    var keyed = rows.map(function (row, index) {
      return { row: row, index: index, key: sortKey(row.cells[column]) };
    });
    keyed.sort(function (x, y) {
      var order;
      if (x.key.empty || y.key.empty) { order = compare(x.key, y.key); }
      else { order = ascending ? compare(x.key, y.key) : compare(y.key, x.key); }
      return order !== 0 ? order : x.index - y.index;
    });
    var fragment = document.createDocumentFragment();
    keyed.forEach(function (item) { fragment.appendChild(item.row); });
    body.appendChild(fragment);
  }
  function attach(table) {
    if (!table.tHead || !table.tBodies.length) { return; }
    var headers = table.tHead.rows[0].cells;
    Array.prototype.forEach.call(headers, function (header, column) {
      header.addEventListener("click", function () { sortTable(table, column, header); });
      header.addEventListener("keydown", function (event) {
        if (event.key === "Enter" || event.key === " ") {
          event.preventDefault();
          sortTable(table, column, header);
        }
      });
    });
  }
  document.addEventListener("DOMContentLoaded", function () {
    Array.prototype.forEach.call(document.querySelectorAll("table.sortable"), attach);
  });
})();
"""


def _section_html(section: ReportSection, number: int) -> str:
    parts = [f'<section id="{html.escape(section.anchor)}">',
             f"<h2>{number}. {html.escape(section.title)}</h2>"]
    if section.text:
        parts.append(_text_html(section.text))
    captions = list(section.figure_captions)
    for k, figure_path in enumerate(section.figure_paths):
        embedded = embed_figure(figure_path)
        caption = captions[k] if k < len(captions) else ""
        alt = caption or f"{section.title}, figure {k + 1}"
        parts.append(
            f'<figure><img class="figure" src="{embedded.data_uri}" '
            f'width="{embedded.width}" height="{embedded.height}" alt="{html.escape(alt)}">'
            f"<figcaption>Figure {number}.{k + 1}. {html.escape(caption)} "
            f"(file: {html.escape(embedded.source.stem)}.png / .svg)</figcaption></figure>")
    tables = []
    if section.table is not None:
        tables.append((section.table, section.table_caption))
    tables.extend((frame, caption) for caption, frame in section.more_tables)
    for t, (frame, caption) in enumerate(tables):
        if not isinstance(frame, pd.DataFrame):
            raise InputError(f"section {section.title!r}: table must be a pandas DataFrame, "
                             f"got {type(frame).__name__}")
        parts.append(_table_html(frame, caption, f"{section.anchor}-table-{t + 1}"))
    parts.append("</section>")
    return "\n".join(parts)


def build_report(sections: Sequence[ReportSection], path: str | Path,
                 title: str = "Network assessment", subtitle: str = "",
                 add_standard_sections: bool = True) -> Path:
    """Write one self-contained HTML report.

    Parameters
    ----------
    sections : sequence of ReportSection
        The sections, in order.
    path : str or Path
        The HTML file to write (atomically).
    title, subtitle : str
        Heading of the page and the line below it (e.g. network and environment).
    add_standard_sections : bool
        Append the conventions and the cautions (:mod:`tfa.report.sections`) when no section of that
        title is given (the cautions are always meant to be there).

    Returns
    -------
    Path
        The file written.

    Examples
    --------
    >>> import tempfile, pathlib
    >>> out = pathlib.Path(tempfile.mkdtemp()) / "r.html"
    >>> page = build_report([ReportSection("Summary", "runs <without> ATP: no")], out).read_text()
    >>> "runs &lt;without&gt; ATP: no" in page, "http://" in page, "Cautions" in page
    (True, False, True)
    """
    sections = list(sections)
    for section in sections:
        if not isinstance(section, ReportSection):
            raise InputError(f"build_report: expected ReportSection items, got "
                             f"{type(section).__name__}")
    if add_standard_sections:
        from .sections import cautions_section, conventions_section

        titles = {s.title for s in sections}
        if "Conventions and their limits" not in titles:
            sections.append(conventions_section())
        if "Cautions" not in titles:
            sections.append(cautions_section())
    anchors = [s.anchor for s in sections]
    if len(set(anchors)) != len(anchors):
        raise InputError("build_report: two sections have the same title; give each its own")
    from .. import __version__

    body = [f"<header><h1>{html.escape(title)}</h1>"]
    if subtitle:
        body.append(f"<p>{html.escape(subtitle)}</p>")
    body.append("</header><main>")
    body.append('<nav class="toc" aria-label="Contents"><strong>Contents</strong><ol>')
    for section in sections:
        body.append(f'<li><a href="#{html.escape(section.anchor)}">'
                    f"{html.escape(section.title)}</a></li>")
    body.append("</ol></nav>")
    for number, section in enumerate(sections, start=1):
        body.append(_section_html(section, number))
    body.append("</main>")
    body.append(f"<footer>Written by tfa {html.escape(str(__version__))}. Tables: click a column "
                "header to sort (click again to reverse). This file is self-contained: it loads "
                "nothing from elsewhere.</footer>")
    page = "\n".join([
        "<!DOCTYPE html>",
        '<html lang="en">',
        "<head>",
        '<meta charset="utf-8">',
        f'<meta http-equiv="Content-Security-Policy" content="{CONTENT_SECURITY_POLICY}">',
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        f"<title>{html.escape(title)}</title>",
        f"<style>{_CSS}</style>",
        f"<script>{_SORT_SCRIPT}</script>",
        "</head>",
        "<body>",
        *body,
        "</body>",
        "</html>",
        "",
    ])
    written = write_text(path, page)
    logger.info("HTML report written: %s (%d sections)", written, len(sections))
    return written
