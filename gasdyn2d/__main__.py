"""``python -m gasdyn2d``: the command line — a worked tour and relation tables as CSV.

Commands (``python -m gasdyn2d --help`` lists them, ``COMMAND --help`` each one's options):

- ``tour`` (the default when no command is given): a short worked analysis of an
  invented vehicle, printed; ``--figure PATH`` also saves a figure (nothing is
  written without it).
- ``table RELATION --mach LOW HIGH``: one relation over a range of Mach numbers
  as CSV, to standard output or ``--output FILE``, for a spreadsheet or a
  script in another language.

The tour's scenario is ours: *Quillmoss*, a small uncrewed demonstrator cruising
at Mach 2.2 at 15 km (standard-atmosphere static pressure 12.11 kPa,
temperature 216.65 K). The tour follows the air from the nose wedge to the
intake and the control fin, printing what each gasdyn2d tool says about it.
"""

from __future__ import annotations

import argparse
import csv
import sys

import numpy as np

import gasdyn2d as gd
from gasdyn2d import ureg

PROGRAM = "python -m gasdyn2d"
CAUTION = ("inviscid, perfect-gas estimates for preliminary design only; real designs "
           "need test, validated CFD and qualified engineering review.")


# ------------------------------------------------------------------ the tour


def _rule(title: str) -> None:
    print(f"\n{title}\n{'-' * len(title)}")


def free_stream():
    _rule("1. Free stream: Quillmoss at Mach 2.2, 15 km")
    air = gd.FlowState(2.2, 12.11 * ureg.kPa, 216.65 * ureg.K)
    print(f"speed {air.V.to('m/s'):.1f~P}, dynamic pressure {air.q.to('kPa'):.2f~P}, "
          f"stagnation {air.p0.to('kPa'):.1f~P} and {air.T0.to('K'):.1f~P}")
    print(f"Mach angle {air.mu.to('deg'):.2f~P}, Prandtl–Meyer angle {air.nu.to('deg'):.2f~P}")
    return air


def nose_wedge(air):
    _rule("2. Nose wedge, 8° half-angle: the attached oblique shock")
    shock = gd.oblique_shock(air.M, deflection=8 * ureg.deg)
    theta_max, _ = gd.max_deflection(air.M)
    print(f"wave angle {shock.wave_angle.to('deg'):.2f~P}, M2 = {shock.M2:.4f}, "
          f"p2/p1 = {shock.p2_p1:.4f}, p02/p01 = {shock.p02_p01:.5f}")
    print(f"detachment would need {np.degrees(theta_max):.2f}° at this Mach number")
    fan = gd.expansion_fan(shock.M2, deflection=8 * ureg.deg)
    print(f"turning back to the free-stream direction: fan to M = {fan.M2:.4f}, "
          f"p/p_inf = {shock.p2_p1 * fan.p2_p1:.4f}")


def pitot(air):
    _rule("3. Pitot probe on the nose boom")
    shock = gd.normal_shock(air.M)
    p_pitot = shock.p02_p1 * air.p
    print(f"normal shock ahead of the probe: M2 = {shock.M2:.4f}, "
          f"recovery {shock.p02_p01:.4f}; the probe reads {p_pitot.to('kPa'):.2f~P}")
    back = gd.normal_shock(p02_p1=(p_pitot / air.p).m_as(""))
    print(f"inverting the reading gives back M = {back.M1:.6f}")


def cowl_reflection(air):
    _rule("4. Intake ramp shock reflecting from the cowl: a coupled wave pattern")
    intake = gd.WavePattern(air)
    intake.add_wave("ramp shock", upstream="1", downstream="2", family="left", turn=8 * ureg.deg)
    intake.add_wave("cowl reflection", upstream="2", downstream="3", family="right")
    intake.add_wall("3", direction=0 * ureg.deg)  # the cowl's inner wall is axial
    solution = intake.solve()
    duct = solution.state("3")
    print(f"the cowl shock turns the flow {solution.wave('cowl reflection').turn.to('deg'):.2f~P};"
          f" inside: M = {duct.M:.4f}, p = {duct.p.to('kPa'):.2f~P}, "
          f"p0 recovery {duct.p0_si / air.p0_si:.4f}")
    limit = gd.reflection_transition(air.M).detachment.deflection
    sweep = gd.wall_reflection(air.M, [8, 12, 14] * ureg.deg)
    print(f"regular reflection is possible up to a {np.degrees(limit):.2f}° ramp; "
          "ramps of 8°, 12°, 14° give " + ", ".join(sweep.kind))


def intake_ramps(air):
    _rule("5. Two-ramp external-compression intake")
    best = gd.optimal_ramps(air.M, 2)
    print("best ramp turns " + ", ".join(f"{np.degrees(t):.2f}°" for t in best.deflections)
          + f": recovery {best.recovery:.4f} (all shocks equal: {best.equal_strength_recovery:.4f})")
    intake = gd.ramp_intake(air.M, best.deflections)
    print(f"behind the terminal shock M = {intake.terminal_mach:.4f}")


def control_fin(air):
    _rule("6. Control fin: 4 % double wedge at 0°, 2°, 4° incidence")
    fin = gd.Section.double_wedge(0.04)
    alpha = np.radians([0.0, 2.0, 4.0])
    exact = gd.shock_expansion_loads(fin, air.M, alpha)
    linear = gd.linear_loads(fin, air.M, alpha)
    for a, cl, cd, cl_lin in zip(np.degrees(alpha), exact.cl, exact.cd, linear.cl):
        print(f"α = {a:3.0f}°: cl = {cl:.4f} (linear theory {cl_lin:.4f}), wave cd = {cd:.5f}")


def picture(figure_path):
    _rule("7. A picture of the waves")
    if figure_path is None:
        print(f"not drawn; `{PROGRAM} --figure tour.png` saves the polars and the wave "
              "pattern of a ramp shock in a duct")
        return 0
    try:
        from gasdyn2d.plot import tour_figure
    except ImportError:
        print('matplotlib is not installed; pip install "gasdyn2d[plot]" to save a figure',
              file=sys.stderr)
        return 1
    tour_figure(figure_path)
    print(f"saved {figure_path}: the polars and the wave pattern of a ramp shock in a duct")
    return 0


def run_tour(figure_path=None) -> int:
    """Print the tour; save its figure to ``figure_path`` when one is given."""
    print(f"gasdyn2d {gd.__version__} tour — {CAUTION}")
    air = free_stream()
    nose_wedge(air)
    pitot(air)
    cowl_reflection(air)
    intake_ramps(air)
    control_fin(air)
    return picture(figure_path)


# ------------------------------------------------------------------ relation tables


def _isentropic(M, gamma, deflection, branch):
    return gd.isentropic_flow(M, gamma=gamma, errors="nan")


def _normal_shock(M, gamma, deflection, branch):
    return gd.normal_shock(M, gamma=gamma, errors="nan")


def _oblique_shock(M, gamma, deflection, branch):
    return gd.oblique_shock(M, deflection=np.radians(deflection), branch=branch, gamma=gamma,
                            errors="nan")


def _expansion_fan(M, gamma, deflection, branch):
    return gd.expansion_fan(M, deflection=np.radians(deflection), gamma=gamma, errors="nan")


def _detachment(M, gamma, deflection, branch):
    """Columns of the attached-shock limits: largest and sonic deflections, their wave angles."""
    theta_max, beta_max = gd.max_deflection(M, gamma=gamma, errors="nan")
    theta_sonic, beta_sonic = gd.sonic_deflection(M, gamma=gamma, errors="nan")
    return {"M1": M, "max_deflection [rad]": theta_max, "max_deflection_wave_angle [rad]": beta_max,
            "sonic_deflection [rad]": theta_sonic,
            "sonic_deflection_wave_angle [rad]": beta_sonic}


#: relation name -> (function of (M, gamma, deflection [deg], branch), lowest Mach, needs a turn)
RELATIONS = {
    "isentropic": (_isentropic, 0.0, False),
    "normal-shock": (_normal_shock, 1.0, False),
    "oblique-shock": (_oblique_shock, 1.0, True),
    "expansion-fan": (_expansion_fan, 1.0, True),
    "detachment": (_detachment, 1.0, False),
}

RELATION_HELP = """relations (columns are the result fields, units in the headers):
  isentropic      M, T_T0, p_p0, rho_rho0, A_Astar, mach_angle, prandtl_meyer
  normal-shock    M1, M2, p2_p1, rho2_rho1, T2_T1, p02_p01, p02_p1
  oblique-shock   M1, deflection, wave_angle, Mn1, Mn2, M2, ratios  (needs --turn)
  expansion-fan   M1, M2, deflection, nu1, nu2, ratios, mu1, mu2      (needs --turn)
  detachment      M1, largest deflection of an attached shock and its wave angle,
                  sonic deflection and its wave angle
Cases with no solution (a subsonic Mach number for a shock, a detached shock)
have empty fields."""


def _columns(result):
    """{header: 1-D array} of a relation result, headers "name [unit]" like to_dataframe."""
    if isinstance(result, dict):
        return {name: np.atleast_1d(np.asarray(value, dtype=float))
                for name, value in result.items()}
    from gasdyn2d.boundary.results import result_fields

    columns = {}
    for info in result_fields(type(result)):
        value = np.atleast_1d(np.asarray(getattr(result, info.name), dtype=float))
        columns[f"{info.name} [{info.unit}]" if info.unit else info.name] = value
    return columns


def _mach_values(parser, low, high, step, points):
    if high is None:
        return np.array([low])
    if not high > low:
        parser.error(f"--mach: the upper end {high:g} must be above the lower end {low:g}")
    if points is not None:
        if points < 2:
            parser.error(f"--points must be at least 2; got {points}")
        return np.linspace(low, high, points)
    if not step > 0.0:
        parser.error(f"--step must be positive; got {step:g}")
    count = int(np.floor((high - low) / step * (1.0 + 1e-12))) + 1
    if count > 1_000_000:
        parser.error(f"--step {step:g} gives {count} rows, more than 1000000; "
                     "choose a larger step")
    return np.round(low + step * np.arange(count), 12)


def _text(value, digits, angle_factor):
    return "" if not np.isfinite(value) else f"{value * angle_factor:.{digits}g}"


def write_table(rows_out, columns, *, degrees, digits):
    """Write the columns as CSV (angles in degrees when asked)."""
    writer = csv.writer(rows_out, lineterminator="\n")
    headers, factors = [], []
    for header in columns:
        angle = header.endswith(" [rad]")
        if angle and degrees:
            header = header[: -len(" [rad]")] + " [deg]"
        headers.append(header)
        factors.append(180.0 / np.pi if angle and degrees else 1.0)
    writer.writerow(headers)
    for row in zip(*columns.values()):
        writer.writerow([_text(v, digits, f) for v, f in zip(row, factors)])


def run_table(options) -> int:
    parser = options.table_parser
    function, lowest, needs_turn = RELATIONS[options.relation]
    if needs_turn and options.turn is None:
        parser.error(f"{options.relation} needs --turn DEGREES (the flow deflection)")
    if not needs_turn and options.turn is not None:
        parser.error(f"{options.relation} takes no --turn; it is for oblique-shock and "
                     "expansion-fan")
    low, high = (options.mach + [None])[:2]
    if not (low > lowest if lowest == 0.0 else low >= lowest):
        limit = "above 0" if lowest == 0.0 else f"at least {lowest:g}"
        parser.error(f"--mach: the lower end {low:g} must be {limit} for {options.relation}")
    machs = _mach_values(parser, low, high, options.step, options.points)
    try:
        result = function(machs, options.gamma, options.turn, options.branch)
    except gd.GasDynamicsError as exc:
        parser.error(str(exc))
    columns = _columns(result)
    if options.output is None:
        write_table(sys.stdout, columns, degrees=options.angles == "deg", digits=options.digits)
    else:
        with open(options.output, "w", encoding="utf-8", newline="") as out:
            write_table(out, columns, degrees=options.angles == "deg", digits=options.digits)
        print(f"wrote {len(machs)} rows of {options.relation} to {options.output}",
              file=sys.stderr)
    return 0


# ------------------------------------------------------------------ the parser


def _positive_float(text):
    value = float(text)
    if not np.isfinite(value) or value <= 0.0:
        raise argparse.ArgumentTypeError(f"must be a positive number; got {text!r}")
    return value


def _gamma(text):
    value = float(text)
    if not 1.0 < value <= 5.0 / 3.0 + 1e-12:
        raise argparse.ArgumentTypeError(
            f"the ratio of specific heats must be above 1 and at most 5/3; got {text!r}")
    return value


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog=PROGRAM,
        description="Steady two-dimensional supersonic flow of a perfect gas. Without a "
                    "command, prints the tour.",
        epilog=f"Results are {CAUTION}")
    parser.add_argument("--version", action="version", version=f"gasdyn2d {gd.__version__}")
    parser.add_argument("--figure", metavar="PATH",
                        help="with the tour: also save its figure to PATH (the format follows "
                             "the extension, e.g. .png or .pdf; needs matplotlib)")
    commands = parser.add_subparsers(dest="command", metavar="COMMAND")
    tour = commands.add_parser(
        "tour", help="a worked analysis of an invented Mach 2.2 demonstrator (the default)",
        description="Print a worked analysis of Quillmoss, an invented Mach 2.2 demonstrator: "
                    "free stream, nose wedge, pitot probe, intake shocks, control fin.")
    tour.add_argument("--figure", metavar="PATH", dest="tour_figure",
                      help="also save the tour's figure to PATH (needs matplotlib)")
    table = commands.add_parser(
        "table", help="one relation over a range of Mach numbers, as CSV",
        description="Write one relation over a range of Mach numbers as CSV: one row per\n"
                    "Mach number, one column per result field, units in the headers.",
        epilog=RELATION_HELP + f"\n\nexample: {PROGRAM} table oblique-shock --mach 1.5 4 "
                               "--step 0.25 --turn 10 --output shocks.csv",
        formatter_class=argparse.RawDescriptionHelpFormatter)
    table.set_defaults(table_parser=table)
    table.add_argument("relation", choices=sorted(RELATIONS), metavar="RELATION",
                       help="one of: " + ", ".join(sorted(RELATIONS)))
    table.add_argument("--mach", type=float, nargs="+", required=True, metavar="M",
                       help="one Mach number, or the two ends LOW HIGH of the range "
                            "(both included)")
    spacing = table.add_mutually_exclusive_group()
    spacing.add_argument("--step", type=_positive_float, default=0.1,
                         help="Mach-number step of the range (default 0.1)")
    spacing.add_argument("--points", type=int,
                         help="number of evenly spaced Mach numbers instead of --step")
    table.add_argument("--turn", type=float, metavar="DEGREES",
                       help="flow deflection [deg] for oblique-shock and expansion-fan")
    table.add_argument("--branch", choices=("weak", "strong"), default="weak",
                       help="oblique-shock branch (default weak)")
    table.add_argument("--gamma", type=_gamma, default=1.4,
                       help="ratio of specific heats (default 1.4)")
    table.add_argument("--angles", choices=("deg", "rad"), default="deg",
                       help="unit of the angle columns (default deg)")
    table.add_argument("--digits", type=int, default=10, choices=range(1, 18),
                       metavar="N", help="significant digits (1 to 17, default 10)")
    table.add_argument("--output", "-o", metavar="FILE",
                       help="write the CSV to FILE instead of standard output")
    return parser


def main(argv=None) -> int:
    """Run the command line with ``argv`` (default: ``sys.argv[1:]``); return the exit code."""
    parser = build_parser()
    options = parser.parse_args(argv)
    if options.command == "table":
        if options.figure is not None:
            parser.error("--figure goes with the tour, not with table")
        if len(options.mach) > 2:
            options.table_parser.error(
                f"--mach takes one value or two (LOW HIGH); got {len(options.mach)}")
        return run_table(options)
    figure = getattr(options, "tour_figure", None) or options.figure
    return run_tour(figure)


if __name__ == "__main__":
    sys.exit(main())
