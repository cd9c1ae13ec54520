"""The state-point notebook in a real browser: JupyterLab served on 127.0.0.1, opened in
headless Chromium (Debian's package) through Playwright, every cell run, the panel filled
in and solved by clicking, and the result and its reference deviation read off the page."""

from __future__ import annotations

import os
import re
from pathlib import Path

import pytest

import thermo_roots as tr
from thermo_roots.reference import cross_check

from .lab_server import lab_server, run_all_cells

CHROMIUM = Path("/usr/bin/chromium")
ARGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
        "--disable-component-update", "--disable-sync", "--no-first-run", "--disable-quic"]
REPO = Path(__file__).resolve().parents[2]
OUTPUT = REPO / "test-output"
TIMEOUT_MS = 90_000      # any one wait: page load, kernel start, a cell, a solve


def _need_chromium():
    if CHROMIUM.exists():
        return
    if os.environ.get("CI") == "true":
        pytest.fail(f"{CHROMIUM} is missing and CI=true: install Debian's chromium (apt-get install -y chromium).")
    pytest.skip(f"{CHROMIUM} is not installed (apt-get install -y chromium); the browser test needs it.")


def test_state_point_notebook_in_chromium(tmp_path):
    _need_chromium()
    from playwright.sync_api import expect, sync_playwright

    OUTPUT.mkdir(exist_ok=True)
    # what the page must show for TK-401: the library's own answer, computed here
    state = tr.solve(tr.PengRobinson(tr.get_fluid("CO2")), T="-20 degC", P="18 barg")
    deviation = f"{cross_check(state).deviation_rho_percent:+.3g} %"
    two = tr.solve(tr.PengRobinson(tr.get_fluid("propane")), T="20 degC", h="610 kJ/kg")
    second = dict(two.summary())["Second pressure with this T and h"]     # "3214.52 bar"

    with lab_server(REPO / "notebooks", tmp_path) as (base, token, _root), sync_playwright() as pw:
        browser = pw.chromium.launch(executable_path=str(CHROMIUM), args=ARGS, timeout=TIMEOUT_MS)
        try:
            page = browser.new_page(viewport={"width": 1300, "height": 1900})
            page.set_default_timeout(TIMEOUT_MS)
            expect.set_options(timeout=TIMEOUT_MS)
            # should JupyterLab still ask which kernel to start, take the notebook's own (python3)
            page.add_locator_handler(
                page.get_by_role("dialog").filter(has_text="Select Kernel"),
                lambda dialog: dialog.get_by_role("button", name="Select Kernel").click())
            page.goto(f"{base}/lab/tree/01_state_point.ipynb?token={token}")
            notebook = page.locator(".jp-NotebookPanel:not(.lm-mod-hidden) .jp-Notebook")
            expect(notebook).to_be_visible()
            kernel = page.locator(".jp-StatusBar-Widget", has_text="Python 3 (ipykernel) | Idle")
            expect(kernel).to_be_visible()        # the kernel has started and is ready
            page.locator(".jp-SideBar.jp-mod-left .lm-TabBar-tab.lm-mod-current").click()   # fold the file list
            expect(page.locator("#jp-left-stack")).to_be_hidden()

            run_all_cells(page)

            panels = page.locator(".thermo-roots-state-panel")
            expect(panels).to_have_count(2)        # V-212's panel, and the shift log's
            panel, log = panels.first, panels.last
            expect(panel).to_be_visible()
            result = panel.locator(".tr-result")
            expect(result).to_contain_text("V-212")           # the pre-filled solve ran
            for tag in ("V-212", "TK-401", "E-105"):           # ... and the log's cell
                expect(log.locator(".tr-table")).to_contain_text(tag)
            expect(result).not_to_contain_text("E-105")        # the first panel still shows what its text describes
            expect(page.locator(".jp-OutputArea-output", has_text="Caution.").last).to_be_visible()
            expect(kernel).to_be_visible()        # every cell has finished

            # fill the panel as a person would: TK-401, CO2 at -20 degC and 18 barg
            panel.locator(".tr-tag input").fill("TK-401 check")
            panel.locator(".tr-pair select").select_option(label="temperature and pressure")
            panel.locator(".tr-fluid input").fill("CO2")
            panel.locator(".tr-value-T input").fill("-20")
            panel.locator(".tr-unit-T select").select_option(label="°C")
            panel.locator(".tr-value-P input").fill("18")
            panel.locator(".tr-value-P input").press("Tab")
            panel.locator(".tr-unit-P select").select_option(label="barg")
            panel.locator("button.tr-solve").click()

            expect(result).to_contain_text("TK-401 check")
            expect(result).to_contain_text("Peng-Robinson")
            expect(result).to_contain_text("Against the reference equation")
            expect(result).to_contain_text(deviation)
            expect(result).to_contain_text("Caution.")
            expect(panel.locator(".tr-status")).to_have_text("")
            panel.scroll_into_view_if_needed()
            page.screenshot(path=str(OUTPUT / "state_point_browser.png"))

            # an energy pair: propane at 20 degC with h = 610 kJ/kg, which two pressures give
            panel.locator(".tr-fluid input").fill("propane")
            panel.locator(".tr-pair select").select_option(label="temperature and enthalpy")
            expect(panel.locator(".tr-value-P input")).to_be_hidden()
            expect(panel.locator(".tr-value-T input")).to_have_value("-20")     # the typed T stays
            panel.locator(".tr-value-T input").fill("20")
            panel.locator(".tr-value-h input").fill("610")
            panel.locator(".tr-value-h input").press("Tab")
            panel.locator(".tr-unit-h select").select_option(label="kJ/kg")
            panel.locator("button.tr-solve").click()
            expect(result).to_contain_text("propane")
            expect(result).to_contain_text(f"Second pressure with this T and h{second}")
            expect(result.locator(".tr-warnings")).to_contain_text("A second pressure")
            expect(panel.locator(".tr-status")).to_have_text("")
            result.scroll_into_view_if_needed()
            page.screenshot(path=str(OUTPUT / "state_point_browser_T_h.png"))
        finally:
            browser.close()
