"""Result objects: immutable, readable as tables, convertible to pandas and xarray.

Every result type of gasdyn2d is a frozen dataclass that inherits
:class:`ResultTable`; each field carries its unit, its dtype and a one-line
description in the dataclass metadata (:func:`unit_field`), which is what the
boundary uses to attach units, what the tables and the DataFrame column names
show and what :meth:`ResultTable.to_xarray` writes into the attributes.

Results are immutable in fact: fields cannot be reassigned, array fields are
read-only ndarrays, and no two fields (of one result or of two results) share
memory, so that changing a copy of one can never change another.
"""

from __future__ import annotations

import dataclasses
import html
from typing import NamedTuple

import numpy as np

__all__ = ["FieldInfo", "ResultTable", "pint_unit", "result_fields", "unit_field"]

#: pint spellings of the field unit texts, for DataArray "units" attributes.
_PINT_UNITS = {"rad": "rad", "Pa": "Pa", "K": "K", "m": "m", "m/s": "m/s",
               "kg/m³": "kg/m**3", "J/(kg·K)": "J/(kg*K)", "kg/s": "kg/s",
               "kg/(s·m)": "kg/(s*m)", "N": "N", "N/m": "N/m", "s": "s", "m²": "m**2"}


def unit_field(unit: str = "", doc: str = "", *, dtype=float, trailing: str = "", **kwargs):
    """A dataclass field with its unit ("" for ratios and Mach numbers), description and dtype.

    ``trailing`` names a last axis that the field has beyond the case shape (one entry
    per panel of a section, per ramp of an intake): the boundary keeps that axis and
    labels it with this name in DataArrays (pandas Series inputs give a DataFrame).
    """
    return dataclasses.field(metadata={"unit": unit, "doc": doc, "dtype": np.dtype(dtype),
                                       "trailing": trailing}, **kwargs)


class FieldInfo(NamedTuple):
    """What the boundary needs to know of one result field."""

    name: str
    unit: str  #: SI unit text ("" for plain numbers)
    dtype: np.dtype
    description: str
    pint_unit: str  #: the unit as pint spells it
    trailing: str = ""  #: name of a last axis beyond the case shape ("" for none)


def pint_unit(unit_text: str) -> str:
    """The pint spelling of a field's unit text ("" when it has none)."""
    return _PINT_UNITS.get(unit_text, "")


_FIELDS: dict = {}


def result_fields(result_type) -> tuple:
    """The :class:`FieldInfo` of every field of a result type, in order (cached)."""
    found = _FIELDS.get(result_type)
    if found is None:
        found = tuple(
            FieldInfo(f.name, f.metadata.get("unit", ""),
                      f.metadata.get("dtype", np.dtype(float)), f.metadata.get("doc", ""),
                      _PINT_UNITS.get(f.metadata.get("unit", ""), ""),
                      f.metadata.get("trailing", ""))
            for f in dataclasses.fields(result_type))
        _FIELDS[result_type] = found
    return found


def _magnitude(value):
    return getattr(value, "magnitude", value)


def _unit_of(field, value) -> str:
    units = getattr(value, "units", None)
    if units is not None:
        return f"{units:~P}"
    return field.metadata.get("unit", "")


def _format(value) -> str:
    magnitude = _magnitude(value)
    if isinstance(magnitude, str):
        return magnitude
    if isinstance(magnitude, tuple) and all(isinstance(item, str) for item in magnitude):
        return ", ".join(magnitude) if magnitude else "(none)"
    array = np.asarray(magnitude)
    if array.dtype.kind in "US":
        return str(array) if array.ndim == 0 else f"array of {array.size} labels"
    if array.dtype == object:
        return repr(magnitude)
    if array.dtype == bool:
        if array.ndim == 0:
            return str(bool(array))
        return f"{int(array.sum())} of {array.size} True" if array.size > 4 else str(array.tolist())
    if array.ndim == 0:
        return f"{float(array):.6g}"
    if array.size <= 4:
        return np.array2string(array, precision=6, separator=", ")
    with np.errstate(all="ignore"):
        finite = array[np.isfinite(array)]
    if finite.size == 0:
        return f"shape {array.shape}, all NaN"
    return f"shape {array.shape}, {finite.min():.6g} … {finite.max():.6g}"


class ResultTable:
    """Mixin giving a dataclass a text table ``repr``, an HTML table, ``to_dict``,
    ``to_dataframe`` and ``to_xarray``."""

    @classmethod
    def from_fields(cls, values):
        """The result with the given field values, in field order (no checks: the boundary's
        constructor, which has prepared every value)."""
        result = object.__new__(cls)
        result.__dict__.update(zip([f.name for f in result_fields(cls)], values))
        return result

    def _rows(self):
        for name, field, value in self._columns():
            if field.repr is False:
                continue
            yield name, _format(value), _unit_of(field, value)

    def __repr__(self) -> str:
        rows = list(self._rows())
        width = max((len(name) for name, _, _ in rows), default=0)
        lines = [f"{type(self).__name__}("]
        for name, text, unit in rows:
            suffix = f"  [{unit}]" if unit else ""
            lines.append(f"  {name:<{width}} = {text}{suffix}")
        lines.append(")")
        return "\n".join(lines)

    def _repr_html_(self) -> str:
        cells = "".join(
            f"<tr><td><code>{html.escape(name)}</code></td><td>{html.escape(text)}</td>"
            f"<td>{html.escape(unit)}</td></tr>"
            for name, text, unit in self._rows()
        )
        return (
            f"<table><caption>{html.escape(type(self).__name__)}</caption>"
            "<thead><tr><th>field</th><th>value</th><th>unit</th></tr></thead>"
            f"<tbody>{cells}</tbody></table>"
        )

    def to_dict(self) -> dict:
        """The fields as a plain ``{name: value}`` dictionary."""
        return {f.name: getattr(self, f.name) for f in result_fields(type(self))}

    def to_dataframe(self):
        """One row per case, one column per array field, named with its unit.

        Needs pandas (``pip install pandas``). A nested result shown in the
        table (a field that is itself a ``ResultTable``) gives one column per
        field of its own, named ``"outer.inner [unit]"``. Fields that are not
        arrays of the batch shape (per-panel arrays, hidden nested objects)
        are left out.
        """
        try:
            import pandas as pd
        except ImportError as exc:  # pragma: no cover - depends on the environment
            raise ImportError("to_dataframe needs pandas: pip install pandas") from exc
        entries = []
        for name, field, value in self._columns():
            magnitude = _magnitude(value)
            if dataclasses.is_dataclass(magnitude) or isinstance(magnitude, (tuple, list, dict)):
                continue
            array = np.asarray(magnitude)
            if array.dtype == object:
                continue
            unit = _unit_of(field, value)
            entries.append((f"{name} [{unit}]" if unit else name, array))
        # the batch shape is that of the first field that is not a single label: a label
        # that holds for every case (a wave's family, a meeting point's kind) is repeated
        label = lambda a: a.ndim == 0 and a.dtype.kind in "US"  # noqa: E731
        shape = next((a.shape for _, a in entries if not label(a)), ())
        columns = {}
        for name, array in entries:
            if label(array):
                array = np.broadcast_to(array, shape)
            if array.shape == shape:
                columns[name] = array.reshape(-1)
        return pd.DataFrame(columns)

    def to_xarray(self):
        """An ``xarray.Dataset``, one variable per field of the case shape.

        Needs xarray (``pip install "gasdyn2d[sweeps]"``). The dimensions are those of
        the inputs when they were DataArrays (their coordinates kept) or a pandas
        index; otherwise ``case`` for one dimension and ``case_0``, ``case_1``, ...
        for more. Units are in each variable's ``units`` attribute (or in the data,
        for Quantities, as pint-xarray keeps them); descriptions in ``long_name``.
        """
        try:
            import xarray as xr
        except ImportError as exc:  # pragma: no cover - depends on the environment
            raise ImportError("to_xarray needs xarray: pip install xarray") from exc
        variables = {}
        for info in result_fields(type(self)):
            value = getattr(self, info.name)
            variables[info.name] = _as_variable(value, info, xr)
        shapes = {v.shape for v in variables.values() if v.ndim}
        keep = {k: v for k, v in variables.items() if not shapes or v.shape in shapes or v.ndim == 0}
        return xr.Dataset(keep)

    def _columns(self):
        """(column name, field, value) per field; shown nested results flattened one level."""
        for field in dataclasses.fields(self):
            value = getattr(self, field.name)
            if isinstance(value, ResultTable) and field.repr is not False:
                for inner in dataclasses.fields(value):
                    yield f"{field.name}.{inner.name}", inner, getattr(value, inner.name)
            else:
                yield field.name, field, value


def _as_variable(value, info, xr):
    """One field as a DataArray (labels kept when it has them)."""
    if isinstance(value, xr.DataArray):
        return value
    if type(value).__module__.startswith("pandas"):
        if value.ndim == 2:  # a field with a trailing axis, from a Series input
            index = value.index
            array = xr.DataArray(value.to_numpy(), dims=(index.name or "case", info.trailing),
                                 coords={index.name or "case": index})
        else:
            array = xr.DataArray.from_series(value)
    else:
        data = value
        ndim = np.ndim(getattr(data, "magnitude", data))
        trailing = (info.trailing,) if info.trailing and ndim else ()
        ndim -= len(trailing)
        dims = ("case",) if ndim == 1 else tuple(f"case_{i}" for i in range(ndim))
        array = xr.DataArray(data, dims=dims + trailing)
    attrs = {"long_name": info.description} if info.description else {}
    if info.unit and not hasattr(array.data, "units"):
        attrs["units"] = info.pint_unit
    return array.assign_attrs(attrs).rename(info.name)
