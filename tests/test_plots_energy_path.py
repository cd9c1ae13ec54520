"""The isenthalp and isentrope plot: the table's numbers drawn, the reference beside them, the
triple point shown where a valve's outlet goes below it."""

import matplotlib
import numpy as np
import pytest

matplotlib.use("Agg")

import thermo_roots as tr  # noqa: E402
from thermo_roots import plots  # noqa: E402
from thermo_roots import sweeps as sw  # noqa: E402


def _line(ax, gid):
    found = [line for line in ax.lines if line.get_gid() == gid]
    assert len(found) == 1, gid
    return found[0]


def test_co2_vent_below_the_triple_point_is_shaded_and_warned():
    # CO2 vapor-liquid at 20 °C and 60 bar vented to 3 bar: below 5.18 bar (CO2's triple-point
    # pressure, Span & Wagner 1996) the outlet would be dry ice and vapor, which no cubic models
    model = tr.PengRobinson(tr.get_fluid("CO2"))
    frame = sw.isenthalp(model, inlet=tr.solve(model, T="20 degC", P="60 bar"), P=("60 bar", "3 bar"), n=20,
                         reference=True, progress=False)
    assert any("triple point" in w and "dry ice" in w for w in frame.attrs["warnings"])
    assert frame.attrs["fluid_constants"]["T_triple"] == pytest.approx(216.592, abs=1e-3)
    ax = plots.plot_energy_path(frame)
    x, y = _line(ax, "model").get_data()
    np.testing.assert_allclose(x, frame["P"] * 1e-5, rtol=1e-12)
    np.testing.assert_allclose(y, frame["T"], rtol=1e-12)
    ok = frame["reference_available"].to_numpy(dtype=bool)
    assert 0 < ok.sum() < len(frame)          # the reference stops at its triple point
    np.testing.assert_allclose(_line(ax, "reference").get_ydata(), frame["reference_T"][ok], rtol=1e-12)
    assert any(p.get_gid() == "below-triple-point" for p in ax.patches)
    assert "model − reference" in ax.get_title() and "isenthalp" in ax.get_title()
    matplotlib.pyplot.close("all")


def test_compressor_isentrope_has_no_triple_point_band_and_no_quality_axis():
    model = tr.PengRobinson(tr.get_fluid("propane"))
    frame = sw.isentrope(model, inlet=tr.solve(model, T="10 degC", P="3 bar"), P=("3 bar", "15 bar"), n=8,
                         reference=True, progress=False)
    ax = plots.plot_energy_path(frame)
    assert not any(p.get_gid() == "below-triple-point" for p in ax.patches)
    assert len(ax.figure.axes) == 1         # no twin for a quality: the path is all vapor
    assert not any("quality" in line.get_label() for line in ax.lines)
    assert "isentrope" in ax.get_title() and "kJ/(kg K)" in ax.get_title()
    matplotlib.pyplot.close("all")


def test_other_tables_are_refused():
    frame = sw.isotherm(tr.PengRobinson(tr.get_fluid("propane")), 300.0, P=(1e5, 5e5), n=3)
    with pytest.raises(tr.InputError, match="sweeps.isenthalp or sweeps.isentrope"):
        plots.plot_energy_path(frame)
