"""Sweeps into tables: agreement with single solves, the reference beside them, the
closed-vessel isochore, parallel and interrupted runs, and the CSV round trip."""

import warnings
from concurrent.futures import ProcessPoolExecutor

import CoolProp.CoolProp as CP
import numpy as np
import pandas as pd
import pytest

import thermo_roots as tr
from thermo_roots import reference as ref
from thermo_roots import sweeps as sw


@pytest.fixture(scope="module")
def pr_co2():
    return tr.PengRobinson(tr.get_fluid("CO2"))


def test_isotherm_rows_are_the_array_solve(pr_co2):
    frame = sw.isotherm(pr_co2, "7 degC", P=("1 bar", "100 bar"), n=12)
    P = np.geomspace(1e5, 1e7, 12)
    np.testing.assert_allclose(frame["P"], P, rtol=1e-12)
    state = tr.solve(pr_co2, T=280.15, P=P)
    np.testing.assert_allclose(frame["v"], state.v, rtol=1e-12)
    np.testing.assert_allclose(frame[["v_root_1", "v_root_2", "v_root_3"]].to_numpy(), state.root_volumes)
    assert list(frame["phase"]) == list(state.phase)
    # units as a person reads them, in Unicode (the project's spelling)
    assert frame.attrs["units"]["P"] == "Pa" and frame.attrs["units"]["rho_mass"] == "kg/m³"
    assert frame.attrs["units"]["v_root_2"] == "m³/mol" and frame.attrs["T"] == pytest.approx(280.15)
    assert frame.attrs["fluid"] == "carbon dioxide" and frame.attrs["model"] == "Peng-Robinson"
    assert frame.attrs["version"] == tr.__version__ and frame.attrs["caution"] == tr.CAUTION
    assert frame.attrs["fluid_constants"]["Tc"] == pr_co2.fluid.Tc
    # three real roots somewhere below saturation, one well above (common practice)
    assert frame["n_roots"].max() == 3 and frame["n_roots"].iloc[-1] == 1


def test_isotherm_by_volume_has_the_flat_two_phase_part(pr_co2):
    frame = sw.isotherm(pr_co2, 280.0, v=["0.045 L/mol", "0.1 L/mol", "0.2 L/mol", "1 L/mol"])
    sat = tr.saturation(pr_co2, T=280.0)
    two = frame[frame["phase"] == "two-phase"]
    assert len(two) == 2
    np.testing.assert_allclose(two["P"], sat.P, rtol=1e-12)
    q = (two["v"] - sat.v_liquid) / (sat.v_vapor - sat.v_liquid)
    np.testing.assert_allclose(two["quality"], q, rtol=1e-12)


def test_reference_columns_match_cross_check(pr_co2):
    frame = sw.state_grid(pr_co2, T=[230.0, 280.0, 320.0], P=sw.between("5 bar", "150 bar", n=5),
                          reference=True, progress=False)
    assert frame.attrs["grid_shape"] == [3, 5] and len(frame) == 15
    check = ref.cross_check(tr.solve(pr_co2, T=frame["T"].to_numpy(), P=frame["P"].to_numpy()))
    np.testing.assert_allclose(frame["deviation_v_percent"], check.deviation_v_percent, rtol=1e-12)
    assert list(frame["reference_phase"]) == list(check.reference_phase)
    # and the reference values are CoolProp's (PropsSI, a separate path)
    row = frame.iloc[7]
    rho = CP.PropsSI("Dmolar", "T", row["T"], "P", row["P"], "HEOS::CO2")
    assert row["reference_v"] == pytest.approx(1 / rho, rel=1e-9)
    assert frame.attrs["units"]["deviation_v_percent"] == "%"


def test_isochore_marks_the_liquid_full_point_and_the_pressure_climbs(pr_co2):
    # PV-330-like closed cylinder filled to 700 kg/m3 of CO2 and warmed (invented scenario)
    frame = sw.isochore(pr_co2, rho_mass="700 kg/m^3", T=("0 degC", "40 degC"), n=21)
    point = frame.attrs["fill_point"]
    assert point["kind"] == "liquid-full"
    marked = frame[frame["fill_point"]]
    assert len(marked) == 1 and marked["T"].iloc[0] == pytest.approx(point["T"])
    v = pr_co2.fluid.molar_mass / 700.0
    assert tr.saturation(pr_co2, T=point["T"]).v_liquid == pytest.approx(v, rel=1e-8)
    before = frame[frame["T"] < point["T"]]
    after = frame[frame["T"] > point["T"]]
    assert set(before["phase"]) == {"two-phase"} and "two-phase" not in set(after["phase"])
    # common practice: a liquid-full vessel's pressure rises many times faster with T
    # than the saturation pressure does
    slope_before = np.gradient(before["P"], before["T"]).mean()
    slope_after = np.gradient(after["P"], after["T"])[:3].mean()
    assert slope_after > 3 * slope_before


def test_isochore_reference_fill_point_is_the_reference_liquid_density(pr_co2):
    frame = sw.isochore(pr_co2, rho_mass="700 kg/m^3", T=("0 degC", "35 degC"), n=8, reference=True)
    point = frame.attrs["reference_fill_point"]
    assert point["kind"] == "liquid-full"
    rho_l = CP.PropsSI("D", "T", point["T"], "Q", 0, "HEOS::CO2")      # Span & Wagner (1996) via CoolProp
    assert rho_l == pytest.approx(700.0, rel=1e-6)
    assert "deviation_P_percent" in frame and frame["reference_available"].all()


def test_vapor_full_point_for_a_thin_fill(pr_co2):
    frame = sw.isochore(pr_co2, rho_mass=100.0, T=(250.0, 300.0), n=6)
    assert frame.attrs["fill_point"]["kind"] == "vapor-full"
    v = pr_co2.fluid.molar_mass / 100.0
    assert tr.saturation(pr_co2, T=frame.attrs["fill_point"]["T"]).v_vapor == pytest.approx(v, rel=1e-8)


def test_saturation_curve_against_reference(pr_co2):
    frame = sw.saturation_curve(pr_co2, T=[220.0, 260.0, 300.0], reference=True)
    direct = [CP.PropsSI("P", "T", T, "Q", 0, "HEOS::CO2") for T in (220.0, 260.0, 300.0)]
    np.testing.assert_allclose(frame["reference_P"], direct, rtol=1e-9)
    np.testing.assert_allclose(frame["deviation_P_percent"], 100 * (frame["P"] / direct - 1), rtol=1e-9)
    # common practice: PR's vapor pressures are within a few percent of the reference
    assert frame["deviation_P_percent"].abs().max() < 3.0
    default = sw.saturation_curve(pr_co2, n=5)
    assert default["T"].iloc[0] == pytest.approx(ref.reference_limits(pr_co2.fluid)["T_min"])
    assert default["T"].iloc[-1] == pytest.approx(pr_co2.fluid.Tc)


def test_ranges_and_errors(pr_co2):
    assert np.allclose(sw._values(("10 degC", "30 degC"), "T", molar_mass=None, n=3), [283.15, 293.15, 303.15])
    assert np.allclose(sw._values(sw.between(1e5, 1e7, n=3), "P", molar_mass=None), [1e5, 1e6, 1e7])
    assert np.allclose(sw._values(sw.between(1e5, 3e5, n=3, log=False), "P", molar_mass=None), [1e5, 2e5, 3e5])
    assert np.allclose(sw._values(["1 bar", 2e5], "P", molar_mass=None), [1e5, 2e5])
    with pytest.raises(tr.InputError, match="not both"):
        sw.isotherm(pr_co2, 280.0, P=[1e5], v=[1e-3])
    with pytest.raises(tr.InputError, match="one value"):
        sw.isobar(pr_co2, [1e5, 2e5])
    with pytest.raises(tr.InputError, match="exactly one"):
        sw.isochore(pr_co2, v=1e-4, rho_mass=500.0)


def test_executor_gives_the_same_table(pr_co2):
    kwargs = dict(T=("-20 degC", "60 degC"), n=40, reference=True, progress=False, chunk_size=10)
    serial = sw.isobar(pr_co2, "50 bar", **kwargs)
    with ProcessPoolExecutor(max_workers=2) as pool:
        parallel = sw.isobar(pr_co2, "50 bar", executor=pool, **kwargs)
    pd.testing.assert_frame_equal(serial, parallel)
    assert parallel.attrs["interrupted"] is False


def test_interrupted_sweep_keeps_the_rows_done(pr_co2, monkeypatch):
    done = {"chunks": 0}
    real = ref._reference_chunk

    def stop_after_two(*args):
        if done["chunks"] == 2:
            raise KeyboardInterrupt
        done["chunks"] += 1
        return real(*args)

    monkeypatch.setattr(ref, "_reference_chunk", stop_after_two)
    with pytest.warns(UserWarning, match="Interrupted"):
        frame = sw.isotherm(pr_co2, 300.0, n=50, reference=True, progress=False, chunk_size=8)
    assert len(frame) == 16 and frame.attrs["interrupted"] is True
    assert frame["reference_available"].all()
    full = sw.isotherm(pr_co2, 300.0, n=50)
    np.testing.assert_allclose(frame["v"], full["v"].iloc[:16], rtol=0)


def test_csv_round_trip(tmp_path, pr_co2):
    frame = sw.isochore(pr_co2, rho_mass="650 kg/m^3", T=("5 degC", "45 degC"), n=9, reference=True)
    path = tmp_path / "pv330.csv"
    sw.to_csv(frame, path)
    text = path.read_text()
    header = [line for line in text.splitlines() if line.startswith("#")]
    assert any("Tc = 304.1282" in line for line in header)
    assert any(line.startswith("# caution: ") for line in header)
    assert any(f"thermo_roots {tr.__version__}" in line for line in header)
    assert any("P [Pa]" in line for line in header)
    back = sw.read_csv(path)
    pd.testing.assert_frame_equal(back, frame, check_exact=True)
    assert back.attrs == frame.attrs


def test_ideal_gas_sweep_has_no_fill_point():
    frame = sw.isochore(tr.IdealGas(tr.get_fluid("nitrogen")), rho_mass=50.0, T=(250.0, 300.0), n=4)
    assert frame.attrs["fill_point"] is None and not frame["fill_point"].any()
    np.testing.assert_allclose(frame["Z"], 1.0, rtol=1e-12)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        sw.isobar(tr.IdealGas(tr.get_fluid("nitrogen")), 1e5, T=[300.0], reference=True)


# --------------------------------------------------------------------------- bad input (issue 8, section 3)

@pytest.mark.parametrize("n, error", [(0, tr.InputError), (-1, tr.InputError), (1, tr.InputError),
                                      (2.5, tr.InputError), (float("nan"), tr.InputError),
                                      ("5", TypeError), (None, TypeError), (True, TypeError)])
def test_point_counts_are_whole_numbers_of_at_least_two(pr_co2, n, error):
    for call in (lambda: sw.isochore(pr_co2, rho_mass=700.0, n=n),
                 lambda: sw.isotherm(pr_co2, 300.0, n=n),
                 lambda: sw.isobar(pr_co2, 1e6, n=n),
                 lambda: sw.state_grid(pr_co2, (250.0, 300.0), (1e5, 1e6), n=n),
                 lambda: sw.saturation_curve(pr_co2, n=n),
                 lambda: sw.between(1e5, 1e6, n=n)):
        with pytest.raises(error, match=r"\bn\b.*whole number of at least 2"):
            call()


def test_whole_float_and_numpy_counts_are_accepted(pr_co2):
    assert len(sw.isotherm(pr_co2, 300.0, n=4.0)) == 4
    assert len(sw.isotherm(pr_co2, 300.0, n=np.int64(3))) == 3


@pytest.mark.parametrize("model, words", [(None, "NoneType"), ("PR", "A text is not a model"),
                                          (tr.PengRobinson, "This is the class")])
def test_a_sweep_without_a_model_says_what_a_model_is(model, words):
    with pytest.raises(TypeError, match=words):
        sw.isotherm(model, 300.0)
    with pytest.raises(TypeError, match=r"isochore\(\) needs a model"):
        sw.isochore(model, rho_mass=700.0)


@pytest.mark.parametrize("kwargs, error, words", [
    (dict(log="yes"), TypeError, "log must be True"),
    (dict(reference="yes"), TypeError, "reference must be True"),
    (dict(reference=True, chunk_size=0), tr.InputError, "chunk_size=0"),
    (dict(reference=True, executor="pool"), TypeError, "executor"),
    (dict(progress="sometimes"), tr.InputError, "progress="),
    (dict(P=[]), tr.InputError, "holds no values"),
])
def test_other_sweep_arguments_are_checked(pr_co2, kwargs, error, words):
    with pytest.raises(error, match=words):
        sw.isotherm(pr_co2, 300.0, **kwargs)


def test_to_csv_of_something_else_is_a_type_error(tmp_path):
    with pytest.raises(TypeError, match="DataFrame"):
        sw.to_csv("not a table", tmp_path / "x.csv")


def test_user_fluid_with_reference_keeps_every_row():
    # a fluid without a reference equation: every row stays, marked unavailable (it was cut
    # to zero rows as if interrupted)
    fluid = tr.Fluid("lab blend X", 420.0, 4.1e6, 0.21, 0.058)          # invented
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        frame = sw.isobar(tr.PengRobinson(fluid), 1e6, T=(300.0, 400.0), n=5, reference=True)
    assert len(frame) == 5 and frame.attrs["interrupted"] is False
    assert not frame["reference_available"].any() and frame["reference_reason"].str.contains("library_name").all()


def test_unknown_library_name_sweep_uses_the_model_range_and_marks_unavailable():
    fluid = tr.Fluid("plant mix 7", 400.0, 4e6, 0.2, 0.05, library_name="NoSuchFluid")   # invented
    frame = sw.isochore(tr.PengRobinson(fluid), rho_mass=300.0, n=5, reference=True)
    assert len(frame) >= 5 and frame["T"].min() == pytest.approx(0.6 * fluid.Tc)
    assert frame.attrs["reference_fill_point"] is None and not frame["reference_available"].any()


def test_sweep_with_made_up_constants_warns_and_records_it():
    fluid = tr.Fluid("propane", Tc=500.0, Pc=5e6, omega=0.2, molar_mass=0.05, library_name="n-Propane")
    with pytest.warns(UserWarning, match="differ from those of the reference equation"):
        frame = sw.isobar(tr.PengRobinson(fluid), 1e6, T=[300.0, 400.0], reference=True)
    assert "Tc = 500 K" in frame.attrs["reference_warnings"][0]


def test_nan_temperature_among_many_states_keeps_the_rest():
    # attack: 2000 CO2 states with one T = NaN (a model state that did not solve), through a
    # process pool: that state is unavailable with a reason, every other state is exactly
    # its serial value (CoolProp's reference equation, Span & Wagner 1996)
    T = np.linspace(230.0, 400.0, 2000)
    P = np.full(T.shape, 5e6)
    serial, _ = ref.evaluate_reference("CarbonDioxide", "T,P", T, P, with_saturation=False)
    T_bad = T.copy()
    T_bad[1234] = np.nan
    with ProcessPoolExecutor(max_workers=2) as pool:
        values, completed = ref.evaluate_reference("CarbonDioxide", "T,P", T_bad, P, with_saturation=False,
                                                   executor=pool, chunk_size=250)
    assert completed == 2000
    assert "not finite" in values["reason"][1234] and np.isnan(values["v"][1234])
    keep = np.arange(T.size) != 1234
    assert (values["reason"][keep] == serial["reason"][keep]).all()
    np.testing.assert_allclose(values["v"][keep], serial["v"][keep], rtol=1e-12)


def test_sweeps_carry_the_caloric_columns_of_the_solve(pr_co2):
    frame = sw.isotherm(pr_co2, "7 degC", P=("1 bar", "100 bar"), n=12)
    state = tr.solve(pr_co2, T=280.15, P=np.geomspace(1e5, 1e7, 12))
    for name in ("h", "s", "cp", "w", "mu_jt"):
        np.testing.assert_allclose(frame[name], getattr(state, name), rtol=1e-12)
    assert frame.attrs["units"]["h"] == "J/mol" and frame.attrs["units"]["w"] == "m/s"
    custom = tr.PengRobinson(tr.Fluid("blend", Tc=350.0, Pc=4e6, omega=0.2, molar_mass=0.05))
    assert "h" not in sw.isotherm(custom, 300.0, P=(1e5, 1e6), n=3).columns   # no ideal-gas data: no caloric columns
