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
