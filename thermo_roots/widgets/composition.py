"""CompositionField: a mixture's composition, pasted as text or edited in a small table.

The text box and the table show one composition: reading pasted text fills the table, and an
edit in the table (or Normalise) writes the table back into the text box. The field's
``value`` is the :class:`~thermo_roots.Mixture` the table describes, or None while it does not
describe one (an unknown name, an unreadable number, fractions that do not sum to 1); the
reason is shown beside the field and ``last_valid`` keeps the last good mixture. The library
reads and judges everything (``read_composition_text``, ``component_from_text``, ``Mixture``);
this module only moves text between widgets.
"""

from __future__ import annotations

import html
import math
from collections.abc import Mapping

import ipywidgets as w
import traitlets

from ..errors import ThermoRootsError, UnknownFluidError, WrongTypeError
from ..fluids import Fluid, display_name, fluid_names
from ..mixtures import Mixture, component_from_text, fraction_from_text, read_composition_text
from ._inputs import _label, message_html

#: Digits of a mole fraction written into the table and the text box (the table keeps the
#: exact value behind a cell until the cell is edited, so a normalised sum stays exactly 1).
SHOWN_DIGITS = 6

_NOTE_STYLE = "color:#555;font-size:0.9em"
_PLACEHOLDER = ("Paste or type, e.g.\nmethane 0.85, ethane 0.08, propane 0.07\n"
                "or two columns copied from a spreadsheet")
_COLUMNS = "220px 120px 34px auto"


def _shown(fraction: float) -> str:
    return f"{fraction:.{SHOWN_DIGITS}g}"


class _Row:
    """One component of the table: its name, its mole fraction and a remove button."""

    def __init__(self, name: str, fraction, options, on_edit, on_remove):
        self.name = w.Combobox(value=name, options=options, ensure_option=False, continuous_update=False,
                               placeholder="name, e.g. methane", layout=w.Layout(width="210px"))
        self.fraction = w.Text(continuous_update=False, placeholder="e.g. 0.08", layout=w.Layout(width="110px"))
        self.remove = w.Button(icon="times", tooltip="Remove this component",
                               layout=w.Layout(width="30px", padding="0"))
        self.message = w.HTML()
        self.name.add_class("tr-component")
        self.fraction.add_class("tr-fraction")
        self.remove.add_class("tr-remove")
        self._exact = None          # (shown text, exact value) of a fraction set from Python
        self.set_fraction(fraction)
        self.name.observe(on_edit, "value")
        self.fraction.observe(on_edit, "value")
        self.remove.on_click(lambda _: on_remove(self))

    @property
    def widgets(self) -> list:
        return [self.name, self.fraction, self.remove, self.message]

    def set_fraction(self, fraction) -> None:
        """A number (kept exactly behind its rounded text) or a text as typed."""
        if isinstance(fraction, str):
            self._exact = None
            self.fraction.value = fraction
        else:
            text = _shown(float(fraction))
            self._exact = (text, float(fraction))
            self.fraction.value = text

    def is_blank(self) -> bool:
        return not self.name.value.strip() and not self.fraction.value.strip()

    def read_fraction(self, who: str) -> float:
        text = self.fraction.value.strip()
        if self._exact is not None and text == self._exact[0]:
            return self._exact[1]
        return fraction_from_text(text, who)


class CompositionField(w.VBox):
    """A mixture's composition: a text box to paste into and a table of components, kept in sync.

    Parameters
    ----------
    composition : str, mapping, sequence of pairs, Mixture or None
        The starting composition: text as :meth:`Mixture.from_text` reads it
        (``"methane 0.85, ethane 0.08, propane 0.07"``), or what :class:`Mixture` takes
        (``{"methane": 0.85, ...}``) with mole fractions [-]. None: an empty table. A
        :class:`~thermo_roots.Fluid` of one's own is shown by its name, and that name then
        stands for it in the table and the text box.
    label : str
        The field's name on screen.

    Attributes
    ----------
    value : Mixture or None
        A traitlet: the mixture the table describes, None while it describes none (the
        reason in :attr:`error`). ``field.observe(handler, "value")`` reacts to it.
    last_valid : Mixture or None
        A traitlet: the last mixture :attr:`value` held, kept while the input is invalid.
    error : str or None
        Why :attr:`value` is None, as shown beside the field; None when it is not.
    note : str
        The last remark on how text was read (percent, a header skipped) or what Normalise
        changed; "" when there is none.

    Notes
    -----
    Text is read when the box loses focus (or its ``value`` is set from Python). An empty
    row of the table is ignored; a fraction cell takes "0.85", "0,85" or "85 %".

    References
    ----------
    Names are looked up in CoolProp's fluid library (Bell, I. H. et al. (2014), Ind. Eng.
    Chem. Res. 53, 2498-2508) through :func:`thermo_roots.get_fluid`; gas-analysis shorthand
    (C1, iC4, nC5) is read as common practice has it.
    """

    value = traitlets.Instance(Mixture, allow_none=True)
    last_valid = traitlets.Instance(Mixture, allow_none=True)

    def __init__(self, composition=None, *, label: str = "Composition"):
        self.error = None
        self.note = ""
        self._syncing = False
        self._custom = {}         # the user's own Fluids given to set(), by name
        self._options = sorted({display_name(n) for n in fluid_names()}, key=str.lower)
        self.text = w.Textarea(placeholder=_PLACEHOLDER, continuous_update=False,
                               layout=w.Layout(width="374px", height="76px"))
        self.text_message = w.HTML(layout=w.Layout(max_width="420px"))
        self.rows: list[_Row] = []
        self.grid = w.GridBox(layout=w.Layout(grid_template_columns=_COLUMNS, grid_gap="2px 4px",
                                              align_items="center", width="fit-content"))
        self.add_button = w.Button(description="Add a component", icon="plus",
                                   layout=w.Layout(width="170px"))
        self.normalise_button = w.Button(description="Normalise", icon="balance-scale",
                                         tooltip="Divide every mole fraction by their sum, so they add up to 1",
                                         layout=w.Layout(width="120px"))
        self.summary = w.HTML()
        self.notes = w.HTML()
        for widget, name in ((self.text, "tr-composition-text"), (self.add_button, "tr-add-component"),
                             (self.normalise_button, "tr-normalise"), (self.summary, "tr-composition-sum"),
                             (self.notes, "tr-composition-note"), (self.grid, "tr-composition-table")):
            widget.add_class(name)
        self.text.observe(self._text_edited, "value")
        self.add_button.on_click(lambda _: self.add_row())
        self.normalise_button.on_click(lambda _: self.normalise())
        hint = w.HTML(f"<span style='{_NOTE_STYLE}'>Paste names with mole fractions or mol % (a list, or two "
                      "columns from a spreadsheet), or edit the table; the two stay in step.</span>")
        body = w.VBox([
            hint,
            w.HBox([self.text, self.text_message], layout=w.Layout(align_items="flex-start")),
            self.grid,
            w.HBox([self.add_button, self.normalise_button]),
            self.summary, self.notes,
        ])
        title = _label(label)
        title.layout.flex = "0 0 auto"          # the label column keeps its width beside a long message
        super().__init__([w.HBox([title, body], layout=w.Layout(align_items="flex-start"))])
        self.add_class("tr-composition")
        self._fill([])
        self.set(composition)

    # -- filling from Python
    def set(self, composition) -> None:
        """Show a composition: text (read as if pasted), a mapping, pairs, a Mixture, or None."""
        if isinstance(composition, str):
            if self.text.value == composition:
                self._read_text(composition)        # the same text again: the observer stays quiet
            else:
                self.text.value = composition       # read by the observer, as a paste is
            return
        pairs = [] if composition is None else _pairs_of(composition)
        self._custom.update({f.name: f for f, _ in pairs if isinstance(f, Fluid) and f.library_name is None})
        self._fill([(getattr(f, "name", f), z) for f, z in pairs])
        self._write_text()
        self._show_note("")
        self._judge()

    def add_row(self, name: str = "", fraction="") -> None:
        """Add a row to the table (empty rows are ignored until filled)."""
        self.rows.append(_Row(name, fraction, self._options, self._row_edited, self.remove_row))
        self._lay_out()
        if name or fraction != "":
            self._table_edited()

    def remove_row(self, row) -> None:
        """Remove a row, given as its index or the row itself."""
        row = self.rows[row] if isinstance(row, int) else row
        self.rows.remove(row)
        for widget in row.widgets:
            widget.close()
        self._lay_out()
        self._table_edited()

    @property
    def entries(self) -> list[tuple[str, str]]:
        """The table as typed: (name, mole fraction) texts of each row."""
        return [(r.name.value, r.fraction.value) for r in self.rows]

    # -- Normalise
    def normalise(self) -> None:
        """Divide every mole fraction by their sum; say how much that changed them."""
        numbered = [(i, r) for i, r in enumerate(self.rows, start=1) if not r.is_blank()]
        rows = [r for _, r in numbered]
        try:
            fractions = [r.read_fraction(f"row {i}") for i, r in numbered]
            total = math.fsum(fractions)
            if not rows or not (math.isfinite(total) and total > 0) or min(fractions) < 0:
                raise _NothingToScale()
        except (ThermoRootsError, _NothingToScale) as err:
            text = str(err) if isinstance(err, ThermoRootsError) else \
                "Nothing to normalise: give every component a mole fraction >= 0, at least one above 0."
            self._show_note(text, error=True)
            return
        if total == 1.0:
            self._show_note("Already normalised: the mole fractions sum to 1; nothing changed.")
            return
        scaled = [f / total for f in fractions]
        change = [s - f for s, f in zip(scaled, fractions)]
        largest = max(range(len(rows)), key=lambda i: abs(change[i]))
        who = rows[largest].name.value.strip() or f"row {numbered[largest][0]}"
        self._syncing = True
        try:
            for row, value in zip(rows, scaled):
                row.set_fraction(value)
        finally:
            self._syncing = False
        self._write_text()
        self._judge()
        self._show_note(f"Normalised: the mole fractions summed to {total:.8g}; each was multiplied by "
                        f"{1 / total:.6g} (largest change {change[largest]:+.3g}, {who}).")

    # -- the two directions of the sync
    def _text_edited(self, change) -> None:
        if not self._syncing:
            self._read_text(change["new"])

    def _read_text(self, text: str) -> None:
        """Pasted text into the table; an unreadable text leaves the table and says why."""
        self.text_message.value = ""
        if not text.strip():
            self._fill([])
            self._show_note("")
            self._judge()
            return
        try:
            reading = read_composition_text(text)
        except ThermoRootsError as err:
            self.text_message.value = message_html(str(err))
            self._set_invalid("The pasted text could not be read (see beside it); the table shows the "
                              "composition before it.")
            return
        self._fill(list(reading.pairs))
        self._show_note(" ".join(n[0].upper() + n[1:] for n in reading.notes))
        self._judge()

    def _row_edited(self, _change) -> None:
        if not self._syncing:
            self._table_edited()

    def _table_edited(self) -> None:
        self.text_message.value = ""
        self._write_text()
        self._judge()

    def _fill(self, pairs) -> None:
        for row in self.rows:                 # the old rows' widgets leave the kernel too
            for widget in row.widgets:
                widget.close()
        self._syncing = True
        try:
            self.rows = [_Row(str(name), fraction, self._options, self._row_edited, self.remove_row)
                         for name, fraction in pairs]
            if not self.rows:
                self.rows = [_Row("", "", self._options, self._row_edited, self.remove_row)]
        finally:
            self._syncing = False
        self._lay_out()

    def _write_text(self) -> None:
        """The table into the text box, one component a line."""
        lines = [f"{r.name.value.strip()} {_fraction_text(r)}".strip() for r in self.rows if not r.is_blank()]
        self._syncing = True
        try:
            self.text.value = "\n".join(lines)
        finally:
            self._syncing = False

    def _lay_out(self) -> None:
        head = [w.HTML(f"<b>{t}</b>") for t in ("Component", "Mole fraction", "", "")]
        self.grid.children = head + [widget for row in self.rows for widget in row.widgets]

    # -- judging the table
    def _judge(self) -> None:
        """The table into a Mixture through the library, or the reason it is none."""
        pairs, problems, fractions, named = [], [], [], []      # named: the row number of each pair
        rows = [(i, r) for i, r in enumerate(self.rows, start=1) if not r.is_blank()]
        for i, row in rows:
            row.message.value = ""
            name = row.name.value.strip()
            try:
                if not name:
                    raise _RowProblem("give the component's name")
                fluid = self._custom.get(name) or component_from_text(name, f"row {i}")
            except UnknownFluidError as err:
                fluid = None
                self._row_problem(row, problems, i, _unknown_in_words(name, err))
            except (ThermoRootsError, _RowProblem) as err:
                fluid = None
                self._row_problem(row, problems, i, str(err).removeprefix(f"row {i}: "))
            try:
                fraction = row.read_fraction(f"row {i}")
                fractions.append(fraction)
            except ThermoRootsError as err:
                self._row_problem(row, problems, i, str(err).removeprefix(f"row {i}: "))
                continue
            if fluid is None:
                continue
            earlier = next((j for j, (f, _) in zip(named, pairs) if _same_fluid(f, fluid)), None)
            if earlier is not None:
                self._row_problem(row, problems, i, f"the same fluid as row {earlier} ({fluid.name}): give it "
                                                    "once, with the sum of its fractions")
                continue
            named.append(i)
            pairs.append((fluid, fraction))
        for row in self.rows:
            if row.is_blank():
                row.message.value = ""
        total = math.fsum(fractions) if len(fractions) == len(rows) else None
        if not rows:
            self._set_invalid("No components yet: paste a composition above or add rows to the table.",
                              total=None)
            return
        if problems:
            self._set_invalid(" ".join(problems), total=total)
            return
        try:
            mixture = Mixture(pairs)
        except ThermoRootsError as err:
            self._set_invalid(_mixture_problem(str(err), total), total=total)
            return
        self.error = None
        self.value = mixture
        self.last_valid = mixture
        self.summary.value = (
            f"<span style='color:#1b5e20'>&#10003;</span> Sum of mole fractions <b>{_sum_text(total)}</b> · "
            f"molar mass <b>{mixture.molar_mass * 1e3:.5g} g/mol</b> · {len(mixture)} component"
            f"{'s' if len(mixture) != 1 else ''}")

    def _row_problem(self, row, problems, i, text) -> None:
        row.message.value = message_html(text)
        problems.append(f"Row {i}: {text}")

    def _set_invalid(self, text: str, total=None) -> None:
        self.error = text
        self.value = None
        sum_part = "" if total is None else f"Sum of mole fractions <b>{_sum_text(total)}</b>. "
        self.summary.value = f"{sum_part}{message_html(text)}"

    def _show_note(self, text: str, error: bool = False) -> None:
        self.note = text
        self.notes.value = message_html(text) if error else (
            f"<span style='{_NOTE_STYLE}'>{html.escape(text)}</span>" if text else "")


class _RowProblem(Exception):
    """A row the table cannot use (a number without a name)."""


class _NothingToScale(Exception):
    """No positive sum to divide by."""


def _pairs_of(composition) -> list:
    """(name or Fluid, fraction) pairs of a mapping, a list of pairs or a Mixture."""
    if isinstance(composition, Mixture):
        return list(zip(composition.fluids, composition.fractions))
    if isinstance(composition, Mapping):
        items = list(composition.items())
    else:
        try:
            items = [tuple(item) for item in composition]
        except TypeError:
            raise WrongTypeError(f"CompositionField: give text, a mapping {{name: mole fraction}}, a list of "
                                 f"(name, mole fraction) pairs or a Mixture; got {composition!r}.") from None
    return items


def _same_fluid(a: Fluid, b: Fluid) -> bool:
    return a is b or (a.library_name is not None and a.library_name == b.library_name)


def _fraction_text(row: _Row) -> str:
    """A row's fraction for the text box: the number read, in one form for every line (a
    decimal point, no % sign), so the text reads back as the table; else the cell as typed."""
    try:
        return _shown(row.read_fraction("row"))
    except ThermoRootsError:
        return row.fraction.value.strip()


def _sum_text(total: float) -> str:
    """The sum as a person checks it: "1" when it is 1 to the mixture's tolerance, else enough digits."""
    from ..mixtures import SUM_TOLERANCE

    return "1" if abs(total - 1.0) <= SUM_TOLERANCE else f"{total:.10g}"


def _unknown_in_words(name: str, err: UnknownFluidError) -> str:
    close = ", ".join(display_name(s) for s in err.suggestions[:3])
    return f"{name!r} is not in the fluid library" + (f"; did you mean {close}?" if close else ".")


def _mixture_problem(text: str, total) -> str:
    """The Mixture's refusal, with the button to press when it is the sum."""
    if total is not None and "sum to" in text:
        return f"The mole fractions must sum to 1 (they sum to {total:.10g}): press Normalise to scale them, " \
               "or correct a fraction."
    return text.removeprefix("Mixture(composition): ")
