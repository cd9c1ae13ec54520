"""The composition field in a real browser: JupyterLab on 127.0.0.1 with a one-cell notebook
made for the test, headless Chromium (Debian's package) through Playwright. A gas analysis in
mol % that does not close is pasted, the sum line read, Normalise pressed and the table read."""

from __future__ import annotations

import nbformat

from .lab_server import lab_server, run_all_cells
from .test_state_point_browser import ARGS, CHROMIUM, OUTPUT, TIMEOUT_MS, _need_chromium

#: Pasted as a person would: two spreadsheet columns, mol % summing to 99.5 (made up for the test).
PASTED = "methane\t85\nethane\t8\npropane\t6.5"
CELL = "from thermo_roots.widgets.composition import CompositionField\nfield = CompositionField()\nfield"
SCREENSHOT = "/tmp/composition_field_browser.png"
BEFORE = "/tmp/composition_field_browser_before.png"


def _notebook(folder):
    folder.mkdir()
    book = nbformat.v4.new_notebook(cells=[nbformat.v4.new_code_cell(CELL)])
    book.metadata["kernelspec"] = {"name": "python3", "display_name": "Python 3 (ipykernel)", "language": "python"}
    nbformat.write(book, folder / "composition.ipynb")
    return folder


def test_paste_sum_and_normalise_in_chromium(tmp_path):
    _need_chromium()
    from playwright.sync_api import expect, sync_playwright

    OUTPUT.mkdir(exist_ok=True)
    with lab_server(_notebook(tmp_path / "source"), tmp_path) as (base, token, _root), sync_playwright() as pw:
        browser = pw.chromium.launch(executable_path=str(CHROMIUM), args=ARGS, timeout=TIMEOUT_MS)
        try:
            page = browser.new_page(viewport={"width": 1100, "height": 800})
            page.set_default_timeout(TIMEOUT_MS)
            expect.set_options(timeout=TIMEOUT_MS)
            page.add_locator_handler(
                page.get_by_role("dialog").filter(has_text="Select Kernel"),
                lambda dialog: dialog.get_by_role("button", name="Select Kernel").click())
            page.goto(f"{base}/lab/tree/composition.ipynb?token={token}")
            kernel = page.locator(".jp-StatusBar-Widget", has_text="Python 3 (ipykernel) | Idle")
            expect(kernel).to_be_visible()
            file_list = page.locator(".jp-SideBar.jp-mod-left .lm-TabBar-tab.lm-mod-current")
            if file_list.count():
                file_list.click()
            run_all_cells(page)

            field = page.locator(".tr-composition")
            expect(field).to_have_count(1)
            expect(field.locator(".tr-composition-sum")).to_contain_text("No components yet")
            box = field.locator(".tr-composition-text textarea")
            box.fill(PASTED)
            box.press("Tab")                                  # leaving the box reads it, as a paste then click does
            summary = field.locator(".tr-composition-sum")
            expect(summary).to_contain_text("Sum of mole fractions 0.995")
            expect(summary).to_contain_text("press Normalise")
            expect(field.locator(".tr-composition-note")).to_contain_text("read as mole percent")
            fractions = field.locator(".tr-fraction input")
            expect(fractions).to_have_count(3)
            expect(fractions.first).to_have_value("0.85")
            field.screenshot(path=BEFORE)

            field.locator("button.tr-normalise").click()
            expect(fractions.first).to_have_value(f"{0.85 / 0.995:.6g}")
            expect(fractions.last).to_have_value(f"{0.065 / 0.995:.6g}")
            expect(summary).to_contain_text("Sum of mole fractions 1")
            expect(summary).to_contain_text("g/mol")
            expect(field.locator(".tr-composition-note")).to_contain_text("multiplied by 1.00503")
            expect(box).to_have_value(f"methane {0.85 / 0.995:.6g}\nethane {0.08 / 0.995:.6g}\n"
                                      f"propane {0.065 / 0.995:.6g}")
            page.wait_for_timeout(300)                        # the last redraw settles before the picture
            field.screenshot(path=SCREENSHOT)
            field.screenshot(path=str(OUTPUT / "composition_field_browser.png"))
        finally:
            browser.close()
