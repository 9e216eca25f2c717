"""The one boundary every public call crosses: inputs in, plain core, result out.

A public function states its arguments, one :meth:`Call.take` each, and hands
two forms of its checked plain core to :meth:`Call.run`::

    call = Call(errors)
    call.take("M1", M1)                       # a dimensionless argument
    call.take("deflection", deflection, "rad")
    call.take("gamma", gamma, keep_scalar=True)
    return call.run(ObliqueShock, _from_deflection_scalar, _from_deflection_array)

:meth:`Call.take` classifies each argument once:

- plain Python and numpy scalars (and 0-d arrays) become floats;
- lists and ndarrays become float ndarrays (float32 and integers are computed in
  float64; masked arrays keep their mask through to the outputs);
- pint Quantities, from any registry, become SI magnitudes through a cached
  factor (:mod:`gasdyn2d.boundary.units`); lists of Quantities too;
- xarray DataArrays (plain, or quantified with pint-xarray) and pandas Series
  keep their labels aside; dask arrays stay lazy;
- strings, bools, complex numbers and other objects are refused with an
  :class:`~gasdyn2d.errors.InvalidInputError` naming the argument.

:meth:`Call.run` then takes one of three paths. When every argument is a float it
calls the scalar form of the core (the fast path: ``math`` module, no numpy);
otherwise it broadcasts the arguments (by dimension name for DataArrays) and
calls the array form once, or, for dask arrays, maps it lazily over the blocks.
The result fields are packaged on the way out: read-only ndarrays that share
no memory with the inputs or with each other, Quantities in the caller's units
and registry, DataArrays with the inputs' dimensions and coordinates, Series
with the input's index, lazy dask arrays, masked arrays.

Both core forms take the SI values positionally (in the order taken), then a
:class:`~gasdyn2d.boundary.checks.Check` (the NaN policy), then keyword options,
and return the result's fields in order. They check their arguments with the
``Check`` and compute; the array form chunks its work where it helps
(:func:`gasdyn2d.numerics.chunked`).
"""

from __future__ import annotations

import numbers
import os
from typing import Any
import sys
import warnings

import numpy as np

from ..errors import InvalidInputError, ProbablyDegreesWarning
from .checks import Check, errors_mode
from .results import FieldInfo, pint_unit as _pint_unit, result_fields
from .units import (KINDS, TWO_PI, degrees_hint, is_quantity, si_conversion, to_caller_units,
                    unit_of_quantity)

__all__ = ["Call", "SCALAR_CHECKS", "as_si_scalar", "caller_stacklevel", "refuse_type"]

_RAISE = Check(False)
_NAN = Check(True)

#: The Check of each valid ``errors`` value, for the scalar fast lanes of the relations: a
#: public function whose arguments are all plain floats calls its checked core directly
#: with ``SCALAR_CHECKS.get(errors)`` (None for an invalid ``errors``, which then takes
#: the general path and its message). The core is the one the general path runs, so the
#: numbers, checks and messages are the same; only the classification of the arguments
#: is skipped.
SCALAR_CHECKS = {"raise": _RAISE, "nan": _NAN}
_REAL_KINDS = "fiu"


def refuse_type(name: str, value, what: str = "a real number or an array of real numbers"):
    """The InvalidInputError for an argument of the wrong type."""
    if isinstance(value, (str, bytes)):
        got = f"the string {value!r}"
    elif isinstance(value, (bool, np.bool_)):
        got = f"the bool {value!r} (True and False are not numbers here)"
    elif isinstance(value, (complex, np.complexfloating)):
        got = f"the complex number {value!r}"
    elif isinstance(value, np.ndarray):
        got = f"an array of dtype {value.dtype}"
    else:
        got = f"{value!r} of type {type(value).__name__}"
    return InvalidInputError(f"{name} must be {what}; got {got}.")


def _flatten(value):
    """The leaves of a nested list/tuple and its shape (None when ragged)."""
    if not isinstance(value, (list, tuple)):
        return [value], ()
    parts = [_flatten(item) for item in value]
    shapes = {shape for _, shape in parts}
    leaves = [leaf for part, _ in parts for leaf in part]
    if len(shapes) > 1 or None in shapes:
        return leaves, None
    inner = shapes.pop() if shapes else ()
    return leaves, (len(value), *inner)


def _library(value) -> str:
    return type(value).__module__.partition(".")[0]


def _float_array(name, array):
    """A float64 ndarray from a numeric ndarray; bool, complex, text and objects refused."""
    kind = array.dtype.kind
    if kind in _REAL_KINDS:
        return array.astype(float, copy=False)
    if kind == "O":
        flat = array.reshape(-1)
        if all(isinstance(v, numbers.Real) and not isinstance(v, (bool, np.bool_)) for v in flat):
            return array.astype(float)
    raise refuse_type(name, array)


class _Labels:
    """What an argument carried besides its numbers: DataArray, Series index, mask."""

    __slots__ = ("xarray", "index", "mask")

    def __init__(self):
        self.xarray = []  # (position, DataArray, unit_text, name)
        self.index = None  # pandas Index of the Series arguments
        self.mask = None  # combined mask of the masked-array arguments


class Call:
    """One public call: its arguments (in SI), their units and labels, and the NaN policy.

    Parameters
    ----------
    errors : {"raise", "nan"}
        The NaN policy of the call (checked here).
    """

    __slots__ = ("check", "names", "values", "unit_texts", "units", "registry", "scalar",
                 "lazy", "labels", "keep_scalar", "trailing_sizes", "_shape_template")

    def __init__(self, errors="raise"):
        self.check = _NAN if errors_mode(errors) else _RAISE
        self.names = []
        self.values = []
        self.unit_texts = []
        self.units = []  # UnitOf or None, per argument
        self.registry = None  # the first Quantity argument's registry
        self.scalar = True  # every argument a float so far
        self.lazy = False  # some argument is a dask array
        self.labels = None  # _Labels, once a labelled argument is seen
        self.keep_scalar = []
        self.trailing_sizes = {}  # length of each named trailing axis of the result fields

    # ------------------------------------------------------------------ inputs
    def take(self, name: str, value, unit_text: str = "", *, degrees_above: float = TWO_PI,
             keep_scalar: bool = False):
        """Classify and convert one argument; ``unit_text`` is its SI unit ("" for ratios).

        ``degrees_above``: a plain angle larger than this warns that it was probably
        meant in degrees. ``keep_scalar``: the argument is passed to the core as a
        float whenever it is one, not broadcast with the cases (γ).
        """
        kind = type(value)
        if kind is float:
            si, unit = value, None
        elif kind is int:
            si, unit = float(value), None
        else:
            si, unit = self._take_other(name, value, unit_text)
        if unit_text == "rad" and unit is None:
            _warn_if_degrees(si, name, degrees_above)
        self.names.append(name)
        self.values.append(si)
        self.unit_texts.append(unit_text)
        self.units.append(unit)
        self.keep_scalar.append(keep_scalar)
        return si

    def _take_other(self, name, value, unit_text):
        if value is None:
            raise InvalidInputError(f"{name} is required; got None.")
        unit = None
        if is_quantity(value):
            unit = unit_of_quantity(value, unit_text, name)
            if self.registry is None:
                self.registry = unit.registry
            value = value.magnitude
        library = _library(value)
        if library == "xarray":
            return self._take_dataarray(name, value, unit_text, unit)
        if library == "pandas":
            value = self._take_series(name, value)
        if library == "dask":
            self.scalar = False
            self.lazy = True
            return _scale(_dask_float(name, value), unit), unit
        if isinstance(value, (list, tuple)):
            value, list_unit = self._take_sequence(name, value, unit_text)
            unit = unit or list_unit
            if list_unit is not None:
                return self._array(value), unit  # already in SI
        if isinstance(value, np.ma.MaskedArray):
            value = self._take_masked(name, value)
        if isinstance(value, numbers.Real) and not isinstance(value, (bool, np.bool_)):
            return _scale(float(value), unit), unit
        if isinstance(value, np.ndarray) or isinstance(value, (list, tuple)):
            array = _float_array(name, np.asarray(value))
            if array.ndim == 0:
                return _scale(float(array), unit), unit
            return _scale(self._array(array), unit), unit
        raise refuse_type(name, value)

    def _array(self, array):
        self.scalar = False
        return array

    def _take_sequence(self, name, value, unit_text):
        """A (nested) list: of numbers (numpy does it), or of Quantities (converted here)."""
        leaves, shape = _flatten(value)
        quantities = [is_quantity(v) for v in leaves]
        if not any(quantities):
            return value, None
        if not all(quantities) or shape is None:
            raise InvalidInputError(
                f"{name} mixes Quantities and plain numbers, or is a ragged list; give every "
                "element with a unit in a rectangular list (or one Quantity array).")
        units = [unit_of_quantity(v, unit_text, name) for v in leaves]
        if self.registry is None:
            self.registry = units[0].registry
        si = np.empty(len(leaves))
        for i, (leaf, unit) in enumerate(zip(leaves, units)):
            magnitude = leaf.magnitude
            if isinstance(magnitude, np.ndarray) and magnitude.ndim == 0:
                magnitude = _float_array(name, magnitude)[()]  # a registry that forces arrays
            if not isinstance(magnitude, numbers.Real) or isinstance(magnitude, (bool, np.bool_)):
                raise refuse_type(name, magnitude, "a list of scalar Quantities")
            si[i] = magnitude * unit.scale + unit.offset
        return si.reshape(shape), units[0]

    def _take_masked(self, name, value):
        data = _float_array(name, np.ma.getdata(value))
        mask = np.ma.getmaskarray(value)
        labels = self._labels()
        labels.mask = mask if labels.mask is None else (labels.mask | mask)
        return np.where(mask, np.nan, data)

    def _take_series(self, name, value):
        import pandas as pd

        if not isinstance(value, pd.Series):
            raise refuse_type(name, value, "a number, an array, a pandas Series or an xarray "
                              "DataArray")
        labels = self._labels()
        if labels.index is None:
            labels.index = value.index
        elif not labels.index.equals(value.index):
            raise InvalidInputError(
                f"{name} is a pandas Series whose index differs from another argument's; give "
                "Series with equal indexes (align them first).")
        return _float_array(name, value.to_numpy())

    def _take_dataarray(self, name, value, unit_text, unit):
        import xarray as xr

        if not isinstance(value, xr.DataArray):
            raise refuse_type(name, value, "a number, an array, a pandas Series or an xarray "
                              "DataArray (not a Dataset)")
        data = value.data
        if is_quantity(data):  # quantified with pint-xarray: the unit lives in the data
            unit = unit_of_quantity(data, unit_text, name)
            if self.registry is None:
                self.registry = unit.registry
            data = data.magnitude
        self.scalar = False
        if _library(data) == "dask":
            self.lazy = True
            data = _dask_float(name, data)
        else:
            data = _float_array(name, np.asarray(data))
        si = _scale(data, unit)
        self._labels().xarray.append((len(self.values), value.copy(deep=False, data=si), name))
        return si, unit

    def _labels(self):
        if self.labels is None:
            self.labels = _Labels()
        return self.labels

    def trailing(self, name: str, size: int):
        """Declare the length of the trailing axis ``name`` that some result fields have
        beyond the case shape (:func:`~gasdyn2d.boundary.results.unit_field` ``trailing``);
        lazy (dask) calls need it before anything is computed."""
        self.trailing_sizes[name] = int(size)

    # ------------------------------------------------------------------ the call
    def run(self, result_type, core, *, elementwise=True, **options):
        """Call the checked ``core`` on the taken arguments; package its fields as
        ``result_type`` (a :class:`~gasdyn2d.boundary.results.ResultTable` dataclass).

        ``elementwise``: every case is independent of the others, so large batches
        are evaluated in cache-sized blocks (faster, and peak memory stays a small
        multiple of inputs plus outputs); pass False for a core that couples cases.
        """
        return result_type.from_fields(self.evaluate(result_fields(result_type), core,
                                                     elementwise=elementwise, **options))

    def run_value(self, core, unit_text: str = "", name: str = "", doc: str = "", *,
                  elementwise=True, **options):
        """Call a ``core`` that returns one field (a float or an array, not a tuple)."""
        info = FieldInfo(name, unit_text, np.dtype(float), doc, _pint_unit(unit_text))
        return self.evaluate((info,), lambda *a, **k: (core(*a, **k),),
                             elementwise=elementwise, **options)[0]

    def evaluate(self, fields, core, *, elementwise=True, **options):
        """The packaged values of ``fields`` (:class:`FieldInfo`) computed by ``core``."""
        if self.scalar:
            return self._package_scalar(fields, core(*self.values, self.check, **options))
        values, shape, template = self._broadcast()
        if self.lazy:
            out = self._run_lazily(fields, core, values, options, elementwise)
        elif elementwise:
            out = _in_blocks(fields, core, values, self.check, options)
        else:
            out = core(*values, self.check, **options)
        return self._package(fields, out, shape, template)

    def prepare(self):
        """The taken arguments in SI, broadcast together (floats when all were scalars):
        for a public object that keeps plain values and packages derived ones later
        with :meth:`wrap` (:class:`~gasdyn2d.FlowState`)."""
        if self.scalar:
            self._shape_template = ((), None)
            return list(self.values)
        values, shape, template = self._broadcast()
        self._shape_template = (shape, template)
        return values

    def wrap(self, value, unit_text: str = "", name: str = "", doc: str = ""):
        """Package one value computed from :meth:`prepare`'s arguments like a result field."""
        info = FieldInfo(name, unit_text, np.dtype(float), doc, _pint_unit(unit_text))
        if self.scalar:
            return self._package_scalar((info,), (value,))[0]
        shape, template = self._shape_template
        return self._package((info,), (value,), shape, template)[0]

    def _broadcast(self):
        """The arguments broadcast together; the case shape; the DataArray template or None."""
        values = list(self.values)
        labels = self.labels
        template = None
        if labels is not None and labels.xarray:
            template = _broadcast_dataarrays(labels.xarray, values, self.keep_scalar)
        positions = [i for i, v in enumerate(values)
                     if not (self.keep_scalar[i] and type(v) is float)]
        arrays = [values[i] for i in positions]
        if self.lazy:
            import dask.array as da

            arrays = da.broadcast_arrays(*arrays)
        else:
            shape0 = np.shape(arrays[0])
            if not all(np.shape(a) == shape0 for a in arrays[1:]):
                try:
                    arrays = np.broadcast_arrays(*arrays)
                except ValueError:
                    shapes = ", ".join(f"{self.names[i]} {np.shape(values[i])}"
                                       for i in positions)
                    raise InvalidInputError(
                        f"the array arguments do not broadcast together: {shapes}. Give arrays "
                        "whose shapes broadcast like numpy's (equal, 1, or missing dimensions), "
                        "or DataArrays with named dimensions.") from None
            else:
                arrays = [np.asarray(a, dtype=float) for a in arrays]
        for i, array in zip(positions, arrays):
            values[i] = array
        shape = tuple(arrays[0].shape)
        if labels is not None and labels.index is not None and shape != (len(labels.index),):
            raise InvalidInputError(
                f"the arguments broadcast to shape {shape}, which does not fit the pandas index "
                f"of length {len(labels.index)}; give the other arguments as scalars or Series.")
        return values, shape, template

    def _run_lazily(self, fields, array_core, values, options, elementwise):
        import dask.array as da

        positions = [i for i, v in enumerate(values) if _library(v) == "dask"]
        block_check = Check(self.check.nan, in_block=True)
        # the block function travels to the workers: it carries the scalar arguments only
        scalars = [None if i in positions else v for i, v in enumerate(values)]

        def block(*blocks):
            args = list(scalars)
            for i, b in zip(positions, blocks):
                args[i] = np.asarray(b, dtype=float)
            shape = blocks[0].shape
            if elementwise:
                out = _in_blocks(fields, array_core, args, block_check, options)
            else:
                out = array_core(*args, block_check, **options)
            out = tuple(np.broadcast_to(o, shape + self._trailing_shape(f)).astype(
                f.dtype, copy=False) for o, f in zip(out, fields))
            return out if len(out) > 1 else out[0]

        outputs = ",".join(f"({f.trailing})" if f.trailing else "()" for f in fields)
        signature = ",".join("()" for _ in positions) + "->" + outputs
        sizes = {f.trailing: self.trailing_sizes[f.trailing] for f in fields if f.trailing}
        out = da.apply_gufunc(block, signature, *(values[i] for i in positions),
                              output_dtypes=[f.dtype for f in fields], vectorize=False,
                              output_sizes=sizes or None)
        return out if isinstance(out, tuple) else (out,)

    # ------------------------------------------------------------------ outputs
    def _trailing_shape(self, field):
        return (self.trailing_sizes[field.trailing],) if field.trailing else ()

    def _package_scalar(self, fields, values):
        out = [value if type(value) is float else
               _fresh_read_only(value, np.shape(value), field.dtype, set()) if field.trailing
               else _plain_scalar(value) for value, field in zip(values, fields)]
        if self.registry is None:
            return out
        for i, field in enumerate(fields):
            if field.unit and field.unit in KINDS and (type(out[i]) is float or field.trailing):
                out[i] = to_caller_units(out[i], field.unit, self._like(field.unit), self.registry)
        return out

    def _package(self, fields, values, shape, template):
        labels = self.labels
        seen = {id(_root(v)) for v in self.values if isinstance(v, np.ndarray)}
        out = []
        for value, field in zip(values, fields):
            full = shape + (np.shape(value)[-1:] if field.trailing else ())
            if not self.lazy:
                value = _fresh_read_only(value, full, field.dtype, seen)
                if labels is not None and labels.mask is not None:
                    mask = labels.mask[..., None] if field.trailing else labels.mask
                    value = np.ma.array(value, mask=np.broadcast_to(mask, full))
            if field.unit and field.unit in KINDS and self.registry is not None:
                value = to_caller_units(value, field.unit, self._like(field.unit), self.registry)
            if template is not None:
                value = _as_dataarray(value, template, field)
            elif labels is not None and labels.index is not None:
                value = _as_series(value, labels.index, field)
            out.append(value)
        return out

    def _like(self, unit_text):
        """The caller's unit for results of kind ``unit_text``: that of the first argument
        of the same kind given as a Quantity (a dimensionless "angle" does not count); an
        area follows a length given (squared)."""
        for text, unit in zip(self.unit_texts, self.units):
            if text == unit_text and unit is not None:
                if unit_text == "rad" and str(unit.units) == "dimensionless":
                    continue
                return unit
        if unit_text == "m²":
            length = self._like("m")
            if length is not None:
                return si_conversion(length.units ** 2, length.registry, "m²", "area")
        return None


#: Cases per block in :func:`_in_blocks`: a block's temporaries stay in cache, and the
#: Python overhead of one core call is spread over enough cases to cost nothing.
BLOCK_SIZE = 32768


def _in_blocks(fields, core, values, check, options):
    """The fields of an elementwise ``core`` over equal-shape arrays, block by block.

    Floats (γ kept scalar) go to every block unchanged. When a check raises in some
    block, the core is run once more on the whole arrays, so that the message gives
    the true index and count (the error path only).
    """
    positions = [i for i, v in enumerate(values) if type(v) is not float]
    shape = np.shape(values[positions[0]])
    n = int(np.prod(shape))
    if n <= BLOCK_SIZE:
        return core(*values, check, **options)
    flat = {i: np.ravel(values[i]) for i in positions}
    outputs = None
    args = list(values)
    try:
        for start in range(0, n, BLOCK_SIZE):
            stop = min(start + BLOCK_SIZE, n)
            for i in positions:
                args[i] = flat[i][start:stop]
            parts = [np.asarray(p) for p in core(*args, check, **options)]
            if outputs is None:  # a field may have trailing axes beyond the cases
                outputs = [np.empty((n,) + p.shape[1:] if p.ndim else (n,), dtype=f.dtype)
                           for p, f in zip(parts, fields)]
            for out, part in zip(outputs, parts):
                out[start:stop] = part
    except InvalidInputError:
        if check.nan:
            raise
        core(*values, check, **options)  # raises with the whole-array message
        raise
    return [out.reshape(shape + out.shape[1:]) for out in outputs]


def _plain_scalar(value):
    """A float from a numpy scalar or 0-d array (bools and strings kept as they are)."""
    if isinstance(value, (str, bool, np.bool_)):
        return bool(value) if isinstance(value, np.bool_) else value
    array = np.asarray(value)
    if array.dtype.kind in "US":
        return str(array)
    if array.dtype.kind == "b":
        return bool(array)
    return float(array)


def _scale(value, unit):
    """SI magnitude of a converted argument (``unit`` None: already SI)."""
    if unit is None or (unit.scale == 1.0 and unit.offset == 0.0):
        return value
    return value * unit.scale + unit.offset


def _dask_float(name, value):
    kind = value.dtype.kind
    if kind not in _REAL_KINDS:
        raise refuse_type(name, np.empty(0, dtype=value.dtype))
    return value.astype(float) if value.dtype != float else value


def _root(array):
    while isinstance(array, np.ndarray) and array.base is not None:
        array = array.base
    return array


def _fresh_read_only(value, shape, dtype, seen):
    """``value`` as an array of the case shape that owns memory no other field or input
    shares, marked read-only (so that mutating one result can never change another)."""
    value = np.asarray(value)
    if value.shape != shape:
        value = np.array(np.broadcast_to(value, shape), dtype=dtype)
        root = value
    else:
        root = _root(value)
        if id(root) in seen or value.dtype != dtype:
            value = np.array(value, dtype=dtype, copy=True)
            root = value
    seen.add(id(root))
    value.flags.writeable = False
    return value


def _broadcast_dataarrays(entries, values, keep_scalar):
    """Align (exactly) and broadcast the DataArray arguments by dimension name; put their
    SI data in ``values``; return the broadcast template (dims and coordinates)."""
    import xarray as xr

    arrays = [array for _, array, _ in entries]
    try:
        arrays = xr.align(*arrays, join="exact")
    except ValueError as exc:
        names = ", ".join(name for _, _, name in entries)
        raise InvalidInputError(
            f"the DataArray arguments ({names}) have coordinates that do not match along a "
            f"shared dimension ({exc}). Select or reindex them to the same coordinates.") from None
    arrays = xr.broadcast(*arrays)
    for (position, _, _), array in zip(entries, arrays):
        values[position] = array.data
    for i, value in enumerate(values):
        if any(i == p for p, _, _ in entries) or type(value) is float:
            continue
        raise InvalidInputError(
            "an array argument was given beside DataArray arguments; give it as a DataArray "
            "with named dimensions (or as a scalar) so that it broadcasts by name.")
    return arrays[0]


def _as_dataarray(value, template, field):
    import xarray as xr

    attrs = {"long_name": field.description} if field.description else {}
    if field.unit and field.pint_unit and not is_quantity(value):
        attrs["units"] = field.pint_unit
    dims = template.dims + ((field.trailing,) if field.trailing else ())
    return xr.DataArray(value, dims=dims, coords=template.coords, name=field.name, attrs=attrs)


def _as_series(value, index, field):
    """A Series on the input's index; a field with a trailing axis becomes a DataFrame
    (one row per case, one column per entry of the axis)."""
    import pandas as pd

    if field.trailing:
        columns = pd.RangeIndex(np.shape(value)[-1], name=field.trailing)
        return pd.DataFrame(value, index=index, columns=columns, copy=False)
    return pd.Series(value, index=index, name=field.name, copy=False)


def _warn_if_degrees(value, name, limit):
    """Warn when a plain angle is larger than ``limit`` (2π, or a larger legal bound)."""
    if type(value) is float:
        if not (abs(value) > limit) or value in (np.inf, -np.inf):
            return
        first = value
    else:
        if _library(value) == "dask":
            return  # never compute a lazy array to look at it
        with np.errstate(invalid="ignore"):
            big = np.abs(value) > limit
            if not big.any():
                return
            big &= np.isfinite(value)
        if not big.any():
            return
        first = float(value[big].flat[0])
    bound = "2π" if limit == TWO_PI else f"{limit:.4g} rad"
    warnings.warn(
        f"{name} = {first:g} is larger than {bound} as a plain number; plain angles are in "
        f"radians, so this was probably meant in degrees. {degrees_hint(first)}",
        ProbablyDegreesWarning, stacklevel=caller_stacklevel())


def as_si_scalar(name: str, value, unit_text: str = "", *, what: str = "a real number"):
    """One scalar argument (a design size, a count of lines) in SI as a float.

    For options that are not broadcast with the cases; arrays are refused.
    """
    call = Call()
    si = call.take(name, value, unit_text)
    if type(si) is not float:
        raise InvalidInputError(f"{name} must be {what} (a single value); got an array "
                                f"of shape {np.shape(si)}.")
    return si


_PACKAGE_DIR = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


def _inside_package(filename: str) -> bool:
    """True for a file in the package folder or below it (not a sibling like "gasdyn2d_x")."""
    folder = os.path.dirname(os.path.abspath(filename))
    return folder == _PACKAGE_DIR or folder.startswith(_PACKAGE_DIR + os.sep)


def caller_stacklevel() -> int:
    """The ``stacklevel`` that points a warning at the first frame outside gasdyn2d."""
    frame: Any = sys._getframe(1)
    level = 1
    while frame is not None and _inside_package(frame.f_code.co_filename):
        frame = frame.f_back
        level += 1
    return level
