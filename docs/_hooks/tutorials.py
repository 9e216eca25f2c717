"""mkdocs hook: pages, figures and notebooks made from the code while the docs are built.

- Tutorials: each ``docs/tutorials/<name>.py`` runs (headless, the Agg backend)
  in a temporary folder, and ``tutorials/<name>.md`` is added to the site: the
  script's docstring as the introduction, its figures, its printed output and
  its full source. Each script also becomes a Jupyter notebook
  (``tutorials/<name>.ipynb``, see ``notebooks.py``), executed in a fresh
  kernel when nbclient is installed (the ``docs`` extra has it), offered for
  download on the page. A tutorial or notebook that fails stops the build.
- Figures: the relation pages and the plotting page link ``figures/<name>.png``;
  ``figures.py`` draws them with gasdyn2d.
- Changelog: ``CHANGELOG.md`` at the repository root becomes ``changelog.md``.

This folder (``docs/_hooks``) is left out of the published site
(``exclude_docs`` in mkdocs.yml). Enable with ``hooks: [docs/_hooks/tutorials.py]``.
"""

from __future__ import annotations

import ast
import logging
import os
import subprocess
import sys
import tempfile
from pathlib import Path

from mkdocs.exceptions import PluginError
from mkdocs.structure.files import File

HERE = Path(__file__).resolve().parent
ROOT = HERE.parents[1]
sys.path[:0] = [str(HERE), str(ROOT)]  # the sibling modules, and this checkout's gasdyn2d

import figures  # noqa: E402
import notebooks  # noqa: E402

TUTORIAL_FOLDER = "tutorials"
TIMEOUT_SECONDS = 300
log = logging.getLogger("mkdocs.hooks.gasdyn2d")


def _run(script: Path, folder: Path) -> str:
    env = dict(os.environ, MPLBACKEND="Agg", PYTHONPATH=str(ROOT))
    try:
        run = subprocess.run([sys.executable, str(script), str(folder)], cwd=folder, env=env,
                             capture_output=True, text=True, timeout=TIMEOUT_SECONDS)
    except subprocess.TimeoutExpired as exc:
        raise PluginError(f"tutorial {script.name} took over {TIMEOUT_SECONDS} s") from exc
    if run.returncode != 0:
        raise PluginError(f"tutorial {script.name} failed:\n{run.stderr}")
    return run.stdout


def _notebook(script: Path, folder: Path):
    """The tutorial as a notebook (executed if nbclient is there): (bytes, executed)."""
    try:
        notebook = notebooks.notebook_from_script(script)
    except ImportError:
        log.info("nbformat is not installed: no notebook for %s", script.name)
        return None, False
    try:
        import nbclient  # noqa: F401
    except ImportError:
        log.info("nbclient is not installed: the notebook of %s is not executed", script.name)
        return notebooks.notebook_bytes(notebook), False
    saved = os.environ.get("PYTHONPATH")
    os.environ["PYTHONPATH"] = os.pathsep.join(filter(None, [str(ROOT), saved]))  # the kernel's
    try:
        notebooks.execute(notebook, folder, timeout=TIMEOUT_SECONDS)
    except Exception as exc:  # a failing cell stops the build, with the kernel's message
        raise PluginError(f"the notebook of tutorial {script.name} failed:\n{exc}") from exc
    finally:
        if saved is None:
            del os.environ["PYTHONPATH"]
        else:
            os.environ["PYTHONPATH"] = saved
    return notebooks.notebook_bytes(notebook), True


def _page(script: Path, output: str, figure_names: list[str], notebook: str | None) -> str:
    source = script.read_text(encoding="utf-8")
    doc = ast.get_docstring(ast.parse(source)) or script.stem
    title, _, intro = doc.partition("\n")
    title = title.removeprefix("Tutorial:").strip().rstrip(".")
    parts = [f"# {title[:1].upper() + title[1:]}", "", intro.strip(), "",
             f"Source: [`{script.name}`]({script.name}) — this page was produced by running "
             "it while the documentation was built."]
    if notebook:
        parts += ["", f"Notebook: [`{notebook}`]({notebook}) — the same tutorial as a Jupyter "
                  "notebook, generated from the script and run in the same build; download it "
                  "and open it with Jupyter."]
    parts.append("")
    if figure_names:
        parts += ["## Figures", ""]
        parts += [f"![{name}](figures/{name})\n" for name in figure_names]
    parts += ["## Printed output", "", "```text", output.rstrip(), "```", "",
              "## Script", "", "```python", source.rstrip(), "```", ""]
    return "\n".join(parts)


def _tutorials(files, config):
    folder = Path(config["docs_dir"]) / TUTORIAL_FOLDER
    for script in sorted(folder.glob("*.py")):
        with tempfile.TemporaryDirectory(prefix=f"tutorial-{script.stem}-") as work:
            work = Path(work)
            output = _run(script, work)
            names = sorted(p.name for p in work.glob("*.png"))
            for name in names:
                files.append(File.generated(config, f"{TUTORIAL_FOLDER}/figures/{name}",
                                            content=(work / name).read_bytes()))
        with tempfile.TemporaryDirectory(prefix=f"notebook-{script.stem}-") as work:
            content, executed = _notebook(script, Path(work))
        notebook = None
        if content is not None:
            notebook = f"{script.stem}.ipynb"
            files.append(File.generated(config, f"{TUTORIAL_FOLDER}/{notebook}", content=content))
            log.info("notebook %s %s", notebook, "executed" if executed else "not executed")
        files.append(File.generated(config, f"{TUTORIAL_FOLDER}/{script.stem}.md",
                                    content=_page(script, output, names, notebook)))


def on_files(files, config):
    """Add the tutorial pages, notebooks and figures, the page figures and the changelog."""
    _tutorials(files, config)
    for name in figures.FIGURES:
        files.append(File.generated(config, f"figures/{name}", content=figures.png(name)))
    changelog = ROOT / "CHANGELOG.md"
    if changelog.exists():
        files.append(File.generated(config, "changelog.md",
                                    content=changelog.read_text(encoding="utf-8")))
    return files
