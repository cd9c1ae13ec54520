"""The package's structure, read from its source: the layer rule of DEVELOPERS.md (each layer
imports only from the layers above it) and the one model protocol (no code outside the model
layer asks which model it has, nor falls back to a default where a model lacks an attribute).

These read the code with Python's own parser (ast); nothing is imported or run.
"""

import ast
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parent.parent / "thermo_roots"

#: DEVELOPERS.md's table of layers: a module may import from its own layer and those above
#: (smaller numbers). The compiled twins (_accel, _accel_kernels) sit with the model layer
#: whose formulas they compile; errors is used by every layer; demo is the top.
LAYERS = {
    "errors": 0, "roots": 1,
    "quantities": 2, "ideal_gas": 2, "fluids": 2, "mixtures": 2,
    "models": 3, "properties": 3, "_accel": 3, "_accel_kernels": 3,
    "units": 4, "inversion": 5, "equilibrium": 5.5, "reference": 6,
    "sweeps": 7, "accuracy": 7, "steps": 7, "plots": 8, "widgets": 9,
    "demo": 10, "__init__": 10, "__main__": 10,
}

#: The model layer: the only modules that may tell one kind of model from another.
MODEL_LAYER = {"models", "properties", "_accel", "_accel_kernels"}


def _modules():
    for path in sorted(PACKAGE.rglob("*.py")):
        parts = path.relative_to(PACKAGE).with_suffix("").parts
        yield path, parts, ast.parse(path.read_text(encoding="utf-8"), filename=str(path))


def _imported_top_names(parts, node):
    """The package's top-level modules a relative ``from ... import`` names."""
    package = list(parts[:-1])
    if node.level > 1:
        package = package[: len(package) - (node.level - 1)]
    if node.module:
        return [(package + node.module.split("."))[0]] if package or node.module else []
    if package:
        return [package[0]]
    return [alias.name for alias in node.names]


def test_every_module_is_in_a_layer():
    missing = sorted({parts[0] for _, parts, _ in _modules()} - set(LAYERS))
    assert not missing, f"add {missing} to LAYERS here and to DEVELOPERS.md's table"


def test_each_layer_imports_only_from_the_layers_above_it():
    wrong = []
    for path, parts, tree in _modules():
        me = parts[0]
        for node in ast.walk(tree):
            if isinstance(node, ast.ImportFrom) and node.level > 0:
                for name in _imported_top_names(parts, node):
                    if name != me and name in LAYERS and LAYERS[name] > LAYERS[me]:
                        wrong.append(f"{path.relative_to(PACKAGE)}:{node.lineno} ({me}) imports {name}")
            elif isinstance(node, ast.ImportFrom) and (node.module or "").startswith("thermo_roots."):
                name = node.module.split(".")[1]
                if name != me and LAYERS.get(name, 0) > LAYERS[me]:
                    wrong.append(f"{path.relative_to(PACKAGE)}:{node.lineno} ({me}) imports {name}")
    assert not wrong, "imports against the layer rule:\n" + "\n".join(wrong)


@pytest.mark.parametrize("kind", ["IdealGas", "CubicModel", "VanDerWaals", "RedlichKwong", "SoaveRedlichKwong",
                                  "PengRobinson", "PengRobinson78"])
def test_no_branch_on_the_kind_of_model_outside_the_model_layer(kind):
    # isinstance(model, IdealGas), issubclass(cls, CubicModel), type(m) is PengRobinson: each is
    # a special case the model protocol exists to remove. Argument checks that a caller gave a
    # model at all (isinstance(x, Model)) are not branches on its kind and stay allowed; so is
    # fit_volume_shift's refusal of a model without a volume translation (a cubic's parameter).
    allowed = {("reference", "volume_shift.py", "CubicModel")}
    found = []
    for path, parts, tree in _modules():
        if parts[0] in MODEL_LAYER or (parts[0], path.name, kind) in allowed:
            continue
        for node in ast.walk(tree):
            if isinstance(node, ast.Call) and getattr(node.func, "id", "") in ("isinstance", "issubclass"):
                names = {n.id for n in ast.walk(node.args[1]) if isinstance(n, ast.Name)} if len(node.args) > 1 else set()
                names |= {n.attr for n in ast.walk(node.args[1]) if isinstance(n, ast.Attribute)} if len(node.args) > 1 else set()
                if kind in names:
                    found.append(f"{path.relative_to(PACKAGE)}:{node.lineno}")
            elif isinstance(node, ast.Compare) and any(isinstance(op, (ast.Is, ast.Eq)) for op in node.ops):
                names = {n.id for n in ast.walk(node) if isinstance(n, ast.Name)}
                if kind in names and "type" in names:
                    found.append(f"{path.relative_to(PACKAGE)}:{node.lineno}")
    assert not found, f"branches on {kind} outside the model layer: {found}"


def test_no_default_where_a_model_lacks_an_attribute():
    # getattr(model, "v_min", 0.0) hides a model that does not keep the protocol; every model
    # has every attribute the protocol names (models.Model's docstring)
    found = []
    for path, parts, tree in _modules():
        if parts[0] in MODEL_LAYER:
            continue
        for node in ast.walk(tree):
            if isinstance(node, ast.Call) and getattr(node.func, "id", "") == "getattr" and len(node.args) == 3:
                target = ast.unparse(node.args[0])
                if target in ("model", "self.model", "m", "cls") or target.endswith(".model"):
                    found.append(f"{path.relative_to(PACKAGE)}:{node.lineno} getattr({target}, ...)")
    assert not found, f"fallbacks on a model's attributes: {found}"
