"""Lossless matching networks (L, pi, T) between a generator and a complex load.

Pure numpy on SI values: impedances in ohm, frequencies in Hz, capacitances in F,
inductances in H. A network is a ladder of reactive elements listed from the generator to
the load, each a capacitor or an inductor, in series with the line or in shunt across it:

* L: two elements, one shunt and one series (either order);
* pi: shunt, series, shunt;
* T: series, shunt, series.

Two elements: a closed form
---------------------------
An L section matches a load Z_L to a target impedance Z_t in closed form (Pozar, *Microwave
Engineering*, 4th ed., §5.1). With the shunt element on the generator side and the series
element next to the load, the series branch Z_L + jX_b must have the target's conductance:
Re 1/(R_L + jX') = G_t, so X' = ±√(R_L/G_t − R_L²) (real only where R_L ≤ 1/G_t); the shunt
susceptance then cancels the rest, B_a = B_t + X'/(R_L² + X'²), and X_b = X' − X_L. The
mirror case (series on the generator side) is the same in admittances. For a resistive
load R_low and a resistive target R_high the section's loaded Q is Q = √(R_high/R_low − 1),
X_series = Q R_low and B_shunt = Q / R_high (the textbook result the tests check).

Three elements: one free value
------------------------------
A pi or T network has one degree of freedom. The generator-side element is swept over its
declared range (:data:`SCAN_POINTS` values, geometric spacing, both ends included); for each
value the two elements left form an L section solved in closed form against the target
that element leaves (1/(1/Z0 − jB1) for a shunt, Z0 − jX1 for a series one). The best of
the sweep is kept: a design estimate, exact at the grid values.

Reach and margin
----------------
An element's value v must lie in its declared range [low, high]; its margin is
min(v − low, high − v) / (high − low), the distance to the nearer end as a fraction of the
range (negative outside it; −inf where the solution needs the other kind of element, a
capacitor where an inductor is fitted). The network's margin at one load is the largest,
over its solutions, of the least element margin: positive means the network reaches the
load with that much travel left on its tightest element. Components are lossless here: the
matching network's own loss (a few per cent in a good box) is not modelled.

References
----------
D. M. Pozar, *Microwave Engineering*, 4th ed. (Wiley 2012), §5.1 (L-section matching,
closed forms); C. Bowick, *RF Circuit Design*, 2nd ed. (Newnes 2008), ch. 4 (L, pi and T
networks, Q = √(R_high/R_low − 1)) — from memory, checked by the tests against the match
condition itself (Z_in = Z0).
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import NamedTuple

import numpy as np
from numpy.typing import ArrayLike, NDArray

from rfcheck.physics.constants import TWO_PI
from rfcheck.physics.domain import guard_public

__all__ = [
    "SCAN_POINTS",
    "TOPOLOGIES",
    "Element",
    "Match",
    "l_section_q",
    "element_reactance",
    "input_impedance",
    "match_network",
]

#: values of the generator-side element swept for a pi or T network
SCAN_POINTS = 241
#: element connections, generator side first, per topology
TOPOLOGIES: dict[str, tuple[tuple[str, ...], ...]] = {
    "L": (("shunt", "series"), ("series", "shunt")),
    "pi": (("shunt", "series", "shunt"),),
    "T": (("series", "shunt", "series"),),
}


class Element(NamedTuple):
    """One reactive element: kind "capacitor" (F) or "inductor" (H), connection "series" or
    "shunt", and its declared range of values [low, high]."""

    kind: str
    connection: str
    low: float
    high: float


class Match(NamedTuple):
    """Best solution at each load: element values (F or H, first axis the elements), the
    least element margin (fraction of the range; −inf where no solution has the right kinds)
    and the index of the element with that least margin."""

    values: NDArray
    margin: NDArray
    tightest: NDArray


def l_section_q(r_high: ArrayLike, r_low: ArrayLike) -> NDArray:
    """Loaded Q of an L section between two resistances: Q = √(R_high/R_low − 1).

    Pozar §5.1; Bowick ch. 4. NaN where R_high < R_low.
    """
    return np.sqrt(np.asarray(r_high, dtype=float) / np.asarray(r_low, dtype=float) - 1.0)


def element_reactance(kind: str, value: ArrayLike, f: ArrayLike) -> NDArray:
    """Reactance of a capacitor (−1/(ωC)) or an inductor (ωL), ohm."""
    omega = TWO_PI * np.asarray(f, dtype=float)
    v = np.asarray(value, dtype=float)
    if kind == "capacitor":
        return -1.0 / (omega * v)
    if kind == "inductor":
        return omega * v
    raise ValueError(f"element kind must be 'capacitor' or 'inductor', not {kind!r}")


def input_impedance(elements: Sequence[Element], values: ArrayLike, z_load: ArrayLike,
                    f: ArrayLike) -> NDArray:
    """Impedance looking into the ladder from the generator, with element values `values`
    (first axis the elements, generator side first) ahead of the load, ohm."""
    z = np.asarray(z_load, dtype=complex)
    vals = np.asarray(values, dtype=float)
    for el, v in zip(reversed(elements), vals[::-1]):
        x = element_reactance(el.kind, v, f)
        z = z + 1j * x if el.connection == "series" else 1.0 / (1.0 / z + 1.0 / (1j * x))
    return z


def _value(kind: str, connection: str, x_or_b: NDArray, omega: NDArray) -> NDArray:
    """Element value from its reactance (series) or susceptance (shunt); NaN for the wrong
    sign (the other kind of element would be needed)."""
    if connection == "series":  # x: reactance
        v = -1.0 / (omega * x_or_b) if kind == "capacitor" else x_or_b / omega
    else:  # b: susceptance
        v = x_or_b / omega if kind == "capacitor" else -1.0 / (omega * x_or_b)
    return np.where(v > 0, v, np.nan)


def _l_solutions(first: Element, second: Element, z_load: NDArray, z_target: NDArray,
                 omega: NDArray) -> tuple[NDArray, NDArray]:
    """The two closed-form L-section solutions (axis 0: the ± roots): element values of the
    generator-side and the load-side element matching z_load to z_target."""
    sign = np.array([1.0, -1.0]).reshape((2,) + (1,) * np.ndim(z_load))
    if first.connection == "shunt":  # shunt, then series next to the load
        r_l, x_l = z_load.real, z_load.imag
        y_t = 1.0 / z_target
        xp = sign * np.sqrt(r_l / y_t.real - r_l**2)
        b_a = y_t.imag + xp / (r_l**2 + xp**2)
        x_b = xp - x_l
        return _value(first.kind, "shunt", b_a, omega), _value(second.kind, "series", x_b, omega)
    y_l = 1.0 / z_load  # series, then shunt across the load
    g_l, b_l = y_l.real, y_l.imag
    bp = sign * np.sqrt(g_l / z_target.real - g_l**2)
    x_a = z_target.imag + bp / (g_l**2 + bp**2)
    b_b = bp - b_l
    return _value(first.kind, "series", x_a, omega), _value(second.kind, "shunt", b_b, omega)


def _margin(el: Element, v: NDArray) -> NDArray:
    m = np.minimum(v - el.low, el.high - v) / (el.high - el.low)
    return np.where(np.isnan(m), -np.inf, m)


def match_network(elements: Sequence[Element], z_load: ArrayLike, f: ArrayLike,
                  z0: float = 50.0) -> Match:
    """Element values that match `z_load` to the generator's `z0`, and their margin.

    Parameters
    ----------
    elements : sequence of Element
        The ladder, generator side first: two (L) or three (pi, T) elements whose
        connections follow :data:`TOPOLOGIES`; every range with 0 < low < high.
    z_load : array_like, complex
        Load impedance seen at the network's output (the coil), ohm; any shape.
    f : array_like
        Frequency, Hz; broadcast with z_load.
    z0 : float
        The generator's (and line's) real impedance, ohm.

    Returns
    -------
    Match
        values of shape (len(elements),) + the broadcast shape, margin and tightest of the
        broadcast shape (see the module docstring).
    """
    conns = tuple(e.connection for e in elements)
    if not any(conns in t for t in TOPOLOGIES.values()):
        raise ValueError(f"no L, pi or T network has the connections {conns}")
    if not all(0 < e.low < e.high for e in elements):
        raise ValueError("match_network needs 0 < low < high for every element")
    if not z0 > 0:
        raise ValueError("match_network needs a positive generator impedance")
    z, fa = np.broadcast_arrays(np.asarray(z_load, dtype=complex), np.asarray(f, dtype=float))
    omega = TWO_PI * fa
    if len(elements) == 2:
        a, b = _l_solutions(elements[0], elements[1], z, np.full(z.shape, z0 + 0j), omega)
        cand = np.stack([a, b], axis=1)  # (2 roots, 2 elements, *shape)
    else:
        e1 = elements[0]
        v1 = np.geomspace(e1.low, e1.high, SCAN_POINTS).reshape((-1,) + (1,) * z.ndim)
        x1 = element_reactance(e1.kind, v1, fa)
        target = (1.0 / (1.0 / z0 - 1.0 / (1j * x1)) if e1.connection == "shunt"
                  else z0 - 1j * x1)
        zz = np.broadcast_to(z, target.shape)
        a, b = _l_solutions(elements[1], elements[2], zz, target, np.broadcast_to(omega,
                                                                                 target.shape))
        v1b = np.broadcast_to(v1, a.shape)
        cand = np.stack([v1b, a, b], axis=2).reshape((-1, 3) + z.shape)  # (roots × scan, 3, …)
    margins = np.stack([_margin(el, cand[:, i]) for i, el in enumerate(elements)], axis=1)
    least = margins.min(axis=1)  # (candidates, *shape)
    best = np.argmax(least, axis=0)
    pick = np.take_along_axis(cand, best[None, None], axis=0)[0]
    m = np.take_along_axis(least, best[None], axis=0)[0]
    tight = np.argmin(np.take_along_axis(margins, best[None, None], axis=0)[0], axis=0)
    return Match(pick, m, tight)


guard_public(globals())  # odd input: no NumPy warnings (physics/domain.py)
