"""Standard normal numbers keyed by (seed, draw index, name): draw i of a name is the same
whichever other names are drawn, in whichever process or order.

Draw i takes its seed sequence from ``numpy.random.SeedSequence(seed)`` with spawn key
(i, h(name)), h a stable 63-bit hash of the name (SHA-256), so a run can be extended, split over
workers or resumed and draw k stays the same draw (O'Neill 2015, the PCG/SeedSequence design of
independent streams; numpy documentation, "Parallel random number generation").
"""

from __future__ import annotations

import hashlib
from typing import Sequence

import numpy as np

from ..errors import InputError


def _name_key(name: str) -> int:
    """A stable 63-bit number for a name (the same in every process and on every machine)."""
    return int.from_bytes(hashlib.sha256(name.encode("utf-8")).digest()[:8], "big") >> 1


def keyed_normals(seed: int, index: int, names: Sequence[str]) -> np.ndarray:
    """One standard normal number per name for draw ``index`` of the run seeded ``seed``.

    The number of a name does not depend on the other names asked for:

    >>> a = keyed_normals(3, 0, ["H2", "CO2tot", "formate"])
    >>> b = keyed_normals(3, 0, ["formate", "H2"])
    >>> bool(a[2] == b[0] and a[0] == b[1])
    True
    """
    if seed is None or int(seed) < 0:
        raise InputError(f"the seed must be a whole number >= 0, got {seed!r}")
    out = np.empty(len(names))
    for k, name in enumerate(names):
        sequence = np.random.SeedSequence(int(seed), spawn_key=(int(index), _name_key(str(name))))
        out[k] = np.random.default_rng(sequence).standard_normal()
    return out


