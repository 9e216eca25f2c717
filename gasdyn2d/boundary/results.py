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

__all__ = ["FieldInfo", "ResultTable", "optional_xarray", "pint_unit", "result_fields",
           "unit_field"]

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
_MAKERS: dict = {}


def _maker(cls):
    """A constructor for ``cls`` that stores the field values straight into the instance
    dict, one unpacking assignment (generated once per class, like dataclasses' own
    ``__init__``; about twice as fast as ``dict.update`` over ``zip``, which matters for
    the scalar calls of design codes)."""
    names = [f.name for f in result_fields(cls)]
    targets = ", ".join(f"d[{name!r}]" for name in names) + ("," if len(names) == 1 else "")
    source = (f"def make(values):\n    result = new(cls)\n    d = result.__dict__\n"
              f"    {targets} = values\n    return result\n")
    namespace = {"new": object.__new__, "cls": cls}
    exec(source, namespace)  # noqa: S102  (a fixed template over the class's field names)
    return namespace["make"]


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
        return str(array) if array.ndim == 0 else _label_list(array)
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


def _label_list(array, *, shown=6, width=60) -> str:
    """Text labels of an array, comma-separated; the first few and a count when many."""
    labels = [str(v) for v in array.reshape(-1)]
    text = ", ".join(labels)
    if len(labels) <= shown and len(text) <= width:
        return text
    return ", ".join(labels[:3]) + f", … ({len(labels)} labels)"


# ------------------------------------------------------------------ tables of rows
# A result holding many cases (a batch, the nodes of a net, the points of a polar)
# shows one row per case: every row when there are few, the first and last when
# there are many; fields that are not of the row shape are listed under the table.

FEW_ROWS = 12  #: up to this many rows, every row is shown
EDGE_ROWS = 5  #: beyond it, this many rows from each end
TEXT_WIDTH = 96  #: text tables are split into column blocks of at most this width


def _cell(value) -> str:
    """One table cell: six significant digits, labels and flags as they are."""
    if isinstance(value, (bool, np.bool_)):
        return str(bool(value))
    if isinstance(value, (str, np.str_)):
        return str(value)
    return f"{float(value):.6g}"


def _row_shape(items):
    """The row shape of (name, unit, value) items, or None when the result is one case.

    The same rows as :meth:`ResultTable.to_dataframe`: the shape of the first array
    item that is not a single label (a batch's inputs come first), when it has at
    least one dimension.
    """
    for _, _, value in items:
        magnitude = _magnitude(value)
        if dataclasses.is_dataclass(magnitude) or isinstance(magnitude, (tuple, list, dict, str)):
            continue
        array = np.asarray(magnitude)
        if array.dtype == object or (array.ndim == 0 and array.dtype.kind in "US"):
            continue
        return array.shape if array.ndim else None
    return None


def _row_indices(shape):
    """Flat indices of the rows shown, with None where rows are left out."""
    n = int(np.prod(shape))
    if n <= FEW_ROWS:
        return list(range(n))
    return list(range(EDGE_ROWS)) + [None] + list(range(n - EDGE_ROWS, n))


def _row_label(flat, shape) -> str:
    if len(shape) == 1:
        return str(flat)
    return ",".join(str(int(i)) for i in np.unravel_index(flat, shape))


class _RowTable(NamedTuple):
    """What a table of rows shows: its columns, the rows kept, and the fields beside it."""

    title: str
    headers: list  # (name, unit)
    columns: list  # flat arrays, one per header
    shape: tuple
    rows: list  # flat indices, None for the gap
    others: list  # (name, text, unit) of fields not of the row shape


def _row_table(result, items, shape) -> _RowTable:
    headers, columns, others = [], [], []
    for name, unit, value in items:
        magnitude = _magnitude(value)
        simple = not (dataclasses.is_dataclass(magnitude)
                      or isinstance(magnitude, (tuple, list, dict, str)))
        array = np.asarray(magnitude) if simple else None
        if array is not None and array.dtype != object and array.shape == shape:
            headers.append((name, unit))
            columns.append(array.reshape(-1))
        else:
            others.append((name, _format(value), unit))
    n = int(np.prod(shape))
    title = f"{type(result).__name__}: {n} row{'s' if n != 1 else ''}"
    if len(shape) > 1:
        title += f" (shape {shape})"
    return _RowTable(title, headers, columns, shape, _row_indices(shape), others)


def _header_text(name, unit) -> str:
    return f"{name} [{unit}]" if unit else name


def _text_table(table: _RowTable) -> str:
    n = int(np.prod(table.shape))
    index = ["row"] + ["…" if i is None else _row_label(i, table.shape) for i in table.rows]
    cells = [[_header_text(*h)] + ["…" if i is None else _cell(c[i]) for i in table.rows]
             for h, c in zip(table.headers, table.columns)]
    index_width = max(len(t) for t in index)
    widths = [max(len(t) for t in column) for column in cells]
    blocks: list = []
    block: list = []
    used = index_width
    for k, width in enumerate(widths):  # columns into blocks that fit the line width
        if block and used + 2 + width > TEXT_WIDTH:
            blocks.append(block)
            block, used = [], index_width
        block.append(k)
        used += 2 + width
    if block:
        blocks.append(block)
    lines = [table.title]
    for b, block in enumerate(blocks):
        if b:
            lines.append("")
        for r in range(len(index)):
            line = index[r].rjust(index_width) + "".join(
                "  " + cells[k][r].rjust(widths[k]) for k in block)
            lines.append(line.rstrip())
    if n > len([i for i in table.rows if i is not None]):
        lines.append(f"({n - 2 * EDGE_ROWS} rows not shown; to_dataframe() has them all)")
    width = max((len(name) for name, _, _ in table.others), default=0)
    for name, text, unit in table.others:
        lines.append(f"{name:<{width}} = {text}" + (f"  [{unit}]" if unit else ""))
    return "\n".join(lines)


def _html_table(table: _RowTable) -> str:
    span = len(table.headers) + 1
    head = "<th>row</th>" + "".join(
        f"<th><code>{html.escape(name)}</code>" + (f" [{html.escape(unit)}]" if unit else "")
        + "</th>" for name, unit in table.headers)
    body = []
    n = int(np.prod(table.shape))
    for i in table.rows:
        if i is None:
            body.append(f'<tr><td colspan="{span}">… {n - 2 * EDGE_ROWS} rows not shown '
                        "(<code>to_dataframe()</code> has them all) …</td></tr>")
            continue
        body.append(f"<tr><th>{html.escape(_row_label(i, table.shape))}</th>" + "".join(
            f"<td>{html.escape(_cell(c[i]))}</td>" for c in table.columns) + "</tr>")
    foot = "".join(
        f'<tr><td colspan="{span}"><code>{html.escape(name)}</code> = {html.escape(text)}'
        + (f" [{html.escape(unit)}]" if unit else "") + "</td></tr>"
        for name, text, unit in table.others)
    return (f"<table><caption>{html.escape(table.title)}</caption>"
            f"<thead><tr>{head}</tr></thead><tbody>{''.join(body)}</tbody>"
            + (f"<tfoot>{foot}</tfoot>" if foot else "") + "</table>")


class ResultTable:
    """Mixin giving a dataclass a text table ``repr``, an HTML table, ``to_dict``,
    ``to_dataframe`` and ``to_xarray``."""

    @classmethod
    def from_fields(cls, values):
        """The result with the given field values, in field order (no checks: the boundary's
        constructor, which has prepared every value)."""
        make = _MAKERS.get(cls)
        if make is None:
            make = _MAKERS[cls] = _maker(cls)
        return make(values)

    def _shown(self):
        """(name, unit, value) of everything the displays show, in order: the fields
        (nested results flattened one level) and then :meth:`_extra_columns`."""
        for name, field, value in self._columns():
            if field.repr is False:
                continue
            yield name, _unit_of(field, value), value
        yield from self._extra_columns()

    def _extra_columns(self):
        """(name, unit, value) of derived quantities shown after the fields (none here)."""
        return iter(())

    def _rows(self):
        for name, unit, value in self._shown():
            yield name, _format(value), unit

    def _table(self):
        """The table of rows when the result holds many cases, else None."""
        items = list(self._shown())
        shape = _row_shape(items)
        return None if shape is None else _row_table(self, items, shape)

    def __repr__(self) -> str:
        table = self._table()
        if table is not None:
            return _text_table(table)
        rows = list(self._rows())
        width = max((len(name) for name, _, _ in rows), default=0)
        lines = [f"{type(self).__name__}("]
        for name, text, unit in rows:
            suffix = f"  [{unit}]" if unit else ""
            lines.append(f"  {name:<{width}} = {text}{suffix}")
        lines.append(")")
        return "\n".join(lines)

    def _repr_html_(self) -> str:
        table = self._table()
        if table is not None:
            return _html_table(table)
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
        xr = optional_xarray()
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


def optional_xarray():
    """The xarray module, imported when a result is turned into a Dataset (an optional
    dependency), or an ImportError saying how to get it."""
    try:
        import xarray as xr
    except ImportError as exc:  # pragma: no cover - depends on the environment
        raise ImportError("to_xarray needs xarray: pip install xarray") from exc
    return xr


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
