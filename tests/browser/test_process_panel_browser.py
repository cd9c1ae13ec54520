"""The process panel of notebook 05 in a real browser: JupyterLab on 127.0.0.1, headless Chromium
(Debian's package) through Playwright, "Run all", then the panel's tables, warnings, caution and
its P-h diagram read off the page; a refused efficiency typed and clicked, then a good one."""

from __future__ import annotations

import re

import thermo_roots as tr
from thermo_roots import steps
from thermo_roots.demo import EQUIPMENT

from .lab_server import lab_server, run_all_cells
from .test_state_point_browser import ARGS, CHROMIUM, OUTPUT, REPO, TIMEOUT_MS, _need_chromium


def test_process_panel_renders_its_step_and_diagram_in_chromium(tmp_path):
    _need_chromium()
    from playwright.sync_api import expect, sync_playwright

    OUTPUT.mkdir(exist_ok=True)
    # what the page must show: the library's own K-101 step, computed here, at two efficiencies
    k101 = EQUIPMENT["K-101"]
    model = tr.PengRobinson(tr.get_fluid(k101.fluid))
    inlet = tr.solve(model, **k101.duty)
    first = steps.compress(model, inlet, k101.outlet_pressure, efficiency=k101.efficiency)
    second = steps.compress(model, inlet, k101.outlet_pressure, efficiency=0.6)

    with lab_server(REPO / "notebooks", tmp_path) as (base, token, _root), sync_playwright() as pw:
        browser = pw.chromium.launch(executable_path=str(CHROMIUM), args=ARGS, timeout=TIMEOUT_MS)
        try:
            page = browser.new_page(viewport={"width": 1300, "height": 1700})
            page.set_default_timeout(TIMEOUT_MS)
            expect.set_options(timeout=TIMEOUT_MS)
            page.add_locator_handler(
                page.get_by_role("dialog").filter(has_text="Select Kernel"),
                lambda dialog: dialog.get_by_role("button", name="Select Kernel").click())
            page.goto(f"{base}/lab/tree/05_energy_duties.ipynb?token={token}")
            kernel = page.locator(".jp-StatusBar-Widget", has_text="Python 3 (ipykernel) | Idle")
            expect(kernel).to_be_visible()
            file_list = page.locator(".jp-SideBar.jp-mod-left .lm-TabBar-tab.lm-mod-current")
            if file_list.count():
                file_list.click()
            run_all_cells(page)

            panel = page.locator(".thermo-roots-process-panel")
            expect(panel).to_have_count(1)
            result = panel.locator(".tr-result")
            expect(result).to_contain_text("K-101")
            expect(result).to_contain_text("reference outlet")
            expect(result).to_contain_text(f"{first.work_mass / 1e3:.5g}")
            expect(result).to_contain_text(f"{first.deviation_work_percent:+.3g} %")
            expect(result).to_contain_text("Caution.")
            diagram = panel.locator(".tr-diagram img, img.tr-diagram").first
            expect(diagram).to_be_visible()
            page.wait_for_function("img => img.complete && img.naturalWidth > 600", arg=diagram.element_handle())

            # a refused efficiency: the message beside the field, the previous result kept
            efficiency = panel.locator(".tr-efficiency input")
            efficiency.fill("1.5")
            efficiency.press("Enter")
            panel.locator("button.tr-run").click()
            expect(panel.locator(".tr-status")).to_contain_text("not possible")
            expect(panel).to_contain_text("at most 1")
            expect(result).to_contain_text(f"{first.work_mass / 1e3:.5g}")
            expect(efficiency).to_have_value("1.5")

            efficiency.fill("0.6")
            efficiency.press("Enter")
            panel.locator("button.tr-run").click()
            expect(result).to_contain_text(f"{second.work_mass / 1e3:.5g}")
            expect(panel.locator(".tr-status")).to_have_text("")
            expect(kernel).to_be_visible()
            page.wait_for_timeout(1000)          # the redrawn picture decodes
            panel.scroll_into_view_if_needed()
            box = panel.bounding_box()
            page.set_viewport_size({"width": 1300, "height": int(box["height"]) + 200})
            panel.screenshot(path=str(OUTPUT / "process_panel_browser.png"))
        finally:
            browser.close()
