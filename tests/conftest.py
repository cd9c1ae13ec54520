"""Shared fixtures: fluids and models used across the suite."""

import pytest

import thermo_roots as tr


@pytest.fixture(scope="session")
def co2():
    return tr.get_fluid("CO2")


@pytest.fixture(scope="session")
def propane():
    return tr.get_fluid("propane")
