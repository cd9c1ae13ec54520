"""Rendering shared by the panels: HTML tables, the caution, the convergence line, one
figure drawn into one image widget, a debounced redraw and a CSV download link."""

from __future__ import annotations

import asyncio
import base64
import html
import io

import numpy as np

from .. import CAUTION
from ..quantities import convert

_TABLE = "border-collapse:collapse;margin:0 18px 8px 0;font-size:0.92em"
_CELL = "padding:2px 8px;border-bottom:1px solid #ddd;text-align:left"
_CAPTION = "text-align:left;font-weight:bold;padding:2px 0 4px 0"
_MARK_CLASS = " class='tr-large'"


def in_unit(value, quantity: str, unit: str) -> float:
    """A SI value of a known quantity expressed in ``unit`` (e.g. K -> degC)."""
    return float(convert(value, quantity, unit))


def fmt(x, digits: int = 5) -> str:
    """A number for a table: '-' for None or NaN."""
    if x is None:
        return "-"
    try:
        if not np.isfinite(x):
            return "-"
    except TypeError:
        return html.escape(str(x))
    return f"{x:.{digits}g}"


def table(rows, *, header=None, caption=None, highlight=None, nowrap=False, wrap_header=False,
          wrap_columns=(), compact=False, marked=(), marked_style="") -> str:
    """An HTML table; ``rows`` of already formatted cells; ``highlight`` a row index to bold.

    ``marked`` is a collection of (row, column) cells drawn in ``marked_style`` (CSS), e.g.
    the deviations beyond a threshold; each such cell also carries the class ``tr-large``.

    ``nowrap`` keeps each cell on one line, except in the columns of ``wrap_columns`` (their
    text wraps at spaces within a moderate width); ``wrap_header`` still lets the column
    names wrap at their spaces ("reference rho [kg/m³]" on two lines); ``compact`` narrows
    the cell padding. All three narrow a wide table.
    """
    base = _CELL.replace("padding:2px 8px", "padding:2px 5px") if compact else _CELL
    cell = base + (";white-space:nowrap" if nowrap else "")
    wrapping = base + ";min-width:9em;max-width:16em"
    head_cell = base + ";vertical-align:bottom" if wrap_header else cell
    head = ""
    if header is not None:
        head = "<tr>" + "".join(f"<th style='{head_cell}'>{html.escape(h)}</th>" for h in header) + "</tr>"
    body = []
    for i, row in enumerate(rows):
        bold = ";font-weight:bold;background:#eef5ee" if i == highlight else ""
        cells = "".join(f"<td{_MARK_CLASS if (i, j) in marked else ''} style='"
                        f"{(wrapping if j in wrap_columns else cell) + bold}"
                        f"{';' + marked_style if (i, j) in marked else ''}'>{c}</td>"
                        for j, c in enumerate(row))
        body.append(f"<tr>{cells}</tr>")
    cap = f"<caption style='{_CAPTION}'>{html.escape(caption)}</caption>" if caption else ""
    return f"<table style='{_TABLE}'>{cap}{head}{''.join(body)}</table>"


def label_rows(rows) -> str:
    """(label, value) pairs as two-column rows, label in bold."""
    return [(f"<b>{html.escape(k)}</b>", html.escape(v)) for k, v in rows]


def caution_html() -> str:
    return ("<div style='border-left:4px solid #c77700;background:#fff6e5;padding:6px 10px;"
            f"margin:6px 0;font-size:0.9em'><b>Caution.</b> {html.escape(CAUTION)}</div>")


def block(content: str) -> str:
    """Wrap panel HTML so it reads as a document, not at the widgets' one-line height."""
    return f"<div style='line-height:1.35;white-space:normal'>{content}</div>"


def scroll_box(content: str) -> str:
    """Content no wider than the output area: scrolls sideways there instead of being clipped."""
    return (f"<div class='tr-scroll' style='max-width:100%;overflow-x:auto;box-sizing:border-box'>"
            f"{content}</div>")


def fluid_label(fluid) -> str:
    """A fluid's name as engineers write it: a library fluid's ``name`` is its everyday name
    ("carbon dioxide"), a user fluid's the name it was given."""
    return str(fluid.name)


def warnings_html(texts) -> str:
    """A result's warnings (plain sentences) as a list under a heading; empty for none."""
    if not texts:
        return ""
    items = "".join(f"<li>{html.escape(text)}</li>" for text in texts)
    return (f"<div class='tr-warnings' style='color:#8a1c1c;max-width:60em'><b>Warnings</b>"
            f"<ul style='margin:2px 0 4px 0'>{items}</ul></div>")


def side_by_side(*blocks: str) -> str:
    return ("<div style='display:flex;flex-wrap:wrap;align-items:flex-start'>"
            + "".join(f"<div>{b}</div>" for b in blocks) + "</div>")


def _item(x):
    a = np.asarray(x)
    return a.item() if a.size == 1 else a


def convergence_text(state) -> str:
    """One line on how the state was found: closed form, or the root finder's record and what
    it solved for (the saturation, or the state with the pair's two knowns)."""
    result = state.convergence
    names = [k.removesuffix("_mass") for k in state.knowns]          # as given: "rho", "h"
    knowns = {"v" if n == "rho" else n for n in names}                  # a density is a volume known
    energy = bool(knowns & {"h", "s", "u"})
    if result is None:
        if knowns == {"T", "P"}:
            return ("Closed form: the cubic in Z solved directly at this temperature and pressure "
                    "(no iteration).")
        if knowns == {"T", "v"}:
            return "Closed form: the pressure follows from the equation of state at this temperature and volume."
        lever = " The quality follows from the lever rule." if state.phase == "two-phase" else ""
        return f"Solved from {' and '.join(names)}; the solver kept no iteration record for this state.{lever}"
    if "quality" in knowns or (state.phase == "two-phase" and (not energy or bool(knowns & {"T", "P"}))):
        what = "saturation"
    elif knowns == {"P", "v"}:
        what = "temperature at this P and v"
    else:
        what = f"the state with this {' and '.join(names)}"
    return (f"Iterative ({what}): {result.method}, {_count(_item(result.iterations), 'iteration')}, "
            f"{_count(_item(result.evaluations), 'evaluation')}, {_item(result.status)}.")


def _count(n, word: str) -> str:
    """ "1 iteration", "12 iterations"."""
    return f"{n} {word}" if n == 1 else f"{n} {word}s"


def error_html(text: str) -> str:
    return (f"<div style='color:#b00020;margin:4px 0'><b>Not solved:</b> {html.escape(text)} "
            "The result below is the last one that solved.</div>")


def csv_link(text: str, filename: str, label: str = "Download table as CSV") -> str:
    """An HTML download link carrying the CSV text itself (works without a server)."""
    data = base64.b64encode(text.encode("utf-8")).decode("ascii")
    return (f"<a download='{html.escape(filename)}' href='data:text/csv;charset=utf-8;base64,{data}' "
            f"style='color:#1a5fb4;text-decoration:underline'>{html.escape(label)}</a>")


class FigureImage:
    """One matplotlib Figure (Agg, never shown by pyplot) drawn into one ipywidgets.Image.

    Each redraw clears the same figure and writes fresh PNG bytes into the same widget, so a
    notebook shows one picture that changes in place.
    """

    def __init__(self, figsize=(7.5, 4.6), dpi=100):
        import ipywidgets as w
        from matplotlib.backends.backend_agg import FigureCanvasAgg
        from matplotlib.figure import Figure

        self.figure = Figure(figsize=figsize, dpi=dpi, layout="constrained")
        FigureCanvasAgg(self.figure)
        self.image = w.Image(format="png", layout=w.Layout(max_width=f"{int(figsize[0] * dpi)}px"))
        self.draws = 0

    def clear(self):
        self.figure.clear()
        return self.figure

    def publish(self) -> None:
        buffer = io.BytesIO()
        self.figure.savefig(buffer, format="png")
        self.image.value = buffer.getvalue()
        self.draws += 1


class Debounced:
    """Call ``fn`` once a burst of changes has settled.

    With an event loop running (a live kernel) the call waits ``delay`` seconds and restarts
    the wait on each new change; without one (a script, a test) it runs at once.
    """

    def __init__(self, fn, delay: float = 0.2):
        self.fn, self.delay, self._handle = fn, delay, None

    def __call__(self, *_):
        try:
            loop = asyncio.get_running_loop()
        except RuntimeError:
            self.fn()
            return
        if self._handle is not None:
            self._handle.cancel()
        self._handle = loop.call_later(self.delay, self._fire)

    def _fire(self):
        self._handle = None
        self.fn()
