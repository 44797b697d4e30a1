"""The examples in thermo's docstrings run and give the values they quote (from their cited sources)."""

import doctest
import importlib
import pkgutil

import pytest

import thermo

MODULES = ["thermo", *(f"thermo.{info.name}" for info in pkgutil.iter_modules(thermo.__path__))]


@pytest.mark.parametrize("name", MODULES)
def test_docstring_examples(name):
    result = doctest.testmod(importlib.import_module(name), optionflags=doctest.ELLIPSIS)
    assert result.failed == 0
