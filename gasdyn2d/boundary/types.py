"""Type aliases for the public signatures.

``ArrayInput`` is what a public function accepts for a physical argument; the
boundary (:class:`gasdyn2d.boundary.Call`) decides what each kind becomes.
``FloatArray`` is what a result field holds: a float for scalar inputs, a
read-only ndarray for arrays, or the container the inputs came in (Quantity,
xarray DataArray, pandas Series, dask array).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any, Sequence, Union

import numpy as np

if TYPE_CHECKING:  # pragma: no cover - for type checkers only
    import pint

#: A physical argument: a number, a sequence or array of numbers, a pint Quantity (of
#: either), an xarray DataArray, a pandas Series or a dask array.
ArrayInput = Union[float, int, np.floating, np.integer, Sequence[Any], np.ndarray,
                   "pint.Quantity", Any]

#: A result field: float, ndarray, or the caller's container kind.
FloatArray = Union[float, np.ndarray, "pint.Quantity", Any]

__all__ = ["ArrayInput", "FloatArray"]
