"""The examples in README.md and the docs pages run and print what they say.

Each Markdown file is run as a doctest file: every ``>>>`` block in it must
produce the shown output, so the documentation cannot drift from the code.
"""

import doctest
import pathlib

import pytest

ROOT = pathlib.Path(__file__).resolve().parents[1]
PAGES = [ROOT / "README.md", *sorted((ROOT / "docs").rglob("*.md"))]


@pytest.mark.parametrize("page", PAGES, ids=lambda p: str(p.relative_to(ROOT)))
def test_examples_in_page_run(page):
    _registry_as_in_a_fresh_process(page)
    result = doctest.testfile(
        str(page), module_relative=False,
        optionflags=doctest.ELLIPSIS | doctest.NORMALIZE_WHITESPACE,
    )
    assert result.failed == 0, f"{result.failed} of {result.attempted} examples failed in {page.name}"


def _registry_as_in_a_fresh_process(page):
    """Each page runs as if in a new Python process: importing pint_xarray sets
    ``force_ndarray_like`` on pint's application registry, but only the first time, so a
    page that imports it gets the flag set and the others start without it (tests/conftest.py
    puts it back after the page either way)."""
    import sys

    pint = sys.modules.get("pint")
    if pint is not None:
        uses_pint_xarray = "import pint_xarray" in page.read_text(encoding="utf-8")
        pint.get_application_registry().force_ndarray_like = uses_pint_xarray


# Names of real aerospace vehicles, engines, tunnels or companies that earlier demo
# scenarios used by accident (issue 14); demo scenarios use coined names only.
RETIRED_SCENARIO_NAMES = ("Tern", "Kestrel", "Petrel", "Wren", "Kite-25")


def test_no_demo_uses_a_retired_scenario_name():
    import re

    files = [ROOT / "README.md", *(ROOT / "docs").rglob("*.md"), *(ROOT / "docs").rglob("*.py"),
             *(ROOT / "gasdyn2d").rglob("*.py"),
             *(p for p in (ROOT / "tests").rglob("*.py") if p.name != "test_docs_examples.py")]
    pattern = re.compile(r"\b(" + "|".join(map(re.escape, RETIRED_SCENARIO_NAMES)) + r")\b")
    found = [f"{p.relative_to(ROOT)}: {m.group(0)}" for p in files
             for m in pattern.finditer(p.read_text(encoding="utf-8"))]
    assert not found, found


def test_api_reference_lists_every_public_module():
    # every module of the package whose name has no leading underscore has a ":::" entry
    pages = "\n".join(p.read_text(encoding="utf-8") for p in (ROOT / "docs" / "api").glob("*.md"))
    documented = set()
    for line in pages.splitlines():
        if line.startswith("::: "):
            documented.add(line[4:].strip())
    missing = []
    for path in sorted((ROOT / "gasdyn2d").rglob("*.py")):
        parts = path.relative_to(ROOT).with_suffix("").parts
        if any(part.startswith("_") for part in parts if part != "__init__"):
            continue
        if parts[-1] == "__init__":
            parts = parts[:-1]
            if len(parts) > 1 and parts[1] != "plot":  # floors are folders, not modules
                continue
            if len(parts) == 1:
                continue
        name = ".".join(parts)
        if name not in documented:
            missing.append(name)
    assert not missing, f"public modules missing from docs/api: {missing}"


def test_relation_pages_link_the_figures_the_hook_draws():
    import re
    import sys

    sys.path.insert(0, str(ROOT / "docs" / "_hooks"))
    pytest.importorskip("matplotlib")
    import figures

    linked = set()
    for page in (ROOT / "docs").glob("*.md"):
        linked |= set(re.findall(r"\]\(figures/([^)]+)\)", page.read_text(encoding="utf-8")))
    assert linked == set(figures.FIGURES)
