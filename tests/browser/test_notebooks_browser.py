"""Every notebook in a real browser, as a user opens it: JupyterLab on 127.0.0.1, headless
Chromium (Debian's package) through Playwright, "Run all", then the page is checked for what
only a browser shows (error outputs, pictures that did not render, pictures or tables wider
than the notebook column) and a screenshot of the whole notebook is kept in test-output/."""

from __future__ import annotations

import re

import pytest

from .lab_server import lab_server, run_all_cells
from .test_state_point_browser import ARGS, CHROMIUM, OUTPUT, REPO, TIMEOUT_MS, _need_chromium

NOTEBOOKS = sorted(p.name for p in (REPO / "notebooks").glob("*.ipynb"))
#: Pictures each notebook shows after "Run all" (01 is tables only).
PICTURES = {"01_state_point.ipynb": 0, "02_isotherm.ipynb": 3, "03_model_accuracy.ipynb": 2,
            "04_closed_vessel_heatup.ipynb": 1, "05_energy_duties.ipynb": 1, "06_mixtures.ipynb": 3}

#: JavaScript: every output picture and table, with its width and that of the cell's output area.
_MEASURE = """() => {
  // the right edge a reader must reach: a container of ours that scrolls on purpose (inline style
  // overflow-x auto or scroll) holds the rest; JupyterLab's and ipywidgets' own boxes do not count
  const visibleRight = (el, out) => {
    for (let a = el.parentElement; a && a !== out; a = a.parentElement) {
      if (['auto', 'scroll'].includes(a.style.overflowX || a.style.overflow)) return a.getBoundingClientRect().right;
    }
    return el.getBoundingClientRect().right;
  };
  return [...document.querySelectorAll('.jp-NotebookPanel:not(.lm-mod-hidden) .jp-OutputArea-output')]
  .flatMap(out => [...out.querySelectorAll('img, table')].map(el => ({
    tag: el.tagName, loaded: el.tagName !== 'IMG' || (el.complete && el.naturalWidth > 0),
    right: visibleRight(el, out), limit: out.getBoundingClientRect().right,
    text: (el.tagName === 'TABLE' ? (el.querySelector('caption') || el).innerText : el.alt || '').slice(0, 60)})));
}"""


def test_every_notebook_runs_in_chromium_and_fits_its_column(tmp_path):
    _need_chromium()
    from playwright.sync_api import expect, sync_playwright

    OUTPUT.mkdir(exist_ok=True)
    problems = []
    with lab_server(REPO / "notebooks", tmp_path) as (base, token, _root), sync_playwright() as pw:
        browser = pw.chromium.launch(executable_path=str(CHROMIUM), args=ARGS, timeout=TIMEOUT_MS)
        try:
            for name in NOTEBOOKS:
                # tall enough that the whole notebook is on screen, so the screenshot shows all of it
                page = browser.new_page(viewport={"width": 1300, "height": 7000})
                page.set_default_timeout(TIMEOUT_MS)
                expect.set_options(timeout=3 * TIMEOUT_MS)
                page.add_locator_handler(
                    page.get_by_role("dialog").filter(has_text="Select Kernel"),
                    lambda dialog: dialog.get_by_role("button", name="Select Kernel").click())
                page.goto(f"{base}/lab/tree/{name}?token={token}")
                kernel = page.locator(".jp-StatusBar-Widget", has_text="Python 3 (ipykernel) | Idle")
                expect(kernel).to_be_visible()
                expect(page.locator(".jp-NotebookPanel:not(.lm-mod-hidden) .jp-Notebook")).to_be_visible()
                file_list = page.locator(".jp-SideBar.jp-mod-left .lm-TabBar-tab.lm-mod-current")
                if file_list.count():             # fold the file list (the workspace remembers it folded)
                    file_list.click()
                run_all_cells(page)
                notebook = page.locator(".jp-NotebookPanel:not(.lm-mod-hidden)")
                # the last cell is the caution: its output appears once every cell before it has run
                expect(notebook.locator(".jp-OutputArea-output", has_text="Caution.").last).to_be_visible()
                expect(notebook.locator(".jp-InputPrompt", has_text="[*]")).to_have_count(0)
                expect(kernel).to_be_visible()
                page.wait_for_timeout(1500)           # pictures decode
                _screenshots(page, name.removesuffix(".ipynb"))
                errors = notebook.locator(".jp-OutputArea-output[data-mime-type='application/vnd.jupyter.stderr']",
                                          has_text=re.compile("Error|Traceback"))
                if errors.count():
                    problems.append(f"{name}: {errors.first.inner_text()[:800]}")
                items = page.evaluate(_MEASURE)
                pictures = [i for i in items if i["tag"] == "IMG"]
                if len(pictures) != PICTURES[name]:
                    problems.append(f"{name}: {len(pictures)} pictures, expected {PICTURES[name]}")
                if not all(i["loaded"] for i in items):
                    problems.append(f"{name}: a picture did not render")
                for i in items:
                    if i["right"] > i["limit"] + 1:
                        problems.append(f"{name}: {i['tag'].lower()} {i['text']!r} reaches {i['right']:.0f} px, "
                                        f"past the column's edge at {i['limit']:.0f} px (clipped)")
                page.close()
        finally:
            browser.close()
    assert not problems, "\n".join(problems)


def _screenshots(page, stem, piece=1600):
    """The whole notebook in screen-sized pieces: test-output/<stem>_browser_1.png, _2.png ..."""
    for old in OUTPUT.glob(f"{stem}_browser_*.png"):
        old.unlink()
    bottom = page.evaluate("""() => Math.max(...[...document.querySelectorAll(
        '.jp-NotebookPanel:not(.lm-mod-hidden) .jp-Cell')].map(c => c.getBoundingClientRect().bottom))""")
    height = page.viewport_size["height"]
    for k, top in enumerate(range(0, int(min(bottom + 40, height)), piece), start=1):
        page.screenshot(path=str(OUTPUT / f"{stem}_browser_{k}.png"),
                        clip={"x": 0, "y": top, "width": page.viewport_size["width"],
                              "height": min(piece, height - top)})
