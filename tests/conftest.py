"""Shared test fixtures.

Importing ``pint_xarray`` sets ``force_ndarray_like`` on pint's application registry for
the rest of the process (every float Quantity then holds a 0-d array). Tests that use
pint-xarray must not hand that to the tests after them, whose order pytest may change:
the flag is put back after every test.
"""

from __future__ import annotations

import sys

import pytest


@pytest.fixture(autouse=True)
def _application_registry_flag_restored():
    pint = sys.modules.get("pint")
    flag = False if pint is None else pint.get_application_registry().force_ndarray_like
    yield
    pint = sys.modules.get("pint")
    if pint is not None:
        pint.get_application_registry().force_ndarray_like = flag
