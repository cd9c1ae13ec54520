"""Input pieces shared by the panels: a fluid chooser, a model chooser and a value-with-unit
field, each with a message line beside it for plain-words errors.

These only read what the person typed and hand it to the library (``get_fluid``, the model
classes, ``to_si``); the library decides what is valid and words the message.
"""

from __future__ import annotations

import html
import numbers
import re

import ipywidgets as w
import numpy as np

from .. import MODELS, Fluid, get_fluid, to_si
from ..errors import ThermoRootsError
from ..quantities import QUANTITIES
from ..units import read_unit, registry, split_value

#: The knowns the state panel offers as fields (v and rho each take either basis; so do the
#: energies h, s and u: the unit chosen, "kJ/kg" or "kJ/mol", decides).
FIELDS = ("T", "P", "v", "rho", "quality", "h", "s", "u")
#: Unit choices per field: (label shown, unit text the units layer reads), from the table of
#: quantities (``QUANTITIES[name].input_units``, which a field of any other quantity uses).
UNITS = {name: QUANTITIES[name].input_units for name in FIELDS}
#: Quantities a field takes at or below zero: quality, and the energies (their zero is a convention).
_MAY_BE_ZERO_OR_BELOW = frozenset({"quality", "h", "s", "u", "h_mass", "s_mass", "u_mass"})

#: What each field is called on screen, from the table of quantities.
LABELS = {name: q.label for name, q in QUANTITIES.items()}
#: Short names of the fluid chooser's "my own constants" entry.
CUSTOM = "custom"

_LABEL_WIDTH = "150px"
_ERROR_STYLE = "color:#b00020;font-size:0.9em"


def message_html(text: str | None) -> str:
    """The HTML of a message line: empty, or the message in red."""
    return "" if not text else f"<span style='{_ERROR_STYLE}'>{html.escape(text)}</span>"


def _label(text: str) -> w.HTML:
    return w.HTML(f"<b>{html.escape(text)}</b>", layout=w.Layout(width=_LABEL_WIDTH))


class QuantityField:
    """A number and a unit for one known quantity, with a message line beside it.

    The box takes a plain number (read in the unit chosen in the menu) or a number with its
    own unit ("293.15 K", "8 bar(g)", "14.7 psia"). A typed unit wins, visibly: when it is
    one of the menu's units the number stays in the box and the menu moves to that unit;
    when it is not (say "1 kgf/cm2g") the menu is left blank, so it never shows a unit that
    is not the one used. A decimal comma ("1,5") is read as a decimal point.

    Parameters
    ----------
    reader : callable, optional
        ``reader(text)`` -> SI value, used instead of :func:`thermo_roots.to_si` (the
        atmosphere field reads with :func:`thermo_roots.units.check_atmosphere`).
    """

    def __init__(self, quantity: str, value="", *, label: str | None = None, units=None, key=None,
                 reader=None, what: str | None = None):
        self.quantity = quantity
        self.reader = reader
        self.what = what or LABELS[quantity].lower()
        self.name = what or quantity         # how messages name it, as the units layer does
        options = units if units is not None else QUANTITIES[quantity].input_units
        self.text = w.Text(layout=w.Layout(width="120px"), continuous_update=False)
        self.unit = w.Dropdown(options=list(options), layout=w.Layout(width="95px"))
        self.message = w.HTML()
        self.label = _label(label or LABELS[quantity])
        self.box = w.HBox([self.label, self.text, self.unit, self.message],
                          layout=w.Layout(align_items="center"))
        self.text.add_class(f"tr-value-{key or quantity}")     # handles for a browser test
        self.unit.add_class(f"tr-unit-{key or quantity}")
        self._keys = {code: _unit_key(code, quantity) for _, code in self.unit.options}
        self._moving = False
        self.text.observe(self._typed, "value")
        self.set(value)

    def set(self, value) -> None:
        """Fill the field from Python: a number (SI; Python or numpy) or a text such as
        "20 degC" or "8 barg" (its unit then chosen in the menu when the menu has it)."""
        if isinstance(value, numbers.Real) and not isinstance(value, (bool, np.bool_)):
            si = QUANTITIES[self.quantity].si_unit
            if self._select(si):
                self.text.value = f"{float(value):g}"
            else:                   # the SI unit is not on offer here: say it in the box
                self.text.value = f"{float(value):g} {si}".strip()
            return
        self.text.value = str(value).strip()

    def _select(self, unit: str) -> bool:
        key = _unit_key(unit, self.quantity)
        for label, code in self.unit.options:
            if unit.lower() in (label.lower(), code.lower()) or (key is not None and self._keys[code] == key):
                self.unit.value = code
                return True
        return False

    def _typed(self, change) -> None:
        """A unit typed after the number moves to the menu, or blanks it (see the class)."""
        if self._moving:
            return
        text = change["new"].strip()
        try:
            _, unit_text = split_value(text, self.quantity)
            to_si(f"1 {unit_text}", self.quantity, molar_mass=1.0)   # a unit of this kind at all?
        except ThermoRootsError:
            return          # not readable yet: left as typed, and explained when it is read
        if not unit_text:
            return
        key = _unit_key(unit_text, self.quantity)
        code = next((c for _, c in self.unit.options if key is not None and self._keys[c] == key), None)
        self._moving = True
        try:
            if code is not None:
                self.unit.value = code
                self.text.value = _number_part(text, unit_text)
            else:
                self.unit.index = None
        finally:
            self._moving = False

    def _split(self):
        """(number text, unit text) of the box; the unit text is empty for a plain number."""
        text = self.text.value.strip()
        try:
            _, unit_text = split_value(text, self.quantity)
        except ThermoRootsError:
            return text, None
        return _number_part(text, unit_text), unit_text

    def _with_unit(self, shown: bool) -> str:
        number, unit_text = self._split()
        if unit_text is None or unit_text:
            return self.text.value.strip()      # a unit typed in the box wins
        code = self.unit.value
        if code is None:
            return number
        unit = dict((c, label) for label, c in self.unit.options)[code] if shown and code else code
        return f"{number} {unit}".strip()

    def entered(self) -> str:
        """The value as text with its unit, as the units layer reads it ("20 degC")."""
        return self._with_unit(shown=False)

    def shown(self) -> str:
        """The value as a person reads it ("20 °C")."""
        return self._with_unit(shown=True)

    def to_si(self, *, molar_mass=None, atmosphere=None) -> float:
        """The value in SI; a message beside the field and the error re-raised if unreadable."""
        text = self.text.value.strip()
        what = self.what
        if not text:
            raise self.fail(f"Enter the {what}.")
        number, unit_text = self._split()
        if unit_text is None and not _STARTS_WITH_NUMBER.match(text):
            if self.unit.value is not None:
                shown = dict((c, label) for label, c in self.unit.options)[self.unit.value]
                in_unit = f" in {shown}, the unit chosen beside it" if shown and shown != "fraction" else ""
                raise self.fail(f"Cannot read {self.name} = {text!r}: write a number{in_unit}, e.g. "
                                f"{_EXAMPLE_NUMBER[self.quantity]}.")
            raise self.fail(f"Cannot read {self.name} = {text!r}: write a number and a unit, e.g. "
                            f"{_EXAMPLE_NUMBER[self.quantity]} {QUANTITIES[self.quantity].input_units[0][0]}.")
        if unit_text == "" and self.unit.value is None:
            raise self.fail(f"Choose a unit in the menu beside {number!r}, or write one after the number, "
                            f"e.g. {_EXAMPLE_NUMBER[self.quantity]} {QUANTITIES[self.quantity].input_units[0][0]}.")
        try:
            if self.reader is not None:
                return self.reader(self.entered())
            kwargs = {} if atmosphere is None else {"atmosphere": atmosphere}
            si = to_si(self.entered(), self.quantity, molar_mass=molar_mass, **kwargs)
        except ThermoRootsError as err:
            raise self.fail(str(err)) from None
        # quality may be 0; an energy's zero is a convention (ASHRAE, IIR and NBP states give
        # negative h, s and u routinely), so only the others must be above zero
        if si <= 0.0 and self.quantity not in _MAY_BE_ZERO_OR_BELOW:
            raise self.fail(self._not_positive())
        return si

    def _not_positive(self) -> str:
        """Why a value at or below zero cannot be, in the terms it was typed in."""
        shown = self.shown()
        if self.quantity == "T":
            return (f"{self.what.capitalize()} {shown} is at or below absolute zero (0 K = -273.15 °C = "
                    "-459.67 °F); it must be above zero absolute.")
        if self.quantity == "P":
            gauge = next((label for label, code in self.unit.options
                          if self.unit.value and code == self.unit.value + "g"), None)
            hint = f" For a gauge reading choose {gauge} in the menu." if gauge else ""
            return f"{self.what.capitalize()} {shown} is not above zero: an absolute pressure must be.{hint}"
        return f"{self.what.capitalize()} {shown} must be above zero."

    def fail(self, text: str) -> ThermoRootsError:
        self.message.value = message_html(text)
        return FieldError(text)

    def clear(self) -> None:
        self.message.value = ""


_STARTS_WITH_NUMBER = re.compile(r"^\s*[-+\u2212]?[.,]?\d")
_EXAMPLE_NUMBER = {"T": "20", "P": "8", "v": "0.5", "rho": "500", "quality": "0.3"}
for _name, _q in QUANTITIES.items():      # the others: the number of the table's example
    _EXAMPLE_NUMBER.setdefault(_name, _q.example.split()[0] if _q.example else "1")


def _unit_key(unit: str, quantity: str):
    """What a unit means for a quantity, to compare spellings ("bara" and "bar"), or None."""
    try:
        spelled, gauge = read_unit(unit, quantity)
        return registry().Unit(spelled), gauge
    except Exception:  # an unreadable spelling: matches nothing
        return None


def _plain_number(text: str, name: str, example: str) -> float:
    """A number with no unit, a decimal comma allowed ("0,152"); FieldError otherwise."""
    try:
        number, unit = split_value(text.strip(), name)
    except ThermoRootsError as err:
        if _STARTS_WITH_NUMBER.match(text):
            raise FieldError(str(err)) from None      # e.g. "44,097": decimal or thousands?
        unit = "?"
    if unit:
        raise FieldError(f"The {name} {text!r} must be a plain number, e.g. {example}.")
    return number


def _number_part(text: str, unit_text: str) -> str:
    """The number as typed ("1,5") in a text that ends with ``unit_text``."""
    text = text.strip()
    return text[: len(text) - len(unit_text)].strip() if unit_text else text


class FieldError(ThermoRootsError):
    """An input a panel could not use; its message is already shown beside the field."""


class FluidField:
    """Type-ahead over the fluid library, plus "custom" for constants of one's own."""

    def __init__(self, fluid="propane"):
        from .. import fluid_names

        self.name = w.Combobox(options=[*fluid_names(), CUSTOM], ensure_option=False,
                               placeholder="type a name, e.g. propane", layout=w.Layout(width="217px"))
        self.message = w.HTML()
        self.custom_name = w.Text(value="my fluid", layout=w.Layout(width="120px"))
        self.Tc = QuantityField("T", "369.9 K", label="Critical temperature", key="Tc")
        self.Pc = QuantityField("P", "42.5 bar", label="Critical pressure", key="Pc",
                                units=[u for u in UNITS["P"] if not u[1].endswith("g")])
        self.omega = w.Text(value="0.152", layout=w.Layout(width="120px"))
        self.molar_mass = w.Text(value="44.1", layout=w.Layout(width="120px"))
        self.custom_message = w.HTML()
        # the ideal-gas heat capacity: blank (no enthalpy or entropy), a constant, or the five
        # coefficients of a + bT + cT² + dT³ + eT⁴ [J/(mol K)]
        self.cp0 = w.Text(value="", placeholder="e.g. 73.6, or a b c d e", layout=w.Layout(width="217px"))
        self.cp0.add_class("tr-cp0")
        self.cp0_message = w.HTML()
        self.custom_box = w.VBox([
            w.HBox([_label("Name"), self.custom_name]),
            self.Tc.box, self.Pc.box,
            w.HBox([_label("Acentric factor ω"), self.omega]),
            w.HBox([_label("Molar mass [g/mol]"), self.molar_mass, self.custom_message]),
            w.HBox([_label("Ideal-gas cp0 [J/(mol K)]"), self.cp0,
                    w.HTML("<span style='color:#555;font-size:0.9em'>&nbsp;optional: a constant, or a b c d e of "
                           "a + bT + cT² + dT³ + eT⁴ (T in K); needed for h, s and process steps</span>"),
                    self.cp0_message], layout=w.Layout(align_items="center")),
        ], layout=w.Layout(margin="0 0 0 20px"))
        self.box = w.VBox([w.HBox([_label("Fluid"), self.name, self.message],
                                  layout=w.Layout(align_items="center")), self.custom_box])
        self.name.add_class("tr-fluid")
        self.name.observe(self._show_custom, "value")
        self.set(fluid)

    def set(self, fluid) -> None:
        """A library name or alias, ``"custom"``, or a :class:`Fluid` (shown as custom)."""
        if isinstance(fluid, Fluid):
            self.custom_name.value = fluid.name
            self.Tc.set(f"{fluid.Tc:.6g} K")
            self.Pc.set(f"{fluid.Pc:.6g} Pa")
            self.omega.value = f"{fluid.omega:.6g}"
            self.molar_mass.value = f"{fluid.molar_mass * 1e3:.6g}"
            cp0 = fluid.cp0
            self.cp0.value = ("" if cp0 is None else f"{cp0:.10g}" if isinstance(cp0, numbers.Real)
                              else " ".join(f"{c:.10g}" for c in cp0))
            fluid = CUSTOM
        self.name.value = str(fluid)
        self._show_custom()

    def _show_custom(self, *_):
        self.custom_box.layout.display = None if self.is_custom else "none"

    @property
    def is_custom(self) -> bool:
        return self.name.value.strip().lower() == CUSTOM

    def fluid(self) -> Fluid:
        """The chosen fluid; the message beside the field and an error if it cannot be had."""
        self.message.value = self.custom_message.value = self.cp0_message.value = ""
        self.Tc.clear()
        self.Pc.clear()
        if not self.is_custom:
            try:
                return get_fluid(self.name.value)
            except ThermoRootsError as err:
                self.message.value = message_html(str(err))
                raise FieldError(str(err)) from None
        Tc, Pc = self.Tc.to_si(), self.Pc.to_si()
        try:
            omega = _plain_number(self.omega.value, "acentric factor", "0.152")
            grams = _plain_number(self.molar_mass.value, "molar mass", "44.1 (in g/mol)")
        except ThermoRootsError as err:
            text = str(err)
            self.custom_message.value = message_html(text)
            raise FieldError(text) from None
        cp0 = self._cp0()
        try:
            return Fluid(self.custom_name.value.strip() or "my fluid", Tc, Pc, omega,
                         to_si_molar_mass(grams), cp0=cp0)
        except ThermoRootsError as err:
            where = self.cp0_message if "cp0" in str(err) else self.custom_message
            where.value = message_html(str(err))
            raise FieldError(str(err)) from None

    def _cp0(self):
        """The typed cp0: None (blank), one number, or up to five coefficients."""
        parts = self.cp0.value.replace(";", " ").split()
        if not parts:
            return None
        try:
            if len(parts) > 5:
                raise FieldError(f"cp0 takes one number or at most five coefficients (a b c d e); "
                                 f"got {len(parts)}: {self.cp0.value!r}.")
            numbers_ = [_plain_number(p, "cp0 coefficient", "73.6") for p in parts]
        except ThermoRootsError as err:
            self.cp0_message.value = message_html(str(err))
            raise FieldError(str(err)) from None
        return numbers_[0] if len(numbers_) == 1 else tuple(numbers_)


def to_si_molar_mass(grams_per_mol: float) -> float:
    """Molar mass in g/mol to kg/mol, through the units layer's registry."""
    from ..units import registry

    return float(registry().Quantity(grams_per_mol, "g/mol").to("kg/mol").magnitude)


def model_label(short: str) -> str:
    """The model's name and short name for a menu: "Peng-Robinson (PR)", "ideal gas (IG)".

    Every model class names its equation (``name``: a cubic's is its family's).
    """
    return f"{MODELS[short].name} ({short})"


class ModelField:
    """One equation of state, and volume translation where the library offers it."""

    def __init__(self, model="PR", volume_shift=None):
        self.short = w.Dropdown(options=[(model_label(k), k) for k in MODELS], value=model,
                                layout=w.Layout(width="217px"))
        self.translate = w.Checkbox(value=bool(volume_shift), description="Peneloux volume translation",
                                    indent=False, layout=w.Layout(width="230px"),
                                    tooltip="Shifts the molar volume by a constant: better liquid "
                                            "densities, same saturation pressures.")
        self.message = w.HTML()
        self.box = w.HBox([_label("Equation of state"), self.short, self.translate, self.message],
                          layout=w.Layout(align_items="center"))

    def model(self, fluid: Fluid):
        """The model for ``fluid``; the message beside the field and an error if refused."""
        self.message.value = ""
        cls = MODELS[self.short.value]
        try:
            model = cls(fluid)
            if not self.translate.value:
                return model
            if model.b == 0.0:          # the model protocol: no co-volume (the ideal gas)
                raise FieldError(f"The {model.name} has no co-volume to translate; untick volume "
                                 "translation or choose a cubic model.")
            return cls(fluid, volume_shift="peneloux")
        except ThermoRootsError as err:
            self.message.value = message_html(str(err))
            raise FieldError(str(err)) from None


class ModelChoice:
    """Several models at once, as tick boxes."""

    def __init__(self, models=("SRK", "PR")):
        models = [models] if isinstance(models, str) else list(models)
        unknown = [m for m in models if m not in MODELS]
        if unknown:
            raise FieldError(f"Unknown model {', '.join(map(repr, unknown))}; choose from {', '.join(MODELS)}.")
        self._order = models + [k for k in MODELS if k not in models]   # as given, then the rest
        self.boxes = {k: w.Checkbox(value=k in models, description=k, indent=False,
                                    tooltip=model_label(k), layout=w.Layout(width="70px"))
                      for k in MODELS}
        self.message = w.HTML()
        self.box = w.HBox([_label("Equations of state"), *self.boxes.values(), self.message],
                          layout=w.Layout(align_items="center"))

    @property
    def chosen(self) -> list[str]:
        return [k for k in self._order if self.boxes[k].value]

    def models(self, fluid: Fluid) -> list:
        self.message.value = ""
        if not self.chosen:
            self.message.value = message_html("Tick at least one equation of state.")
            raise FieldError("Tick at least one equation of state.")
        return [MODELS[k](fluid) for k in self.chosen]

    def observe(self, handler) -> None:
        for box in self.boxes.values():
            box.observe(handler, "value")


class KnownPair:
    """A choice of two knowns and their value-with-unit fields (the state panel's inlet, the
    process panel's inlet): the dropdown of pairs, one :class:`QuantityField` per quantity
    (only the chosen pair shown), and a message line beside the dropdown.

    Parameters
    ----------
    pairs : sequence of (label, (first, second))
    defaults : dict
        The text each field starts with, per quantity of :data:`FIELDS`.
    knowns : dict
        Two knowns as keywords (``T="20 degC", P="7 barg"``; ``rho_mass`` fills the density
        field in kg/m³); they choose the pair. Empty: ``default`` (or the first pair).
    """

    def __init__(self, pairs, defaults, knowns=None, *, default=None, label="Known quantities"):
        knowns = dict(knowns or {})
        self.pairs = tuple(pairs)
        self.pair = w.Dropdown(options=list(self.pairs), value=self.pair_of(knowns, default),
                               layout=w.Layout(width="217px"))
        self.pair.add_class("tr-pair")
        self.fields = {q: QuantityField(q, defaults[q]) for q in FIELDS}
        for name, value in knowns.items():
            field = self.fields["rho" if name == "rho_mass" else name]
            field.set(value)
            if name == "rho_mass" and isinstance(value, numbers.Real):
                field.unit.value = "kg/m^3"
        self.message = w.HTML()
        self.known_box = w.VBox()
        self.pair.observe(self._show, "value")
        self._show()
        self.box = w.VBox([w.HBox([_label(label), self.pair, self.message], layout=w.Layout(align_items="center")),
                           self.known_box])

    def pair_of(self, knowns, default=None):
        names = tuple("rho" if k == "rho_mass" else k for k in knowns)
        if not names:
            return default or self.pairs[0][1]
        for _, pair in self.pairs:
            if set(pair) == set(names):
                return pair
        allowed = "; ".join(f"{a} and {b}" for _, (a, b) in self.pairs)
        raise FieldError(f"The panel takes one of these pairs of knowns: {allowed}; got {', '.join(knowns)}.")

    def _show(self, *_):
        self.known_box.children = [self.fields[q].box for q in self.pair.value]

    @property
    def knowns(self) -> dict:
        """The two knowns as entered, e.g. {"T": "20 degC", "P": "7 barg"}."""
        return {q: self.fields[q].entered() for q in self.pair.value}

    def given(self) -> str:
        """The two knowns as a person reads them: "temperature 20 °C, pressure 7 barg"."""
        return ", ".join(f"{LABELS[q].lower()} {self.fields[q].shown()}" for q in self.pair.value)

    def clear(self) -> None:
        for field in self.fields.values():
            field.clear()
        self.message.value = ""

    def to_si(self, *, molar_mass, atmosphere) -> dict:
        """The chosen pair in SI; a message beside the field and FieldError where unreadable."""
        return {q: self.fields[q].to_si(molar_mass=molar_mass, atmosphere=atmosphere) for q in self.pair.value}

    def blame(self, text: str) -> FieldError:
        """Show a solve error beside the field it is about (or beside the pair): the known the
        message starts with ("v = ... is at or below the co-volume"), else the first of the
        pair it names as "h = ..." ("no pressure gives h = ... at T = ...")."""
        first = text.split(" ", 1)[0].rstrip(",")
        volume = first in ("v", "rho", "rho_mass")
        for q in self.pair.value:
            if q == first or (volume and q in ("v", "rho")):
                return self.fields[q].fail(text)
        for named in re.finditer(r"\b(\w+) = ", text):
            if named.group(1) in self.pair.value:
                return self.fields[named.group(1)].fail(text)
        self.message.value = message_html(text)
        return FieldError(text)
