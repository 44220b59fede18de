"""NACA 4- and 5-digit sections from the published formulas.

Sources: NACA Report 460 (4-digit, perpendicular construction); NACA Reports 537 and 610
and Abbott & von Doenhoff, *Theory of Wing Sections* §6.4-6.6 (5-digit mean lines and
their constants); NASA TM X-3284 (reflexed 5-digit mean lines, constants k1 and k2/k1).
"""

from __future__ import annotations

import re

import numpy as np

from ..errors import SpecError
from .base import Section

#: Thickness coefficients a0..a4 of y_t = 5t(a0 sqrt x + a1 x + a2 x^2 + a3 x^3 + a4 x^4).
THICKNESS_OPEN = (0.2969, -0.1260, -0.3516, 0.2843, -0.1015)
#: The closed-trailing-edge variant changes only the last coefficient.
THICKNESS_CLOSED = (0.2969, -0.1260, -0.3516, 0.2843, -0.1036)

#: Standard 5-digit mean lines (design CL 0.3): third digit P -> (m, k1).
#: Abbott & von Doenhoff §6.6 table; do not re-derive.
FIVE_DIGIT_STANDARD = {1: (0.0580, 361.4), 2: (0.1260, 51.64), 3: (0.2025, 15.957),
                       4: (0.2900, 6.643), 5: (0.3910, 3.230)}
#: Reflexed lines 221-251: P -> (m, k1, k2/k1). NASA TM X-3284.
FIVE_DIGIT_REFLEXED = {2: (0.1300, 51.99, 0.000764), 3: (0.2170, 15.793, 0.00677),
                       4: (0.3180, 6.520, 0.0303), 5: (0.4410, 3.191, 0.1355)}


def thickness(x, t: float, closed_te: bool = False) -> np.ndarray:
    """Half-thickness y_t(x) of the 4-digit thickness form, chord fractions (Report 460)."""
    a0, a1, a2, a3, a4 = THICKNESS_CLOSED if closed_te else THICKNESS_OPEN
    x = np.clip(np.asarray(x, float), 0.0, 1.0)
    return 5.0 * t * (a0 * np.sqrt(x) + a1 * x + a2 * x**2 + a3 * x**3 + a4 * x**4)


def camber_4digit(x, m: float, p: float) -> tuple[np.ndarray, np.ndarray]:
    """4-digit mean line y_c(x) and its slope dy_c/dx (Report 460)."""
    x = np.asarray(x, float)
    if m == 0.0:
        return np.zeros_like(x), np.zeros_like(x)
    fore = x < p
    yc = np.where(fore, m / p**2 * (2 * p * x - x**2), m / (1 - p) ** 2 * ((1 - 2 * p) + 2 * p * x - x**2))
    dy = np.where(fore, 2 * m / p**2 * (p - x), 2 * m / (1 - p) ** 2 * (p - x))
    return yc, dy


def camber_5digit(x, design_cl_digit: int, pos_digit: int, reflexed: bool) -> tuple[np.ndarray, np.ndarray]:
    """5-digit mean line y_c(x) and slope, from the tabulated m, k1 (and k2/k1).

    k1 scales linearly with the design lift coefficient (digit L gives CL = 0.15 L;
    the table is for CL = 0.3).
    """
    x = np.asarray(x, float)
    scale = 0.15 * design_cl_digit / 0.3
    if not reflexed:
        m, k1 = FIVE_DIGIT_STANDARD[pos_digit]
        k1 *= scale
        fore = x < m
        yc = np.where(fore, k1 / 6 * (x**3 - 3 * m * x**2 + m**2 * (3 - m) * x), k1 * m**3 / 6 * (1 - x))
        dy = np.where(fore, k1 / 6 * (3 * x**2 - 6 * m * x + m**2 * (3 - m)), -k1 * m**3 / 6)
        return yc, dy
    m, k1, r = FIVE_DIGIT_REFLEXED[pos_digit]
    k1 *= scale
    fore = x < m
    c = (1 - m) ** 3
    yc = np.where(fore, k1 / 6 * ((x - m) ** 3 - r * c * x - m**3 * x + m**3),
                  k1 / 6 * (r * (x - m) ** 3 - r * c * x - m**3 * x + m**3))
    dy = np.where(fore, k1 / 6 * (3 * (x - m) ** 2 - r * c - m**3),
                  k1 / 6 * (3 * r * (x - m) ** 2 - r * c - m**3))
    return yc, dy


def _perpendicular(camber, t: float, closed_te: bool):
    """Upper/lower curves laid perpendicular to the mean line (Report 460 construction)."""

    def up(s):
        yc, dy = camber(s)
        yt = thickness(s, t, closed_te)
        th = np.arctan(dy)
        return s - yt * np.sin(th), yc + yt * np.cos(th)

    def lo(s):
        yc, dy = camber(s)
        yt = thickness(s, t, closed_te)
        th = np.arctan(dy)
        return s + yt * np.sin(th), yc - yt * np.cos(th)

    return up, lo


_DESIGNATION = re.compile(r"^\s*(?:NACA)?\s*-?\s*(\d+)\s*$", re.IGNORECASE)


def parse_designation(text: str) -> tuple[str, dict]:
    """Validate a NACA designation; return (kind, parameters) or raise ValueError.

    >>> parse_designation("2412")
    ('4', {'m': 0.02, 'p': 0.4, 't': 0.12})
    """
    mt = _DESIGNATION.match(str(text))
    if not mt:
        raise ValueError(f"'{text}' is not a NACA designation (4 or 5 digits, e.g. '2412', '23012')")
    d = mt.group(1)
    if len(d) == 4:
        m, p, t = int(d[0]) / 100, int(d[1]) / 10, int(d[2:]) / 100
        if t <= 0:
            raise ValueError(f"NACA {d}: thickness digits must be 01-99, got '{d[2:]}'")
        if (m == 0) != (p == 0):
            raise ValueError(f"NACA {d}: camber and its position must both be zero or both non-zero")
        return "4", {"m": m, "p": p, "t": t}
    if len(d) == 5:
        L, P, Q, t = int(d[0]), int(d[1]), int(d[2]), int(d[3:]) / 100
        if t <= 0:
            raise ValueError(f"NACA {d}: thickness digits must be 01-99, got '{d[3:]}'")
        if L == 0:
            raise ValueError(f"NACA {d}: first digit (design lift, 0.15 per unit) must be 1-9")
        if Q not in (0, 1):
            raise ValueError(f"NACA {d}: third digit must be 0 (standard) or 1 (reflexed), got {Q}")
        table = FIVE_DIGIT_REFLEXED if Q else FIVE_DIGIT_STANDARD
        if P not in table:
            allowed = ", ".join(f"{P_}" for P_ in sorted(table))
            raise ValueError(f"NACA {d}: second digit (camber position) must be one of {allowed}"
                             f" for {'reflexed' if Q else 'standard'} mean lines, got {P}")
        return "5", {"L": L, "P": P, "reflexed": bool(Q), "t": t}
    raise ValueError(f"'{text}': NACA designations here have 4 or 5 digits, got {len(d)}")


def naca(designation: str, closed_te: bool = False) -> Section:
    """Section of a NACA 4- or 5-digit designation.

    Parameters
    ----------
    designation : str
        ``"2412"``, ``"NACA 0012"``, ``"23012"``, ``"23112"`` (reflexed).
    closed_te : bool
        Use the closed trailing-edge thickness coefficient (-0.1036).
    """
    try:
        kind, prm = parse_designation(designation)
    except ValueError as exc:
        raise SpecError(str(exc)) from None
    m = _DESIGNATION.match(str(designation))
    assert m is not None  # parse_designation accepted it
    digits = m.group(1)
    if kind == "4":
        m, p = prm["m"], prm["p"]
        up, lo = _perpendicular(lambda x: camber_4digit(x, m, p), prm["t"], closed_te)
    else:
        L, P, rf = prm["L"], prm["P"], prm["reflexed"]
        up, lo = _perpendicular(lambda x: camber_5digit(x, L, P, rf), prm["t"], closed_te)
    return Section(up, lo, f"NACA {digits}")
