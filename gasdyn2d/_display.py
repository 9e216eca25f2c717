"""Readable text and HTML tables for result objects, and conversion to pandas.

Every result type of gasdyn2d is a frozen dataclass that inherits
:class:`ResultTable`; each field carries its unit in the dataclass metadata
(``field(metadata={"unit": "rad"})``), which is what the tables and the
DataFrame column names show.
"""

from __future__ import annotations

import dataclasses
import html

import numpy as np


def unit_field(unit: str = "", **kwargs):
    """A dataclass field whose metadata records its unit ("" for ratios and Mach numbers)."""
    return dataclasses.field(metadata={"unit": unit}, **kwargs)


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
    """Mixin giving a dataclass a text table ``repr``, an HTML table and ``to_dict``."""

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
        return {f.name: getattr(self, f.name) for f in dataclasses.fields(self)}

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

    def _columns(self):
        """(column name, field, value) per field; shown nested results flattened one level."""
        for field in dataclasses.fields(self):
            value = getattr(self, field.name)
            if isinstance(value, ResultTable) and field.repr is not False:
                for inner in dataclasses.fields(value):
                    yield f"{field.name}.{inner.name}", inner, getattr(value, inner.name)
            else:
                yield field.name, field, value
