"""StatePanel: fields in, library state out, every root and the reference check shown."""

import base64
import io
import re

import CoolProp.CoolProp as CP
import pandas as pd
import pytest

import thermo_roots as tr
from thermo_roots.widgets import StatePanel
from thermo_roots.widgets.state_panel import PAIRS, TABLE_COLUMNS

#: ISO 2533 standard atmosphere, the default reference of gauge pressures [Pa].
ATM = 101325.0


def test_prefilled_gauge_state_matches_the_library_and_coolprop():
    panel = StatePanel(fluid="propane", model="PR", T="20 degC", P="7 barg", tag="V-212")
    state = panel.solve()
    assert panel.error is None and state is panel.result
    assert state.T == pytest.approx(293.15) and state.P == pytest.approx(7e5 + ATM)
    assert state.v == pytest.approx(tr.solve(tr.PengRobinson(tr.get_fluid("propane")), T=293.15, P=7e5 + ATM).v)
    # CoolProp's reference equation for propane (Lemmon et al. 2009): PR vapour density
    # within 1 % here, well inside the several percent expected of a cubic (common practice).
    rho_ref = CP.PropsSI("D", "T", 293.15, "P", 7e5 + ATM, "Propane")
    assert state.rho_mass == pytest.approx(rho_ref, rel=0.01)
    assert panel.check.reference_rho_mass == pytest.approx(rho_ref, rel=1e-9)
    shown = panel.output.value
    for text in ("vapor-like", "liquid-like", "unstable", "yes: lowest Gibbs energy", "V-212",
                 f"{panel.check.deviation_rho_percent:+.3g} %", "Closed form"):
        assert text in shown
    assert tr.CAUTION.split(";")[0] in shown


@pytest.mark.parametrize("pair", [p for _, p in PAIRS], ids=lambda p: "-".join(p))
def test_every_pair_gives_the_library_state(pair):
    values = {"T": "10 degC", "P": "6 bar", "v": "1.2 L/mol", "rho": "300 kg/m^3", "quality": "0.25",
              "h": "600 kJ/kg", "s": "2.4 kJ/(kg K)", "u": "300 kJ/kg"}
    panel = StatePanel(fluid="propane", model="SRK", **{q: values[q] for q in pair})
    state = panel.solve()
    assert panel.error is None, panel.error
    model = tr.SoaveRedlichKwong(tr.get_fluid("propane"))
    direct = tr.solve(model, **{("rho_mass" if q == "rho" else q): values[q] for q in pair})
    assert state.T == pytest.approx(direct.T, rel=1e-12)
    assert state.P == pytest.approx(direct.P, rel=1e-12)
    assert state.v == pytest.approx(direct.v, rel=1e-12)
    assert state.phase == direct.phase
    assert state.quality == pytest.approx(direct.quality, rel=1e-12, nan_ok=True)
    assert state.P_other == pytest.approx(direct.P_other, rel=1e-12, nan_ok=True)
    closed = set(pair) in ({"T", "P"}, {"T", "v"}, {"T", "rho"})
    line = "Closed form" if closed else "Iterative" if direct.convergence is not None else "Solved from"
    assert line in panel.output.value


def test_unit_selector_converts():
    # 68 degF is exactly 20 degC (NIST SP 811, 2008, B.8); 116.03 psi is about 8 bar.
    panel = StatePanel(fluid="propane", model="PR", T="68", P="116.030")
    panel.fields["T"].unit.value = "degF"
    panel.fields["P"].unit.value = "psi"
    state = panel.solve()
    assert state.T == pytest.approx(293.15, abs=1e-9)
    assert state.P == pytest.approx(116.030 * 6894.757293168, rel=1e-12)  # psi in Pa (NIST SP 811)


def test_a_unit_typed_in_the_box_wins_over_the_selector():
    panel = StatePanel(fluid="CO2", model="PR", T="20 degC", P="1 bar")
    panel.fields["P"].text.value = "50 bar(g)"
    assert panel.solve().P == pytest.approx(50e5 + ATM)


def test_bad_input_keeps_the_previous_result_and_table():
    panel = StatePanel(fluid="propane", model="PR", T="20 degC", P="8 bar")
    good = panel.solve()
    panel.add_to_table()
    html_before, table_before = panel.output.value, panel.table.copy()
    for field, text, words in (("T", "warm", "write a number in °C"), ("T", "-300 degC", "above zero"),
                               ("P", "8 metres", "wrong kind")):
        panel.fields[field].text.value = text
        assert panel.solve() is None
        assert words in panel.error
        assert words in panel.fields[field].message.value       # beside the field
        assert panel.result is good and panel.output.value == html_before
        pd.testing.assert_frame_equal(panel.table, table_before)
        assert text in (panel.fields[field].text.value, panel.fields[field].entered())   # nothing typed is lost
        panel.fields[field].text.value = {"T": "20 degC", "P": "8 bar"}[field]
    assert panel.solve() is not None and panel.error is None
    assert panel.fields["T"].message.value == ""


def test_volume_below_the_covolume_is_shown_beside_the_volume():
    panel = StatePanel(fluid="propane", model="PR", T="20 degC", P="8 bar")
    good = panel.solve()
    panel.pair.value = ("T", "v")
    panel.fields["v"].text.value = "0.01"
    panel.fields["v"].unit.value = "L/mol"
    assert panel.solve() is None and panel.result is good
    assert "co-volume" in panel.fields["v"].message.value


def test_unknown_fluid_suggests_names():
    panel = StatePanel(fluid="propain", model="PR", T="20 degC", P="8 bar")
    assert panel.solve() is None
    assert "Propane" in panel.error and "Did you mean" in panel.fluid_field.message.value


def test_custom_fluid_equals_the_library_fluid_with_the_same_constants():
    lib = tr.get_fluid("propane")
    panel = StatePanel(fluid=lib, model="PR", T="20 degC", P="20 bar")   # shown as custom fields
    assert panel.fluid_field.is_custom
    state = panel.solve()
    direct = tr.solve(tr.PengRobinson(lib), T="20 degC", P="20 bar")
    assert state.v == pytest.approx(direct.v, rel=1e-5)   # constants shown to 6 digits
    assert not panel.check.available                      # no reference equation for a user fluid
    assert "not available" in panel.output.value


def test_volume_translation_moves_liquid_density_toward_the_reference():
    # Peneloux et al. (1982): translation corrects the cubic's liquid volume; propane liquid
    # at 20 degC, 20 bar against CoolProp's reference equation.
    plain = StatePanel(fluid="propane", model="PR", T="20 degC", P="20 bar")
    shifted = StatePanel(fluid="propane", model="PR", volume_shift="peneloux", T="20 degC", P="20 bar")
    plain.solve(), shifted.solve()
    assert shifted.result.phase == "liquid" and "translated" in shifted.result.model.name
    assert abs(shifted.check.deviation_rho_percent) < abs(plain.check.deviation_rho_percent)


def two_collected_rows():
    """A state panel with two of the demo site's states collected (TK-401, PV-330)."""
    panel = StatePanel(fluid="CO2", model="PR", T="-20 degC", P="18 barg", tag="TK-401")
    panel.solve()
    panel.add_to_table()
    panel.tag.value = "PV-330"
    panel.pair.value = ("T", "rho")
    panel.fields["T"].set("40 degC")
    panel.fields["rho"].set("400 kg/m^3")
    panel.solve()
    panel.add_to_table()
    return panel


def test_table_exports_csv_that_reads_back_equal():
    panel = two_collected_rows()
    table = panel.table
    assert list(table["tag"]) == ["TK-401", "PV-330"]
    assert list(table["phase"]) == [panel.table["phase"][0], panel.result.phase]
    text = panel.table_csv()
    back = pd.read_csv(io.StringIO(text), keep_default_na=True)
    back["reference phase"] = back["reference phase"].fillna("")
    pd.testing.assert_frame_equal(back, table, check_dtype=False, rtol=1e-12)
    link = re.search(r"base64,([A-Za-z0-9+/=]+)", panel.download.value).group(1)
    assert base64.b64decode(link).decode() == text
    assert table["rho [kg/m³]"][1] == pytest.approx(400.0)


def test_add_before_solve_says_so():
    panel = StatePanel(fluid="propane", T="20 degC", P="8 bar")
    assert panel.add_to_table().empty
    assert "Solve a state first" in panel.error


def test_two_phase_state_shows_quality_and_saturation_roots():
    panel = StatePanel(fluid="ammonia", model="PR", T="35 degC", quality="0.4", tag="E-105")
    state = panel.solve()
    sat = tr.saturation(tr.PengRobinson(tr.get_fluid("ammonia")), T=308.15)
    assert state.P == pytest.approx(sat.P, rel=1e-12)
    # CoolProp (Gao et al. 2020 ammonia equation): PR saturation pressure within 3 % at 35 degC.
    assert state.P == pytest.approx(CP.PropsSI("P", "T", 308.15, "Q", 0, "Ammonia"), rel=0.03)
    assert re.search("Vapou?r quality", panel.output.value) and "at the saturation pressure" in panel.output.value
    assert "Iterative (saturation)" in panel.output.value


def test_pair_from_keywords_is_checked():
    with pytest.raises(tr.ThermoRootsError, match="pairs of knowns"):
        StatePanel(fluid="propane", v="1 L/mol", rho="300 kg/m^3")
    assert StatePanel(T="20 degC", rho_mass=500.0).fields["rho"].unit.value == "kg/m^3"
    assert StatePanel().table.shape == (0, len(TABLE_COLUMNS))


def _marked_rows(html_text):
    """The quantity of every row whose deviation cell is marked large in the panel's HTML."""
    rows = re.findall(r"<tr>(.*?)</tr>", html_text)
    out = []
    for row in rows:
        cells = re.findall(r"<td([^>]*)>(.*?)</td>", row)
        if any("tr-large" in attrs for attrs, _ in cells):
            out.append(re.sub("<[^>]+>", "", cells[0][1]))
    return out


def test_large_deviations_are_marked_with_a_legend_that_says_the_threshold():
    from thermo_roots.reference import LARGE_DEVIATION_PERCENT, LARGE_DEVIATION_STYLE

    # Liquid CO2 at 20 degC and 60 bar: Peng-Robinson's liquid density is several percent off the
    # Span-Wagner reference equation (CoolProp); liquid density is the cubic's weak spot (common practice).
    panel = StatePanel(fluid="CO2", model="PR", T="20 degC", P="60 bar")
    panel.solve()
    flags = panel.check.large_deviations()
    expected = [row[0] for row, large in zip(panel.check.rows(), flags) if large]
    assert "Mass density [kg/m³]" in expected
    rho_ref = CP.PropsSI("D", "T", 293.15, "P", 60e5, "CarbonDioxide")
    assert abs(panel.result.rho_mass / rho_ref - 1) * 100 > LARGE_DEVIATION_PERCENT
    shown = panel.output.value
    assert _marked_rows(shown) == [html_escape(q) for q in expected]
    assert LARGE_DEVIATION_STYLE in shown
    assert f"±{LARGE_DEVIATION_PERCENT:g} %" in shown          # the legend names the threshold
    # propane vapor at 20 degC, 2 bar: within a few percent everywhere, nothing marked
    calm = StatePanel(fluid="propane", model="PR", T="20 degC", P="2 bar")
    calm.solve()
    assert not any(calm.check.large_deviations())
    assert _marked_rows(calm.output.value) == []


def html_escape(text):
    import html

    return html.escape(text)
