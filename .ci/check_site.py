"""Check a built documentation site: what ``mkdocs build --strict`` cannot see.

Usage: ``python .ci/check_site.py SITE_FOLDER``. Checks that the build hook is not
published, that ``404.html`` finds its styles and scripts under ``site_url``'s
path, that the relation and plotting pages show their figures and typeset
equations, and that every tutorial notebook is there, valid, and was executed.
"""

import json
import re
import sys
from pathlib import Path
from urllib.parse import urlparse


def fail(message):
    print(f"check_site: {message}", file=sys.stderr)
    sys.exit(1)


def main(site: Path, config: Path) -> None:
    if (site / "_hooks").exists() or list(site.rglob("notebooks.py")):
        fail("the docs build hook was published into the site")
    site_url = re.search(r"^site_url:\s*(\S+)", config.read_text(), re.M)
    if not site_url:
        fail("mkdocs.yml has no site_url: 404.html would use broken root-absolute paths")
    base = urlparse(site_url.group(1)).path
    page = (site / "404.html").read_text(encoding="utf-8")
    links = re.findall(r'(?:href|src)="([^"#?]+)', page)
    local = [link for link in links if not re.match(r"[a-z]+:", link)]
    if not local:
        fail("404.html links nothing local")
    for link in local:
        if not link.startswith(base):
            fail(f"404.html links {link!r}, outside the site's path {base!r}")
        target = site / link[len(base):]
        if target.is_dir():
            target = target / "index.html"
        if not target.exists():
            fail(f"404.html links {link!r}, which is not in the site")
    for name in ("isentropic", "normal-shocks", "oblique-shocks", "expansion", "plotting"):
        html = (site / name / "index.html").read_text(encoding="utf-8")
        images = re.findall(r'<img[^>]+src="([^"]+)"', html)
        if not images:
            fail(f"the {name} page shows no figure")
        for src in images:
            if not (site / name / src).resolve().exists():
                fail(f"the {name} page shows {src}, which is not in the site")
        if name != "plotting" and 'class="arithmatex"' not in html:
            fail(f"the {name} page has no typeset equation")
    notebooks = sorted((site / "tutorials").glob("*.ipynb"))
    scripts = sorted(p.stem for p in (config.parent / "docs" / "tutorials").glob("*.py"))
    if [p.stem for p in notebooks] != scripts:
        fail(f"notebooks {[p.name for p in notebooks]} do not match the tutorials {scripts}")
    for path in notebooks:
        notebook = json.loads(path.read_text(encoding="utf-8"))
        code = [c for c in notebook["cells"] if c["cell_type"] == "code"]
        if not code or any(c.get("execution_count") is None for c in code):
            fail(f"{path.name} was not executed")
        if not any(o.get("data", {}).get("image/png") for c in code for o in c["outputs"]):
            fail(f"{path.name} shows no figure")
        if any(o.get("output_type") == "error" for c in code for o in c["outputs"]):
            fail(f"{path.name} has an error output")
    print(f"check_site: {site} is complete ({len(notebooks)} executed notebooks)")


if __name__ == "__main__":
    main(Path(sys.argv[1]), Path(__file__).resolve().parents[1] / "mkdocs.yml")
