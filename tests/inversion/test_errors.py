"""Bad input gives a project error naming the input and what is allowed; never a NaN."""

import pytest

import thermo_roots as tr


@pytest.fixture(scope="module")
def pr():
    return tr.PengRobinson(tr.get_fluid("propane"))


@pytest.mark.parametrize("knowns, error, fragment", [
    (dict(T=-5.0, P=1e5), tr.DomainError, "T must be above zero"),
    (dict(T=300.0, P=0.0), tr.DomainError, "P must be above zero"),
    (dict(T=300.0, v=1e-6), tr.DomainError, "co-volume"),
    (dict(T=float("nan"), P=1e5), tr.InputError, "not finite"),
    (dict(T=300.0, P=float("inf")), tr.InputError, "not finite"),
    (dict(T=300.0, P="80 degC"), tr.InputError, "wrong kind"),
    (dict(T="hot", P=1e5), tr.InputError, "number and a unit"),
    (dict(T=300.0), tr.InputError, "exactly two"),
    (dict(T=300.0, P=1e5, v=1e-3), tr.InputError, "exactly two"),
    (dict(v=1e-3, rho=1000.0), tr.InputError, "both fix the volume"),
    (dict(v=1e-3, quality=0.5), tr.InputError, "with T or with P"),
    (dict(T=300.0, quality=1.5), tr.DomainError, "between 0 and 1"),
    (dict(T=400.0, quality=0.5), tr.DomainError, "Tc"),
    (dict(P="60 bar", quality=0.5), tr.DomainError, "Pc"),
    (dict(T=300.0, pressure=1e5), tr.InputError, "Unknown quantity"),
])
def test_bad_knowns(pr, knowns, error, fragment):
    with pytest.raises(error, match=fragment):
        tr.solve(pr, **knowns)


def test_saturation_above_critical_and_with_bad_arguments(pr):
    with pytest.raises(tr.DomainError, match="critical temperature"):
        tr.saturation(pr, T=400.0)
    with pytest.raises(tr.DomainError, match="critical pressure"):
        tr.saturation(pr, P="50 bar")
    with pytest.raises(tr.InputError, match="exactly one"):
        tr.saturation(pr, T=300.0, P=1e6)
    with pytest.raises(tr.DomainError, match="ideal gas"):
        tr.saturation(tr.IdealGas(pr.fluid), T=300.0)


def test_every_error_is_a_value_error():
    for cls in (tr.InputError, tr.DomainError, tr.UnknownFluidError, tr.ConvergenceError):
        assert issubclass(cls, tr.ThermoRootsError) and issubclass(cls, ValueError)
