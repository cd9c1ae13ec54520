"""The two mixture panels in a real browser: JupyterLab on 127.0.0.1 with a notebook made for
the test (the invented site's LPG flash drum and fuel-gas letdown), headless Chromium
(Debian's package) through Playwright, "Run all", then the state, the reference check (a
click), the envelope's special points, its picture and the operating point's sentence read
off the page. What the page must show is the library's own answer, computed here."""

from __future__ import annotations

import nbformat

import thermo_roots as tr
from thermo_roots.demo import MIXTURE_EQUIPMENT
from thermo_roots.equilibrium.envelope import phase_envelope

from .lab_server import lab_server, open_notebook
from .test_state_point_browser import ARGS, CHROMIUM, OUTPUT, TIMEOUT_MS, _need_chromium

CELLS = (
    "from thermo_roots.demo import MIXTURE_EQUIPMENT\n"
    "from thermo_roots.widgets.mixture_panel import MixturePanel\n"
    "from thermo_roots.widgets.envelope_panel import EnvelopePanel",
    "drum = MIXTURE_EQUIPMENT['V-640']\n"
    "state_panel = MixturePanel(drum.mixture(), 'PR', T='22 degC', P='6.5 bar', tag='V-640')\n"
    "state_panel.solve()\nstate_panel",
    "gas = MIXTURE_EQUIPMENT['PCV-610']\n"
    "envelope_panel = EnvelopePanel(gas.mixture(), 'PR', T='-30 degC', P='20 bar', tag='PCV-610')\n"
    "envelope_panel.trace()\nenvelope_panel",
)
SCREENSHOTS = {"state": "/tmp/mixture_panel_browser.png", "envelope": "/tmp/envelope_panel_browser.png"}


def _notebook(folder):
    folder.mkdir()
    book = nbformat.v4.new_notebook(cells=[nbformat.v4.new_code_cell(c) for c in CELLS])
    book.metadata["kernelspec"] = {"name": "python3", "display_name": "Python 3 (ipykernel)", "language": "python"}
    nbformat.write(book, folder / "mixtures.ipynb")
    return folder


def test_mixture_state_and_envelope_panels_render_in_chromium(tmp_path):
    _need_chromium()
    from playwright.sync_api import expect, sync_playwright

    OUTPUT.mkdir(exist_ok=True)

    with lab_server(_notebook(tmp_path / "source"), tmp_path) as (base, token, _root), sync_playwright() as pw:
        browser = pw.chromium.launch(executable_path=str(CHROMIUM), args=ARGS, timeout=TIMEOUT_MS)
        try:
            page = browser.new_page(viewport={"width": 1300, "height": 1600})
            open_notebook(page, base, token, "mixtures.ipynb", timeout_ms=TIMEOUT_MS)
            # the expected values, computed while the kernel runs the cells (on the other core)
            drum = tr.solve(tr.PengRobinson(MIXTURE_EQUIPMENT["V-640"].mixture(), kij="fitted"), T="22 degC",
                            P="6.5 bar")
            envelope = phase_envelope(tr.PengRobinson(MIXTURE_EQUIPMENT["PCV-610"].mixture(), kij="fitted"))
            cricondentherm = f"{envelope.cricondentherm[0] - 273.15:.5g} °C, {envelope.cricondentherm[1] / 1e5:.5g} bar"

            panel = page.locator(".thermo-roots-mixture-panel")
            result = panel.locator(".tr-result")
            expect(result).to_contain_text("V-640")
            expect(result).to_contain_text("two-phase")
            expect(result).to_contain_text(f"{drum.vapor_fraction:.6g}")
            expect(result).to_contain_text(f"{drum.x[1]:.6g}")         # propane in the liquid
            expect(result).to_contain_text("Caution.")
            panel.locator("button.tr-check-reference").click()
            expect(panel.locator(".tr-reference")).to_contain_text("Against the reference mixture model")
            expect(panel.locator(".tr-reference")).to_contain_text("x reference")
            panel.scroll_into_view_if_needed()
            panel.screenshot(path=SCREENSHOTS["state"])

            env = page.locator(".thermo-roots-envelope-panel")
            expect(env.locator(".tr-envelope-summary")).to_contain_text(cricondentherm)
            expect(env.locator(".tr-operating-point")).to_contain_text("outside the envelope")
            expect(env.locator(".tr-operating-point")).to_contain_text("dew side")
            picture = env.locator("img.tr-envelope-plot")
            expect(picture).to_be_visible()
            page.wait_for_function("img => img.complete && img.naturalWidth > 600", arg=picture.element_handle())
            env.scroll_into_view_if_needed()
            env.screenshot(path=SCREENSHOTS["envelope"])
            panel.screenshot(path=str(OUTPUT / "mixture_panel_browser.png"))
            env.screenshot(path=str(OUTPUT / "envelope_panel_browser.png"))
        finally:
            browser.close()
