"""mkdocs hook: run every tutorial script at build time and add a page for each.

For each ``docs/tutorials/<name>.py`` the hook runs the script (headless, the
Agg backend) in a temporary folder and adds ``tutorials/<name>.md`` to the
site: the script's docstring as the introduction, its figures, its printed
output and its full source. A tutorial that fails stops the build, so the
published tutorials always ran against the code being documented.

Enable with ``hooks: [docs/_hooks/tutorials.py]`` in mkdocs.yml (mkdocs >= 1.4).
"""

from __future__ import annotations

import ast
import os
import subprocess
import sys
import tempfile
from pathlib import Path

from mkdocs.exceptions import PluginError
from mkdocs.structure.files import File

TUTORIAL_FOLDER = "tutorials"
TIMEOUT_SECONDS = 300


def _run(script: Path, folder: Path) -> str:
    env = dict(os.environ, MPLBACKEND="Agg")
    try:
        run = subprocess.run([sys.executable, str(script), str(folder)], cwd=folder, env=env,
                             capture_output=True, text=True, timeout=TIMEOUT_SECONDS)
    except subprocess.TimeoutExpired as exc:
        raise PluginError(f"tutorial {script.name} took over {TIMEOUT_SECONDS} s") from exc
    if run.returncode != 0:
        raise PluginError(f"tutorial {script.name} failed:\n{run.stderr}")
    return run.stdout


def _page(script: Path, output: str, figures: list[str]) -> str:
    source = script.read_text(encoding="utf-8")
    doc = ast.get_docstring(ast.parse(source)) or script.stem
    title, _, intro = doc.partition("\n")
    title = title.removeprefix("Tutorial:").strip().rstrip(".")
    parts = [f"# {title[:1].upper() + title[1:]}", "", intro.strip(), "",
             f"Source: [`{script.name}`]({script.name}) — this page was produced by running "
             "it while the documentation was built.", ""]
    if figures:
        parts += ["## Figures", ""]
        parts += [f"![{name}](figures/{name})\n" for name in figures]
    parts += ["## Printed output", "", "```text", output.rstrip(), "```", "",
              "## Script", "", "```python", source.rstrip(), "```", ""]
    return "\n".join(parts)


def on_files(files, config):
    """Run the tutorials and add their pages and figures to the site's files."""
    folder = Path(config["docs_dir"]) / TUTORIAL_FOLDER
    for script in sorted(folder.glob("*.py")):
        with tempfile.TemporaryDirectory(prefix=f"tutorial-{script.stem}-") as work:
            work = Path(work)
            output = _run(script, work)
            figures = sorted(p.name for p in work.glob("*.png"))
            for name in figures:
                files.append(File.generated(config, f"{TUTORIAL_FOLDER}/figures/{name}",
                                            content=(work / name).read_bytes()))
        files.append(File.generated(config, f"{TUTORIAL_FOLDER}/{script.stem}.md",
                                    content=_page(script, output, figures)))
    return files
