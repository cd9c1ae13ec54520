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
- :class:`CompositionField` -- a mixture's composition, pasted or typed into a small table,
  with a Normalise button; its ``value`` is the Mixture (None while the input is invalid).
"""

from .accuracy_panel import AccuracyPanel
from .composition import CompositionField
from .isotherm_explorer import IsothermExplorer
from .process_panel import ProcessPanel
from .root_trace import RootTracePanel
from .state_panel import StatePanel

__all__ = ["AccuracyPanel", "CompositionField", "IsothermExplorer", "ProcessPanel", "RootTracePanel", "StatePanel"]
