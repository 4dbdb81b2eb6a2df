#!/usr/bin/env python
"""Regenerate the table of ``tfa/water.py``: the saturation (boiling) pressure of water from
0.01 to 300 degC.

Development-time script. The pressures come from the water model of the species data (OBIGT's
default, SUPCRT92: Haar, Gallagher and Kell 1984, through ``pychnosz.water("Psat")``), every
5 degC from the triple point (0.01 degC) to 300 degC, the highest temperature ``tfa`` accepts.
The runtime package reads only the table written here; it never imports pychnosz.

Run: ``.venv/bin/python scripts/make_water_saturation.py`` (rewrites the rows of
``SATURATION`` in ``tfa/water.py``; the functions there are left as they are).
"""

from __future__ import annotations

import contextlib
import io
import warnings
from pathlib import Path

import numpy as np

OUT = Path(__file__).resolve().parents[1] / "tfa" / "water.py"
#: The table's first line in tfa/water.py; the rows up to the closing parenthesis are rewritten.
OPENING = "SATURATION = (\n"


def main() -> None:
    import pychnosz

    temperatures = [0.01] + list(np.arange(5.0, 300.001, 5.0))
    with contextlib.redirect_stdout(io.StringIO()), warnings.catch_warnings():
        warnings.simplefilter("ignore")
        pressures = pychnosz.water("Psat", T=np.array(temperatures) + 273.15, Psat_floor=None,
                                   messages=False)
    rows = "".join(f"    ({t:g}, {float(p):.6g}),\n" for t, p in zip(temperatures, pressures))
    text = OUT.read_text(encoding="utf-8")
    start = text.index(OPENING) + len(OPENING)
    end = text.index(")\n", start)
    OUT.write_text(text[:start] + rows + text[end:], encoding="utf-8")
    print(f"wrote the table of {OUT} ({len(temperatures)} rows)")


if __name__ == "__main__":
    main()
