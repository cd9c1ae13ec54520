"""The phase-envelope plot (Agg backend): the drawn data are the envelope's own points, its
special points are marked and labelled in words, quality lines are labelled, the reference
mixture model's points are CoolProp's own bubble and dew points, and the caution is shown."""

import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
import pytest  # noqa: E402
from matplotlib.axes import Axes  # noqa: E402

import thermo_roots as tr  # noqa: E402
from thermo_roots import plots  # noqa: E402
from thermo_roots.equilibrium.envelope import phase_envelope  # noqa: E402
from thermo_roots.errors import InputError  # noqa: E402
from thermo_roots.reference import reference_bubble_point  # noqa: E402


@pytest.fixture(autouse=True)
def _close():
    yield
    plt.close("all")


@pytest.fixture(scope="module")
def envelope():
    return phase_envelope(tr.PengRobinson(tr.Mixture({"methane": 0.5, "ethane": 0.5})), qualities=(0.25, 0.5))


def _line(ax, gid):
    return next(line for line in ax.get_lines() if line.get_gid() == gid)


def _texts(ax):
    return {t.get_gid(): t.get_text() for t in ax.texts if t.get_gid()}


def test_sides_special_points_and_labels(envelope):
    ax = plots.plot_phase_envelope(envelope)
    assert isinstance(ax, Axes)
    bubble, dew = _line(ax, "envelope-bubble"), _line(ax, "envelope-dew")
    # °C on x, bar on y: the envelope's own numbers
    on = envelope.side == "bubble"
    x, y = np.asarray(bubble.get_xdata(), float), np.asarray(bubble.get_ydata(), float)
    assert x[on] == pytest.approx(envelope.T[on] - 273.15)
    assert y == pytest.approx(envelope.P * 1e-5)
    assert np.isnan(x[~on]).all() and np.isfinite(np.asarray(dew.get_xdata(), float)[~on]).all()
    Tc, Pc = envelope.critical
    star = _line(ax, "critical-point")
    assert star.get_xdata()[0] == pytest.approx(Tc - 273.15) and star.get_ydata()[0] == pytest.approx(Pc * 1e-5)
    assert _line(ax, "cricondenbar").get_ydata()[0] == pytest.approx(envelope.cricondenbar[1] * 1e-5)
    assert _line(ax, "cricondentherm").get_xdata()[0] == pytest.approx(envelope.cricondentherm[0] - 273.15)
    texts = _texts(ax)
    assert texts["critical-label"].startswith("critical point")
    assert texts["cricondenbar-label"].startswith("cricondenbar")
    assert texts["cricondentherm-label"].startswith("cricondentherm")
    assert texts["quality-label:0.25"] == "25 % vapor" and texts["quality-label:0.5"] == "50 % vapor"
    assert ax.get_xlabel() == "Temperature [°C]" and ax.get_ylabel() == "Pressure [bar]"
    assert any("Caution" in t.get_text() for t in ax.texts)


def test_quality_lines_asked_for_are_traced(envelope):
    ax = plots.plot_phase_envelope(envelope, qualities=(0.5, 0.75))
    gids = {line.get_gid() for line in ax.get_lines()}
    assert {"quality:0.5", "quality:0.75"} <= gids and "quality:0.25" not in gids
    line = _line(ax, "quality:0.75")
    # it ends at the critical point, where every quality line meets (common practice)
    assert line.get_xdata()[-1] == pytest.approx(envelope.critical[0] - 273.15)


def test_reference_points_are_coolprops_bubble_points(envelope):
    pytest.importorskip("CoolProp")
    ax = plots.plot_phase_envelope(envelope, reference="auto")
    points = _line(ax, "reference-bubble")
    T = np.asarray(points.get_xdata(), float) + 273.15
    assert T.size >= 3
    ref = reference_bubble_point(tr.Mixture({"methane": 0.5, "ethane": 0.5}), T=T)
    assert np.asarray(points.get_ydata(), float) == pytest.approx(np.asarray(ref.P) * 1e-5, rel=1e-9)
    assert _line(ax, "reference-dew").get_xdata().size >= 3


def test_bad_input():
    with pytest.raises(InputError, match="PhaseEnvelope"):
        plots.plot_phase_envelope("envelope")


def test_reference_option_is_checked(envelope):
    with pytest.raises(InputError, match="reference"):
        plots.plot_phase_envelope(envelope, reference="GERG")
