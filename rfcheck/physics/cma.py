"""The electron-only CMA diagram: which region an (X, Y) point lies in and which waves propagate.

References: T.H. Stix, *Waves in Plasmas* (AIP 1992), ch. 2 (the CMA diagram, drawn there
in X = w_pe^2/w^2 and Y^2 = w_ce^2/w^2 with ions; its electron-only bounds are those below);
D.G. Swanson, *Plasma Waves*, 2nd ed. (IOP 2003), ch. 2 (the same diagram and bounds, from
memory).
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np
from numpy.typing import ArrayLike, NDArray
from rfcheck.physics.domain import guard_public

__all__ = ["CmaRegion", "CMA_REGIONS", "cma_region"]


def _scalar(a: NDArray) -> NDArray:
    """0-d arrays come back as numpy scalars."""
    return a[()] if isinstance(a, np.ndarray) and a.ndim == 0 else a


class CmaRegion(NamedTuple):
    """CMA-diagram region of an (X, Y) point and which waves propagate there (n^2 > 0).

    ``r``, ``l``: R and L waves along B0 (theta = 0); ``o``, ``x``: O and X modes across B0
    (theta = pi/2). ``region`` numbers are those of :data:`CMA_REGIONS`.
    """

    region: NDArray
    r: NDArray
    l: NDArray
    o: NDArray
    x: NDArray


#: rfcheck's own numbering of the electron-only CMA regions (ions neglected), with their
#: bounds and the waves that propagate in each.
CMA_REGIONS: dict[int, str] = {
    1: "Y < 1, X < 1 - Y (below the R cutoff): R, L, O, X propagate",
    2: "Y < 1, 1 - Y <= X < 1 - Y^2 (R cutoff to upper hybrid): L, O propagate",
    3: "Y < 1, 1 - Y^2 <= X < 1 (upper hybrid to O cutoff): L, O, X propagate",
    4: "Y < 1, 1 <= X < 1 + Y (O cutoff to L cutoff): L, X propagate",
    5: "Y < 1, X >= 1 + Y (beyond the L cutoff): nothing propagates",
    6: "Y >= 1, X < 1 (above ECR, below the O cutoff): R (whistler), L, O, X propagate",
    7: "Y >= 1, 1 <= X < 1 + Y: R (whistler), L, X propagate",
    8: "Y >= 1, X >= 1 + Y: only R (whistler) propagates",
}

# Index = region number. From the signs of R = 1 - X/(1-Y), L = 1 - X/(1+Y), P = 1 - X,
# S = 1 - X/(1-Y^2) in each region: R > 0, L > 0, P > 0 and RL/S > 0.
_CMA_PROPAGATION = (
    np.array([False, True, False, False, False, False, True, True, True]),  # R
    np.array([False, True, True, True, True, False, True, True, False]),  # L
    np.array([False, True, True, True, False, False, True, False, False]),  # O
    np.array([False, True, False, True, True, False, True, True, False]),  # X
)


def cma_region(x: ArrayLike, y: ArrayLike) -> CmaRegion:
    """Electron-only CMA region of (X, Y) and the waves that propagate there.

    X = w_pe^2 / w^2, Y = w_ce / w (|Y| is used). Boundaries: O cutoff X = 1 (P = 0),
    R cutoff X = 1 - Y (R = 0), L cutoff X = 1 + Y (L = 0), upper hybrid X = 1 - Y^2 (S = 0),
    electron cyclotron resonance Y = 1. A point on a boundary belongs to the region of larger
    X (larger Y at Y = 1), so a point on a cutoff counts as not propagating (n^2 = 0).

    Parameters
    ----------
    x, y : array_like
        Normalised density and field.

    Returns
    -------
    CmaRegion
        Region number (see :data:`CMA_REGIONS`) and the booleans r, l, o, x.

    References
    ----------
    Stix (1992), ch. 2 (CMA diagram); Swanson (2003), ch. 2 (from memory). Both write the
    cutoffs P = 0, R = 0, L = 0 and the resonances S = 0 (90 deg), R -> inf (Y = 1) in these
    variables; the sign of Y (electron charge) does not enter the electron-only bounds.
    """
    x = np.asarray(x, dtype=float)
    y = np.abs(np.asarray(y, dtype=float))
    bounds = [x < 1.0 - y, x < (1.0 - y) * (1.0 + y), x < 1.0, x < 1.0 + y]
    below = np.select(bounds, [1, 2, 3, 4], default=5)
    upper = np.select([x < 1.0, x < 1.0 + y], [6, 7], default=8)
    region = np.where(y >= 1.0, upper, below)
    return CmaRegion(_scalar(region), *(_scalar(table[region]) for table in _CMA_PROPAGATION))


guard_public(globals())  # odd input: no NumPy warnings (physics/domain.py)
