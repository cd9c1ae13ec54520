"""P–h and T–s diagrams (Agg backend): the drawn data are the model's and the reference
equation's own states, labels sit on their curves, a process step runs inlet → outlet."""

import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
import pytest  # noqa: E402
from matplotlib.axes import Axes  # noqa: E402

import thermo_roots as tr  # noqa: E402
from thermo_roots import plots, steps  # noqa: E402

CP = pytest.importorskip("CoolProp.CoolProp")


@pytest.fixture(autouse=True)
def _close():
    yield
    plt.close("all")


@pytest.fixture(scope="module")
def propane():
    return tr.PengRobinson(tr.get_fluid("propane"))


@pytest.fixture(scope="module")
def co2():
    return tr.PengRobinson(tr.get_fluid("CO2"))


@pytest.fixture(scope="module")
def propane_throttle(propane):
    # a liquid line at 30 °C and 12 bar (subcooled: P_sat(30 °C) is about 10.8 bar, CoolProp) to 2 bar
    return steps.throttle(propane, tr.solve(propane, T=303.15, P=12e5), 2e5)


@pytest.fixture(scope="module")
def co2_vent(co2):
    # liquid CO2 at 20 °C and 60 bar (P_sat(20 °C) = 57.3 bar, Span & Wagner 1996) vented to 1.2 bar
    return steps.throttle(co2, tr.solve(co2, T=293.15, P=60e5), 1.2e5)


def _one(ax, gid):
    found = [a for a in ax.get_children() if a.get_gid() == gid]
    assert len(found) == 1, f"expected one artist {gid!r}, found {len(found)}"
    return found[0]


def _all(ax, prefix):
    return [a for a in ax.get_children() if (a.get_gid() or "").startswith(prefix)]


def _texts(ax):
    """All the axes' texts, wrapped lines joined (a wrapped sentence reads as one)."""
    return " ".join(" ".join(t.get_text().split()) for t in ax.texts)


# --------------------------------------------------------------------------- P–h

def test_ph_dome_is_the_models_saturated_enthalpy(propane):
    ax = plots.plot_pressure_enthalpy(propane)
    assert isinstance(ax, Axes) and ax.get_yscale() == "log"
    for q, side in ((0.0, "liquid"), (1.0, "vapor")):
        h, P = (np.asarray(a, dtype=float) for a in _one(ax, f"dome-{side}:PR").get_data())
        assert h.size > 40
        for k in (0, 10, 25, 45, h.size - 3):
            state = tr.solve(propane, P=P[k] * 1e5, quality=q)
            assert h[k] == pytest.approx(state.h_mass / 1e3, rel=1e-7)
        # both branches end at the model's critical point (Tc, v_c of the cubic)
        crit = tr.solve(propane, T=propane.fluid.Tc, v=propane.v_c)
        assert (h[-1], P[-1]) == pytest.approx((crit.h_mass / 1e3, crit.P * 1e-5), rel=1e-9)
    # the dome's pressures are the model's saturation pressures
    h, P = _one(ax, "dome-liquid:PR").get_data()
    P = np.asarray(P)[:-1]     # the last point is the critical point
    T = tr.solve(propane, P=P * 1e5, quality=0.0).T
    assert np.asarray(P) * 1e5 == pytest.approx(tr.saturation(propane, T=T).P, rel=1e-7)


def test_ph_reference_dome_is_coolprops_saturated_enthalpy(propane):
    ax = plots.plot_pressure_enthalpy(propane)
    for q, side in ((0, "liquid"), (1, "vapor")):
        h, P = (np.asarray(a, dtype=float) for a in _one(ax, f"reference-dome-{side}").get_data())
        ok = np.flatnonzero(np.isfinite(h))
        assert ok.size > 40
        for k in ok[[0, 10, 30, -5]]:
            # CoolProp's own saturated hmass from (P, Q) inputs (Bell et al. 2014; propane: Lemmon et al. 2009)
            expected = CP.PropsSI("Hmass", "P", P[k] * 1e5, "Q", q, "n-Propane") / 1e3
            assert h[k] == pytest.approx(expected, rel=1e-6)


def test_ph_model_and_reference_domes_are_close_for_propane(propane):
    # Peng–Robinson's latent heat of propane at 5 bar against CoolProp's: a few percent at most
    # (common practice: PR fits vapor pressures, so the Clausius–Clapeyron latent heat follows)
    ax = plots.plot_pressure_enthalpy(propane)
    lines = {side: [np.asarray(a, dtype=float) for a in _one(ax, f"dome-{side}:PR").get_data()]
             for side in ("liquid", "vapor")}
    latent = (np.interp(np.log(5.0), np.log(lines["vapor"][1][:-20]), lines["vapor"][0][:-20])
              - np.interp(np.log(5.0), np.log(lines["liquid"][1][:-20]), lines["liquid"][0][:-20]))
    reference = (CP.PropsSI("Hmass", "P", 5e5, "Q", 1, "n-Propane")
                 - CP.PropsSI("Hmass", "P", 5e5, "Q", 0, "n-Propane")) / 1e3
    assert latent == pytest.approx(reference, rel=0.05)


def test_ph_isotherms_are_the_models_states_and_labelled_on_their_own_curve(propane):
    ax = plots.plot_pressure_enthalpy(propane, T_lines=["-20 degC", 300.0, "60 degC", 420.0])
    isotherms = {float(a.get_gid().split(":")[1]): a for a in _all(ax, "isotherm:")}
    assert sorted(isotherms) == pytest.approx([253.15, 300.0, 333.15, 420.0])
    x_span = np.diff(ax.get_xlim())[0]
    y_span = np.diff(np.log(ax.get_ylim()))[0]
    for T, line in isotherms.items():
        h, P = (np.asarray(a, dtype=float) for a in line.get_data())
        # points off the dome are (T, P) states of the model
        k = int(np.argmax(P))
        assert h[k] == pytest.approx(tr.solve(propane, T=T, P=P[k] * 1e5).h_mass / 1e3, rel=1e-9)
        label = _one(ax, f"isotherm-label:{T:g}")
        assert label.get_text() == f"{T - 273.15:.0f} °C"
        x, y = label.get_position()

        def distance(curve):
            hh, PP = (np.asarray(a, dtype=float) for a in curve.get_data())
            return np.nanmin(np.hypot((hh - x) / x_span, (np.log(PP) - np.log(y)) / y_span))

        own = distance(line)
        assert own < 1e-9
        assert all(distance(other) > 0.01 for T2, other in isotherms.items() if T2 != T)


def test_ph_subcritical_isotherm_crosses_the_dome_at_the_saturation_pressure(propane):
    ax = plots.plot_pressure_enthalpy(propane, T_lines=[280.0])
    h, P = (np.asarray(a, dtype=float) for a in _one(ax, "isotherm:280").get_data())
    sat = tr.saturation(propane, T=280.0)
    flat = np.flatnonzero(np.isclose(P * 1e5, sat.P, rtol=1e-12))
    assert flat.size == 2
    ends = sorted(h[flat])
    assert ends == pytest.approx(sorted([tr.solve(propane, T=280.0, quality=q).h_mass / 1e3 for q in (0.0, 1.0)]),
                                 rel=1e-9)


def test_ph_quality_lines_follow_the_lever_rule(propane):
    ax = plots.plot_pressure_enthalpy(propane, quality_lines=(0.3,))
    h, P = (np.asarray(a, dtype=float) for a in _one(ax, "quality:0.3").get_data())
    for k in (0, 15, 40):
        hl, hv = (tr.solve(propane, P=P[k] * 1e5, quality=q).h_mass / 1e3 for q in (0.0, 1.0))
        assert h[k] == pytest.approx(hl + 0.3 * (hv - hl), rel=1e-7)     # lever rule (common practice)
    assert len(_all(plots.plot_pressure_enthalpy(propane, quality_lines=()), "quality:")) == 0


def test_ph_step_arrow_runs_from_inlet_to_outlet_beside_the_reference(propane, propane_throttle):
    step = propane_throttle
    ax = plots.plot_pressure_enthalpy(propane, step=step)
    arrow = _one(ax, "step:model")
    assert arrow.xyann == pytest.approx((step.inlet.h_mass / 1e3, step.inlet.P * 1e-5), rel=1e-12)
    assert arrow.xy == pytest.approx((step.outlet.h_mass / 1e3, step.outlet.P * 1e-5), rel=1e-12)
    ref = _one(ax, "step:reference")
    # the reference's inlet is CoolProp's own hmass at (T, P) of the inlet
    h_ref_in = CP.PropsSI("Hmass", "T", 303.15, "P", 12e5, "n-Propane") / 1e3
    assert ref.xyann == pytest.approx((h_ref_in, 12.0), rel=1e-6)
    assert ref.xy[1] == pytest.approx(2.0, rel=1e-9)
    # a throttle keeps h (isenthalpic): both arrows are vertical
    assert ref.xy[0] == pytest.approx(ref.xyann[0], rel=1e-6)
    assert arrow.xy[0] == pytest.approx(arrow.xyann[0], rel=1e-9)
    texts = _texts(ax)
    assert "Caution" in texts and tr.CAUTION[:40] in texts
    assert "have no single value" not in texts      # the general two-phase note is not a step warning
    assert f"{float(step.outlet.T) - 273.15:.1f} °C" in texts


def test_ph_axes_carry_units(propane):
    ax = plots.plot_pressure_enthalpy(propane)
    assert "[kJ/kg]" in ax.get_xlabel() and "[bar]" in ax.get_ylabel()
    assert "propane" in ax.get_title() and "PR" in ax.get_title()


def test_ph_co2_vent_shows_the_triple_point_and_the_dry_ice_warning(co2, co2_vent):
    ax = plots.plot_pressure_enthalpy(co2, step=co2_vent)
    triple = _one(ax, "triple-point")
    # CO2 triple point 0.51795 MPa (Span & Wagner 1996, J. Phys. Chem. Ref. Data 25, 1509)
    assert triple.get_ydata()[0] == pytest.approx(5.1795, rel=2e-3)
    assert "dry ice" in _texts(ax)
    # the outlet far below the dome's foot is inside the axes, and the isotherms reach down to it
    low, high = ax.get_ylim()
    assert low < float(co2_vent.outlet.P) * 1e-5 < high
    P = np.asarray(_one(ax, "isotherm:273.15").get_ydata(), dtype=float)
    assert np.nanmin(P) <= 1.01 * low
    # the reference cannot follow the vent below its triple point: no dashed arrow, the reason instead
    assert not _all(ax, "step:reference")
    assert "reference equation's step is not drawn" in _texts(ax)


# --------------------------------------------------------------------------- T–s

def test_ts_dome_isobars_and_step(co2, co2_vent):
    ax = plots.plot_temperature_entropy(co2, P_lines=["20 bar", 50e5, "100 bar"], step=co2_vent)
    assert "[kJ/(kg K)]" in ax.get_xlabel() and "[°C]" in ax.get_ylabel()
    for q, side in ((0.0, "liquid"), (1.0, "vapor")):
        s, t = (np.asarray(a, dtype=float) for a in _one(ax, f"dome-{side}:PR").get_data())
        for k in (0, 20, 50):
            state = tr.solve(co2, T=t[k] + 273.15, quality=q)
            assert s[k] == pytest.approx(state.s_mass / 1e3, rel=1e-7)
        rs, rt = (np.asarray(a, dtype=float) for a in _one(ax, f"reference-dome-{side}").get_data())
        for k in np.flatnonzero(np.isfinite(rs))[[0, 20]]:
            # CoolProp's saturated smass (Span & Wagner 1996 equation through CoolProp)
            expected = CP.PropsSI("Smass", "T", rt[k] + 273.15, "Q", q, "CarbonDioxide") / 1e3
            assert rs[k] == pytest.approx(expected, rel=1e-6)
    isobars = {float(a.get_gid().split(":")[1]): a for a in _all(ax, "isobar:")}
    assert sorted(isobars) == pytest.approx([20e5, 50e5, 100e5])
    for P, line in isobars.items():
        label = _one(ax, f"isobar-label:{P:g}")
        assert label.get_text() == f"{P * 1e-5:.4g} bar"
        s, t = (np.asarray(a, dtype=float) for a in line.get_data())
        assert np.nanmin(np.hypot(s - label.get_position()[0], t - label.get_position()[1])) < 1e-9
    arrow = _one(ax, "step:model")
    assert arrow.xyann == pytest.approx((co2_vent.inlet.s_mass / 1e3, float(co2_vent.inlet.T) - 273.15), rel=1e-12)
    assert arrow.xy == pytest.approx((co2_vent.outlet.s_mass / 1e3, float(co2_vent.outlet.T) - 273.15), rel=1e-12)
    low, high = ax.get_ylim()
    assert low < float(co2_vent.outlet.T) - 273.15 < high
    # CO2 triple point 216.592 K (Span & Wagner 1996)
    assert _one(ax, "triple-point").get_ydata()[0] == pytest.approx(216.592 - 273.15, abs=0.01)


def test_ts_default_isobar_labels_do_not_overlap(propane):
    ax = plots.plot_temperature_entropy(propane)
    ax.figure.canvas.draw()
    boxes = [t.get_window_extent() for t in _all(ax, "isobar-label:")]
    assert len(boxes) >= 4
    for i in range(len(boxes)):
        for j in range(i + 1, len(boxes)):
            assert not boxes[i].overlaps(boxes[j]), (i, j)


# --------------------------------------------------------------------------- user fluids, bad input

def test_user_fluid_with_cp0_has_no_reference_overlay():
    f = tr.get_fluid("propane")
    # cp0 of propane near 300 K, about 73.6 J/(mol K) (CoolProp's ideal-gas part, from memory)
    mine = tr.Fluid("my propane", Tc=f.Tc, Pc=f.Pc, omega=f.omega, molar_mass=f.molar_mass, cp0=(30.0, 0.145))
    model = tr.PengRobinson(mine)
    for draw in (plots.plot_pressure_enthalpy, plots.plot_temperature_entropy):
        ax = draw(model)
        assert not _all(ax, "reference")
        assert "user fluid" in _texts(ax)
        h, P = (np.asarray(a, dtype=float) for a in _one(ax, "dome-vapor:PR").get_data())
        assert h.size > 40 and np.all(np.isfinite(h))
    ax = plots.plot_pressure_enthalpy(model)
    h, P = (np.asarray(a, dtype=float) for a in _one(ax, "dome-vapor:PR").get_data())
    assert h[5] == pytest.approx(tr.solve(model, P=P[5] * 1e5, quality=1.0).h_mass / 1e3, rel=1e-7)
    # said once, under the plot (not over the curves), also with a step
    ax = plots.plot_pressure_enthalpy(model, step=steps.throttle(model, tr.solve(model, T=303.15, P=12e5), 2e5))
    assert _texts(ax).count("user fluid") == 1
    ax.figure.canvas.draw()
    note = [t for t in ax.texts if "user fluid" in t.get_text()][0]
    assert note.get_window_extent().y1 < ax.get_window_extent().y0
    # reference=False draws no overlay for a library fluid either
    assert not _all(plots.plot_pressure_enthalpy(tr.PengRobinson(f), reference=False), "reference")


def test_bad_input_is_named(propane, co2_vent):
    f = tr.get_fluid("propane")
    bare = tr.PengRobinson(tr.Fluid("bare", Tc=f.Tc, Pc=f.Pc, omega=f.omega, molar_mass=f.molar_mass))
    with pytest.raises(tr.DomainError, match="cp0"):
        plots.plot_pressure_enthalpy(bare)
    with pytest.raises(tr.InputError, match="T_lines"):
        plots.plot_pressure_enthalpy(propane, T_lines=[-5.0])
    with pytest.raises(tr.InputError, match="P_lines"):
        plots.plot_temperature_entropy(propane, P_lines=[np.nan])
    with pytest.raises(tr.InputError, match="quality_lines"):
        plots.plot_pressure_enthalpy(propane, quality_lines=(1.2,))
    with pytest.raises(tr.InputError, match="StepResult"):
        plots.plot_pressure_enthalpy(propane, step="valve")
    with pytest.raises(tr.InputError, match="carbon dioxide"):
        plots.plot_pressure_enthalpy(propane, step=co2_vent)
    with pytest.raises(tr.InputError, match="ideal gas"):
        plots.plot_pressure_enthalpy(tr.IdealGas(f))
    with pytest.raises(tr.InputError, match="one model"):
        plots.plot_pressure_enthalpy([propane, propane])


def test_compressor_step_shows_the_isentropic_outlet(propane):
    # saturated propane vapor at 0 °C compressed to 15 bar at an isentropic efficiency of 0.75
    step = steps.compress(propane, tr.solve(propane, T=273.15, quality=1.0), 15e5, 0.75)
    ax = plots.plot_pressure_enthalpy(propane, step=step)
    h, P = (np.asarray(a, dtype=float) for a in _one(ax, "step:isentropic").get_data())
    assert (h[1], P[1]) == pytest.approx((step.isentropic_outlet.h_mass / 1e3, 15.0), rel=1e-12)
    arrow = _one(ax, "step:model")
    # work = (h_s - h_in) / efficiency (common practice): the actual outlet lies right of the ideal one
    assert arrow.xy[0] - arrow.xyann[0] == pytest.approx((h[1] - h[0]) / 0.75, rel=1e-6)
    # the reference's own compression (CoolProp's (P, s) solve): its outlet temperature is written beside
    assert "reference equation:" in _texts(ax)
    ax = plots.plot_temperature_entropy(propane, step=step)
    s, T = (np.asarray(a, dtype=float) for a in _one(ax, "step:isentropic").get_data())
    assert s[1] == pytest.approx(s[0], rel=1e-7)      # isentropic: vertical on T–s


def test_step_labels_stay_inside_the_axes(propane, propane_throttle):
    # a compressor outlet near the right of the diagram: its label turns inward, not into the legend
    step = steps.compress(propane, tr.solve(propane, T=273.15, quality=1.0), 15e5, 0.75)
    for s in (step, propane_throttle):
        ax = plots.plot_pressure_enthalpy(propane, step=s)
        ax.figure.canvas.draw()
        frame = ax.get_window_extent()
        for gid in ("step-inlet-label", "step-outlet-label"):
            box = _one(ax, gid).get_window_extent()
            assert frame.x0 <= box.x0 and box.x1 <= frame.x1, gid
        assert "inlet 0.0 °C" in _texts(ax) or "inlet 30.0 °C, 12 bar" in _texts(ax)


def test_vessel_heat_up_carries_the_pressure_equipment_caution(propane):
    # 10 kg of propane at 300 kg/m³ and 20 °C in a closed vessel, heated to 20 bar
    inlet = tr.solve(propane, T=293.15, rho_mass=300.0)
    step = steps.heat_at_constant_volume(propane, inlet, mass=10.0, P=20e5)
    ax = plots.plot_temperature_entropy(propane, step=step)
    assert steps.VESSEL_CAUTION in _texts(ax) and tr.CAUTION[:40] in _texts(ax)
    arrow = _one(ax, "step:model")
    assert arrow.xy == pytest.approx((step.outlet.s_mass / 1e3, float(step.outlet.T) - 273.15), rel=1e-12)
    labels = ax.get_legend().get_texts()
    assert any("the ends only, not the heating path" in t.get_text().replace("\n", " ") for t in labels)
