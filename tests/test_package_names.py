"""The package's public names: each one listed resolves, and each lazily loaded one is listed."""

import thermo_roots as tr


def test_every_public_name_resolves():
    missing = [name for name in tr.__all__ if not hasattr(tr, name)]
    assert missing == []


def test_every_lazily_loaded_name_is_public():
    assert sorted(set(tr._LAZY_HOME) - set(tr.__all__)) == []


def test_the_energy_sweeps_are_public():
    assert tr.isenthalp is tr.sweeps.isenthalp and tr.isentrope is tr.sweeps.isentrope
