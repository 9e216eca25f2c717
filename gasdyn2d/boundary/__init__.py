"""Floor 0: how every public call meets its caller.

One mechanism, used by every public function: :class:`~gasdyn2d.boundary.call.Call`
classifies and converts the inputs (plain numbers, arrays, pint Quantities of any
registry, xarray DataArrays, pandas Series, dask arrays), runs the checked plain
core once (the scalar fast path for plain floats), and packages the result
(:mod:`gasdyn2d.boundary.results`) in the caller's units, registry and labels.
:mod:`gasdyn2d.boundary.checks` holds the argument checks and their one message
format; :mod:`gasdyn2d.boundary.units` the cached pint conversions.

Nothing here is physics, and no physics module talks to pint, xarray, pandas or dask
directly.
"""

from .call import SCALAR_CHECKS, Call, as_si_scalar, caller_stacklevel, refuse_type
from .checks import Check, choice, clamp_to_limit, errors_mode, one_of
from .results import ResultTable, result_fields, unit_field
from .units import application_registry, is_quantity

__all__ = ["Call", "Check", "SCALAR_CHECKS", "ResultTable", "application_registry", "as_si_scalar",
           "caller_stacklevel", "choice", "clamp_to_limit", "errors_mode", "is_quantity",
           "one_of", "refuse_type", "result_fields", "unit_field"]
