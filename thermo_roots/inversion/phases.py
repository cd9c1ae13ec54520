"""The one place for phases and root kinds: their words, their int8 codes, and which root is which.

Phase words: "liquid", "vapor", "supercritical" (T >= Tc and P >= Pc), "two-phase"; above Tc
but below Pc a state is "vapor"; "not solved" for an element whose reason is in
``State.reason``. Root kinds: "liquid-like", "vapor-like", "unstable" (dP/dv > 0). The (T, P)
path keeps phases as int8 codes (indices into :data:`PHASES`) and turns them into words only
when a person reads them.

References
----------
Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
Computational Aspects, 2nd ed., ch. 3 (root selection by Gibbs energy).
"""

from __future__ import annotations

import numpy as np


#: Integer phase codes, as indices into PHASES.
LIQUID, VAPOR, SUPERCRITICAL, TWO_PHASE = 0, 1, 2, 3
#: Root kinds, as labelled on every root.
LIQUID_LIKE, VAPOR_LIKE, UNSTABLE = "liquid-like", "vapor-like", "unstable"
#: Phases a state can have.
PHASES = ("liquid", "vapor", "supercritical", "two-phase")
#: The phase of an element that could not be solved (its reason is in State.reason).
NOT_SOLVED = "not solved"


def phase_text(phase, quality) -> str:
    """The phase as a person reads it: a two-phase state on an end of the dome (quality
    exactly 0 or 1) is the saturated liquid or vapor (common practice of property tables)."""
    phase = str(phase)
    if phase == "two-phase" and quality in (0.0, 1.0):
        return f"saturated {'liquid' if quality == 0.0 else 'vapor'}"
    return phase
#: The phases as an object array, indexed by the integer codes above (and
#: one more code for an element not solved).
_PHASE_OBJECTS = np.array(PHASES + (NOT_SOLVED,), dtype=object)
_NOT_SOLVED_CODE = np.int8(len(PHASES))


class _PhaseCodes:
    """Phases held as int8 codes (indices into PHASES) until someone reads them."""

    __slots__ = ("codes",)

    def __init__(self, codes):
        self.codes = codes


class _Phase:
    """The descriptor behind State.phase: strings, built from codes on first read.

    A (T, P) solve of many states stores small integer codes; the object array of
    strings that users see ("liquid", "two-phase", ...) costs more than the solve's own
    bookkeeping, so it is made once, when ``phase`` is first read, and kept.
    """

    def __set_name__(self, owner, name):
        self.slot = "_" + name

    def __get__(self, state, owner=None):
        if state is None:
            raise AttributeError("phase has no default")   # tells dataclass: a required field
        value = state.__dict__[self.slot]
        if isinstance(value, _PhaseCodes):
            value = _PHASE_OBJECTS.take(value.codes)
            state.__dict__[self.slot] = value
        return value

    def __set__(self, state, value):   # reached from the dataclass __init__ only (frozen)
        state.__dict__[self.slot] = value


def _root_kinds(model, T, v_roots):
    """Label roots: dP/dv > 0 is unstable; otherwise liquid-like below v_c, vapor-like above."""
    kinds = np.full(v_roots.shape, "", dtype=object)
    exists = np.isfinite(v_roots)   # the ideal gas: v_c = 0 and dP/dv < 0, so every root is vapor-like
    with np.errstate(invalid="ignore"):
        rising = model.dP_dv(np.asarray(T)[..., None], v_roots) > 0.0
    kinds[exists & (v_roots < model.v_c)] = LIQUID_LIKE
    kinds[exists & (v_roots >= model.v_c)] = VAPOR_LIKE
    kinds[exists & rising] = UNSTABLE
    return kinds


def _stable_index(ln_phi, kinds):
    """Index of the root of lowest Gibbs energy (lowest ln phi) among the non-unstable ones."""
    usable = np.where((kinds != UNSTABLE) & (kinds != "") & np.isfinite(ln_phi), ln_phi, np.inf)
    return np.argmin(usable, axis=-1)


def _branch_index(kinds, stable, branch):
    if branch == "stable":
        return stable
    wanted = LIQUID_LIKE if branch == "liquid" else VAPOR_LIKE
    has = kinds == wanted
    # the liquid-like root is the first, the vapor-like the last existing one
    first = np.argmax(has, axis=-1)
    last = kinds.shape[-1] - 1 - np.argmax(has[..., ::-1], axis=-1)
    pick = first if branch == "liquid" else last
    return np.where(np.any(has, axis=-1), pick, stable)


def _single_phase(model, T, P, v):
    """Phase of a single-phase state: above Tc by pressure, below Tc by the root's side of v_c."""
    T, P, v = np.broadcast_arrays(np.asarray(T), np.asarray(P), np.asarray(v))
    return _PHASE_OBJECTS.take(phase_codes(model, T, P, v))



def phase_codes(model, T, P, v):
    """Phase code of single-phase states: above Tc by pressure, below Tc by v against v_c.

    A NaN v reads as vapor; a NaN T counts as below Tc (its code comes from v), and so does
    a NaN P above Tc. Built by adding boolean arrays (masked writes into random positions
    cost several times more): with L = v < v_c, S = above Tc and P >= Pc, K = above Tc and
    P not NaN, the code is (not L) + (K and L) + S, which is LIQUID (0), VAPOR (1) or
    SUPERCRITICAL (2).
    """
    Tc, Pc = model.fluid.Tc, model.fluid.Pc
    v, T, P = np.asarray(v), np.asarray(T), np.asarray(P)
    liquid = np.asarray(v < model.v_c)
    above = T >= Tc                                   # False for NaN
    critical = np.asarray(above & (P >= Pc))          # S
    by_pressure = np.asarray((critical | (above & (P < Pc))) & liquid)   # K and L
    code = np.asarray(~liquid).view(np.int8) + by_pressure.view(np.int8)
    code += critical.view(np.int8)
    return np.asarray(code)


if (LIQUID, VAPOR, SUPERCRITICAL) != (0, 1, 2):   # phase_codes adds booleans into these codes
    raise ImportError("phase_codes needs LIQUID, VAPOR, SUPERCRITICAL = 0, 1, 2")
