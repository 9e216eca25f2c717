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
    result = doctest.testfile(
        str(page), module_relative=False,
        optionflags=doctest.ELLIPSIS | doctest.NORMALIZE_WHITESPACE,
    )
    assert result.failed == 0, f"{result.failed} of {result.attempted} examples failed in {page.name}"


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
