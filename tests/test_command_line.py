"""The command line: ``python -m gasdyn2d`` — help, the tour, its figure, relation tables as CSV.

Published values beside the checks: NACA Report 1135 (Ames Research Staff, 1953),
Tables I and II; the oblique-shock value from /work/shared/SOURCES.md.
"""

import csv
import io
import os
import re
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

import gasdyn2d
from gasdyn2d.__main__ import main

ROOT = Path(__file__).resolve().parents[1]
PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"


def run_module(args, folder):
    """``python -m gasdyn2d ARGS`` in ``folder``, importing this checkout's package."""
    env = dict(os.environ, PYTHONPATH=str(ROOT), MPLBACKEND="Agg")
    return subprocess.run([sys.executable, "-m", "gasdyn2d", *args], cwd=folder, env=env,
                          capture_output=True, text=True, timeout=120)


def table(capsys, *args):
    """Rows of ``table ARGS`` as dictionaries, read back with the csv module."""
    assert main(["table", *args]) == 0
    return list(csv.DictReader(io.StringIO(capsys.readouterr().out)))


# ------------------------------------------------------------------ help, tour, figure


def test_help_exits_0_prints_usage_and_writes_nothing(tmp_path):
    run = run_module(["--help"], tmp_path)
    assert run.returncode == 0, run.stderr
    assert run.stdout.startswith("usage: python -m gasdyn2d")
    assert "tour" in run.stdout and "table" in run.stdout and "--figure" in run.stdout
    assert "Quillmoss" not in run.stdout  # the tour did not run
    assert list(tmp_path.iterdir()) == []


def test_tour_prints_and_writes_no_file_without_figure(tmp_path):
    run = run_module([], tmp_path)
    assert run.returncode == 0, run.stderr
    assert "Quillmoss" in run.stdout and "preliminary design" in run.stdout
    assert "--figure" in run.stdout  # says how to get the picture
    assert list(tmp_path.iterdir()) == []


def test_figure_only_when_asked(tmp_path, capsys):
    pytest.importorskip("matplotlib")
    import matplotlib

    matplotlib.use("Agg")
    path = tmp_path / "waves.png"
    assert main(["tour", "--figure", str(path)]) == 0
    assert f"saved {path}" in capsys.readouterr().out
    assert path.read_bytes()[:8] == PNG_SIGNATURE
    assert sorted(tmp_path.iterdir()) == [path]
    other = tmp_path / "top-level.png"
    assert main(["--figure", str(other)]) == 0  # the option before the (default) command
    assert other.exists()


def test_version_is_the_package_metadata(capsys):
    with pytest.raises(SystemExit) as stop:
        main(["--version"])
    assert stop.value.code == 0
    assert capsys.readouterr().out.strip() == f"gasdyn2d {gasdyn2d.__version__}"


def test_subcommand_help(capsys):
    with pytest.raises(SystemExit) as stop:
        main(["table", "--help"])
    assert stop.value.code == 0
    text = capsys.readouterr().out
    assert "RELATION" in text and "oblique-shock" in text and "--turn" in text


# ------------------------------------------------------------------ relation tables


def test_isentropic_table_against_naca_1135(capsys):
    rows = table(capsys, "isentropic", "--mach", "1.5", "3", "--step", "0.5")
    assert [float(r["M"]) for r in rows] == [1.5, 2.0, 2.5, 3.0]
    assert list(rows[0]) == ["M", "T_T0", "p_p0", "rho_rho0", "A_Astar", "mach_angle [deg]",
                             "prandtl_meyer [deg]"]
    at_2 = rows[1]
    # NACA Report 1135, Table I, M = 2.00: p/p0 = .1278, T/T0 = .5556, A/A* = 1.688, ν = 26.380°
    assert float(at_2["p_p0"]) == pytest.approx(0.1278, abs=5e-5)
    assert float(at_2["T_T0"]) == pytest.approx(0.5556, abs=5e-5)
    assert float(at_2["A_Astar"]) == pytest.approx(1.688, abs=5e-4)
    assert float(at_2["prandtl_meyer [deg]"]) == pytest.approx(26.380, abs=5e-4)
    assert float(at_2["mach_angle [deg]"]) == pytest.approx(30.0, rel=1e-9)  # asin(1/2)


def test_normal_shock_table_and_digits(capsys):
    rows = table(capsys, "normal-shock", "--mach", "2", "--digits", "4")
    (row,) = rows
    # NACA Report 1135, Table II, M1 = 2.00: M2 = .5774, p2/p1 = 4.500, p02/p01 = .7209
    assert row["M2"] == "0.5774" and row["p2_p1"] == "4.5" and row["p02_p01"] == "0.7209"


def test_oblique_table_empty_fields_where_detached(capsys, tmp_path):
    out = tmp_path / "shocks.csv"
    assert main(["table", "oblique-shock", "--mach", "1.2", "2.0", "--points", "3",
                 "--turn", "10", "--output", str(out)]) == 0
    assert "wrote 3 rows" in capsys.readouterr().err
    rows = list(csv.DictReader(out.open()))
    assert [r["M1"] for r in rows] == ["1.2", "1.6", "2"]
    # 10° exceeds the largest deflection at M = 1.2 (below 12.11°, the M = 1.5 value in
    # SOURCES.md; θmax rises with M): no attached shock, empty fields
    assert rows[0]["wave_angle [deg]"] == "" and rows[0]["M2"] == ""
    # SOURCES.md (NACA 1135 oblique-shock charts): M1 = 2, θ = 10°: β = 39.3139°
    assert float(rows[2]["wave_angle [deg]"]) == pytest.approx(39.3139, abs=1e-4)
    strong = table(capsys, "oblique-shock", "--mach", "2", "--turn", "10", "--branch", "strong")
    assert float(strong[0]["M2"]) < 1.0  # the strong branch is subsonic behind the shock


def test_detachment_table_in_radians(capsys):
    rows = table(capsys, "detachment", "--mach", "2", "--angles", "rad")
    # SOURCES.md (computed), M = 2: θmax = 22.9735°
    assert float(rows[0]["max_deflection [rad]"]) == pytest.approx(np.radians(22.9735), abs=2e-6)
    assert float(rows[0]["sonic_deflection [rad]"]) < float(rows[0]["max_deflection [rad]"])


def test_expansion_fan_table_with_gamma(capsys):
    rows = table(capsys, "expansion-fan", "--mach", "2", "--turn", "10", "--gamma", "1.3")
    nu2 = float(rows[0]["nu2 [deg]"])
    nu1 = float(rows[0]["nu1 [deg]"])
    # the fan turns the flow by ν2 - ν1 (fact of the trade)
    assert nu2 - nu1 == pytest.approx(10.0, abs=1e-8)
    # ν(2) for γ = 1.3 from the closed form (NACA Report 1135, eq. 171)
    g = 1.3
    ref = (np.sqrt((g + 1) / (g - 1)) * np.arctan(np.sqrt((g - 1) / (g + 1) * 3.0))
           - np.arctan(np.sqrt(3.0)))
    assert nu1 == pytest.approx(np.degrees(ref), rel=1e-9)


@pytest.mark.parametrize("args, message", [
    (["normal-shock", "--mach", "0.5", "2"], "at least 1"),
    (["isentropic", "--mach", "0", "2"], "above 0"),
    (["oblique-shock", "--mach", "2"], "needs --turn"),
    (["isentropic", "--mach", "2", "--turn", "5"], "takes no --turn"),
    (["isentropic", "--mach", "3", "2"], "must be above the lower end"),
    (["isentropic", "--mach", "1", "2", "3"], "one value or two"),
    (["isentropic", "--mach", "1", "2", "--step", "0"], "--step"),
    (["isentropic", "--mach", "1", "2", "--points", "1"], "--points"),
    (["isentropic", "--mach", "2", "--gamma", "0.9"], "--gamma"),
    (["isentropic", "--mach", "1", "2", "--step", "1e-9"], "more than"),
    (["sound-speed", "--mach", "2"], "RELATION"),
])
def test_bad_arguments_exit_2_naming_the_option(args, message, capsys):
    with pytest.raises(SystemExit) as stop:
        main(["table", *args])
    assert stop.value.code == 2
    assert message in capsys.readouterr().err


def test_figure_option_is_refused_with_table(capsys):
    with pytest.raises(SystemExit) as stop:
        main(["--figure", "x.png", "table", "isentropic", "--mach", "2"])
    assert stop.value.code == 2 and "--figure" in capsys.readouterr().err


def test_version_comes_from_one_place():
    # pyproject.toml reads the version from gasdyn2d.__version__: the installed metadata agrees
    from importlib.metadata import PackageNotFoundError, version

    try:
        installed = version("gasdyn2d")
    except PackageNotFoundError:
        pytest.skip("gasdyn2d is not installed (run from a source tree)")
    if Path(gasdyn2d.__file__).resolve().parents[1] != ROOT:
        pytest.skip("another gasdyn2d is imported")
    pyproject = (ROOT / "pyproject.toml").read_text()
    assert 'dynamic = ["version"]' in pyproject
    assert not re.search(r'^version\s*=\s*"', pyproject, flags=re.M)  # no second version
    assert installed == gasdyn2d.__version__
