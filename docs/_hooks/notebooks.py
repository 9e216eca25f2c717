"""A Jupyter notebook from a tutorial script, and its execution (used by the docs hook).

The tutorial scripts are the single source: the notebook is generated from one.

- The module docstring becomes the first Markdown cell (its first line the title).
- ``# %%`` starts a code cell; ``# %% [markdown]`` starts a Markdown cell whose
  lines are comments (``# text``).
- Lines ending in ``# script only`` (the backend choice, the output folder, the
  ``savefig`` calls) are left out: in a notebook the figures show inline.

Needs nbformat to build the notebook and nbclient (with ipykernel) to run it.
"""

from __future__ import annotations

import ast
from pathlib import Path

SCRIPT_ONLY = "# script only"
FIRST_CELL = "%matplotlib inline"


def _cells(source: str):
    """(kind, text) cells of a tutorial script, docstring first."""
    tree = ast.parse(source)
    doc = ast.get_docstring(tree) or ""
    title, _, intro = doc.partition("\n")
    title = title.removeprefix("Tutorial:").strip().rstrip(".")
    cells = [("markdown", f"# {title[:1].upper() + title[1:]}\n\n{intro.strip()}")]
    body = source.splitlines()[tree.body[0].end_lineno:] if doc else source.splitlines()
    kind, lines = "code", [FIRST_CELL]
    for line in body:
        stripped = line.strip()
        if stripped.startswith("# %%"):
            cells.append((kind, "\n".join(lines)))
            kind = "markdown" if "[markdown]" in stripped else "code"
            lines = []
            continue
        if line.rstrip().endswith(SCRIPT_ONLY):
            continue
        if kind == "markdown":
            line = line.lstrip()
            line = line[2:] if line.startswith("# ") else line.lstrip("#")
        lines.append(line)
    cells.append((kind, "\n".join(lines)))
    return [(k, text.strip("\n")) for k, text in cells if text.strip()]


def notebook_from_script(script: Path):
    """The notebook (an ``nbformat`` NotebookNode, version 4) of a tutorial script."""
    import nbformat

    source = Path(script).read_text(encoding="utf-8")
    notebook = nbformat.v4.new_notebook()
    notebook.metadata["kernelspec"] = {"name": "python3", "display_name": "Python 3",
                                       "language": "python"}
    notebook.metadata["language_info"] = {"name": "python"}
    for kind, text in _cells(source):
        make = nbformat.v4.new_markdown_cell if kind == "markdown" else nbformat.v4.new_code_cell
        notebook.cells.append(make(text))
    notebook.cells.insert(1, nbformat.v4.new_markdown_cell(
        f"*Generated from the tutorial script `{Path(script).name}` of the gasdyn2d "
        "documentation; run it with gasdyn2d and matplotlib installed "
        '(`pip install "gasdyn2d[plot]"`).*'))
    nbformat.validate(notebook)
    return notebook


def execute(notebook, folder: Path, *, timeout: int = 300):
    """Run every cell of ``notebook`` in ``folder`` (a fresh Python kernel); return it."""
    from nbclient import NotebookClient

    NotebookClient(notebook, timeout=timeout, kernel_name="python3",
                   resources={"metadata": {"path": str(folder)}}).execute()
    return notebook


def notebook_bytes(notebook) -> bytes:
    import nbformat

    return nbformat.writes(notebook).encode("utf-8")
