"""What only a browser shows: the state panel's collected-points table laid out in headless
Chromium (Debian's package, through Playwright) inside a column as wide as JupyterLab's
output area in a 1300 px window (1120 px with the file browser folded; issue 8 measured a
1216 px column), at the widget font size and a larger one."""

from __future__ import annotations

import os
from pathlib import Path

import pytest

from tests.widgets.test_state_panel import two_collected_rows

from tests.browser.test_state_point_browser import CHROMIUM, _need_chromium
ARGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
        "--disable-component-update", "--disable-sync", "--no-first-run"]
COLUMN_PX = 1120       # JupyterLab's output area in a 1300 px window, file browser folded (measured)


def _collected_table() -> str:
    return two_collected_rows().table_html.value


@pytest.mark.parametrize("font", ["13px", "15px"])
def test_the_collected_table_stays_inside_the_output_column(font):
    _need_chromium()
    from playwright.sync_api import sync_playwright

    content = (f"<html><body style='font-family:sans-serif;font-size:{font};margin:0'>"
               f"<div id='column' style='width:{COLUMN_PX}px;overflow:hidden'>{_collected_table()}</div>"
               "</body></html>")
    with sync_playwright() as pw:
        browser = pw.chromium.launch(executable_path=str(CHROMIUM), args=ARGS)
        try:
            page = browser.new_page(viewport={"width": 1300, "height": 900})
            page.set_content(content)
            box = page.evaluate("""() => {
                const column = document.querySelector('#column').getBoundingClientRect();
                const scroll = document.querySelector('#column .tr-scroll');
                const table = scroll.querySelector('table').getBoundingClientRect();
                return {column: column.right, scroll: scroll.getBoundingClientRect().right,
                        table: table.right, hidden: scroll.scrollWidth - scroll.clientWidth,
                        scrolls: getComputedStyle(scroll).overflowX};
            }""")
        finally:
            browser.close()
    assert box["scroll"] <= box["column"] + 0.5          # the box never spills past the column
    assert box["scrolls"] == "auto"                       # a wider table scrolls, is never clipped
    assert box["table"] <= box["column"] + 0.5, box       # and this one fits without scrolling
