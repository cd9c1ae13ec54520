"""Layer 9: notebook panels (ipywidgets 8). Thin: read the fields, call the library, render.

Every panel is an ipywidgets box that can be filled and driven from Python as well as by
hand: build it with the values, call ``.solve()`` (what its button does), read ``.result``
(the library result last shown) and ``.error`` (None, or the message last shown). A
refused input is explained beside its field; the previous result stays on screen.

- :class:`StatePanel` -- one state point from two knowns, its roots and reference check.
- :class:`IsothermExplorer` -- a live P-v isotherm with the dome and the roots at a pressure.
- :class:`AccuracyPanel` -- where in T and P each model departs from the reference equation.
- :class:`RootTracePanel` -- the residual and every root finder's iterates for one state.
- :class:`ProcessPanel` -- a valve, compressor, expander or closed vessel from an inlet state,
  the reference equation's step beside it, drawn on a pressure-enthalpy diagram.
- :class:`MixturePanel` -- a mixture's state at (T, P) by the flash: phase, split, each phase's
  composition and properties, the reference mixture model beside it on request.
- :class:`EnvelopePanel` -- a mixture's phase envelope with an operating point placed on it.
- :class:`CompositionField` -- a mixture's composition, pasted or typed into a small table,
  with a Normalise button; its ``value`` is the Mixture (None while the input is invalid).
"""

from .accuracy_panel import AccuracyPanel
from .composition import CompositionField
from .envelope_panel import EnvelopePanel
from .isotherm_explorer import IsothermExplorer
from .mixture_panel import MixturePanel
from .process_panel import ProcessPanel
from .root_trace import RootTracePanel
from .state_panel import StatePanel

__all__ = ["AccuracyPanel", "CompositionField", "EnvelopePanel", "MixturePanel", "IsothermExplorer", "ProcessPanel", "RootTracePanel", "StatePanel"]
