"""Each tutorial script in docs/tutorials runs headless and saves the figures it promises."""

import os
import subprocess
import sys
from pathlib import Path

import pytest

TUTORIALS = Path(__file__).resolve().parents[1] / "docs" / "tutorials"
PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"

# figures each tutorial must write (invented scenarios of our own)
EXPECTED = {
    "duct_reflection.py": ["duct_reflection.png"],
    "rocket_fin.py": ["rocket_fin_pressures.png", "rocket_fin_coast.png"],
    "demonstrator_intake.py": ["demonstrator_intake.png", "demonstrator_intake_sweep.png"],
    "blowdown_nozzle.py": ["blowdown_nozzle_net.png"],
}


def test_every_tutorial_is_listed():
    assert sorted(p.name for p in TUTORIALS.glob("*.py")) == sorted(EXPECTED)


@pytest.mark.parametrize("script", sorted(EXPECTED))
def test_tutorial_runs_and_saves_its_figures(script, tmp_path):
    # the package of this checkout, whatever is installed
    env = dict(os.environ, MPLBACKEND="Agg", PYTHONPATH=str(TUTORIALS.parents[1]))
    run = subprocess.run([sys.executable, str(TUTORIALS / script), str(tmp_path)], cwd=tmp_path,
                         env=env, capture_output=True, text=True, timeout=120)
    assert run.returncode == 0, run.stderr
    assert run.stdout.strip(), "a tutorial prints its analysis"
    assert "Traceback" not in run.stderr and "Warning" not in run.stderr, run.stderr
    for name in EXPECTED[script]:
        path = tmp_path / name
        assert path.exists(), f"{script} did not save {name}"
        assert path.read_bytes()[:8] == PNG_SIGNATURE and path.stat().st_size > 10_000


def _notebooks_module():
    import importlib.util

    spec = importlib.util.spec_from_file_location(
        "tutorial_notebooks", TUTORIALS.parent / "_hooks" / "notebooks.py")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


@pytest.mark.parametrize("script", sorted(EXPECTED))
def test_tutorial_becomes_a_notebook(script):
    notebooks = _notebooks_module()
    cells = notebooks._cells((TUTORIALS / script).read_text(encoding="utf-8"))
    kinds = [kind for kind, _ in cells]
    assert kinds[0] == "markdown" and cells[0][1].startswith("# ")
    assert kinds.count("code") >= 2 and "markdown" in kinds[1:]
    code = "\n".join(text for kind, text in cells if kind == "code")
    assert code.startswith(notebooks.FIRST_CELL)
    # the script-only lines (backend, output folder, savefig) stay out of the notebook
    assert "script only" not in code and "savefig" not in code and "sys.argv" not in code
    compile(code.replace(notebooks.FIRST_CELL, ""), script, "exec")  # valid Python
    nbformat = pytest.importorskip("nbformat")  # in the docs extra
    notebook = notebooks.notebook_from_script(TUTORIALS / script)
    nbformat.validate(notebook)
    assert len(notebook.cells) == len(cells) + 1  # and the note on where it came from
