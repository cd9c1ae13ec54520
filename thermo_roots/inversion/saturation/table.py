"""The corresponding-states table: start values of the fast path, one table per cubic family.

A two-parameter cubic's reduced saturation pressure and saturated volumes depend on
Tr/alpha alone (see :func:`_start_tables`), so one table, solved once by the window solver,
serves every fluid and alpha function of a family. The table gives starts only: its
accuracy decides the fast path's speed, never its answer.
"""

from __future__ import annotations

import functools

import numpy as np

from ...errors import ThermoRootsError
from ...models import R
from .window import _window_saturation

#: The corresponding-states table: nodes uniform in x = sqrt(1/s - _X_SHIFT), s from
#: _S_RANGE[1] down to _S_RANGE[0], where s = Tr / alpha(T) (see _start_tables).
_X_SHIFT, _S_RANGE, _TABLE_NODES = 0.99, (0.04, 0.995), 1024

def _start_values(Tr, alpha, start, table, volumes):
    """ln(Psat/Pc), v_L/b and Z_V [-] from the tables by four-point Lagrange interpolation,
    NaN outside them. The compiled twin is :func:`thermo_roots._accel_kernels.start_values`.
    """
    x_first, inv_h, shift = start
    n = table.size
    with np.errstate(invalid="ignore"):
        t = (np.sqrt(alpha / Tr - shift) - x_first) * inv_h
        inside = (t >= 0.0) & (t <= n - 1.0)
        j = np.clip(np.where(inside, t, 0.0).astype(np.int64) - 1, 0, n - 4)
    u = t - j
    w = (-(u - 1.0) * (u - 2.0) * (u - 3.0) * _SIXTH, u * (u - 2.0) * (u - 3.0) * 0.5,
         -u * (u - 1.0) * (u - 3.0) * 0.5, u * (u - 1.0) * (u - 2.0) * _SIXTH)
    ln_pr = w[0] * table[j] + w[1] * table[j + 1] + w[2] * table[j + 2] + w[3] * table[j + 3] + np.log(alpha)
    rl = w[0] * volumes[j, 0] + w[1] * volumes[j + 1, 0] + w[2] * volumes[j + 2, 0] + w[3] * volumes[j + 3, 0]
    zv = w[0] * volumes[j, 1] + w[1] * volumes[j + 1, 1] + w[2] * volumes[j + 2, 1] + w[3] * volumes[j + 3, 1]
    return tuple(np.where(inside, value, np.nan) for value in (ln_pr, rl, zv))


def _table_nodes():
    """(first node, 1 / spacing, shift) and the nodes' s = Tr/alpha, for the table's variable."""
    x_first = np.sqrt(1.0 / _S_RANGE[1] - _X_SHIFT)
    x_last = np.sqrt(1.0 / _S_RANGE[0] - _X_SHIFT)
    x = np.linspace(x_first, x_last, _TABLE_NODES)
    h = (x_last - x_first) / (_TABLE_NODES - 1)
    return (float(x_first), float(1.0 / h), _X_SHIFT), 1.0 / (x * x + _X_SHIFT)


_SIXTH = 1.0 / 6.0
_TABLE_START, _TABLE_S = _table_nodes()


@functools.lru_cache(maxsize=16)
def _start_tables(delta1, delta2):
    """ln(Psat/Pc) and, shape (nodes, 2), v_L/b and Z_V [-] of the generalized cubic
    (delta1, delta2) with alpha = 1 at the nodes; None if they cannot be solved.

    Corresponding states of a two-parameter cubic: in Z, A = aP/(RT)^2 and B = bP/(RT)
    the saturation conditions contain T and P only through A and B, so B_sat, and with it
    Z_L, Z_V and v_L/b = Z_L/B, depend on theta = a/(bRT) alone. With a(T) = a_c alpha(T),
    theta/theta_c = alpha/Tr, and any model of the family satisfies ln(Psat/Pc) =
    ln(Psat/Pc)_(alpha = 1)(s) + ln alpha at s = Tr/alpha, with the same v_L/b and Z_V
    (untranslated) as the alpha = 1 model at s. The tables are solved once per family by
    the window solver; they give the starts of the Newton iterations only (in ln P and on
    the cubic's roots, each checked), so their accuracy decides the speed, never the
    answer. None if the window solver fails on them (the fast path is then skipped).

    References
    ----------
    Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
    Computational Aspects, 2nd ed., ch. 3 (the cubic in Z with A and B).
    """
    from ...fluids import Fluid
    from ...models import CubicFamily, CubicModel, _alpha_constant

    reduced = Fluid("reduced", 1.0, 1.0, 0.0, 1.0)
    model = CubicModel(reduced, CubicFamily("alpha = 1", delta1, delta2, _alpha_constant))
    try:
        P, v_l, v_v, result = _window_saturation(model, _TABLE_S)
    except ThermoRootsError:
        return None
    volumes = np.stack([v_l / model.b, P * v_v / (R * _TABLE_S)], axis=-1)
    if not (np.all(result.converged) and np.all(np.isfinite(P)) and np.all(np.isfinite(volumes))):
        return None
    table = np.log(P)
    for shared in (table, volumes):   # shared by every caller through the cache
        shared.setflags(write=False)
    return table, volumes

