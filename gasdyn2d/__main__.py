"""``python -m gasdyn2d``: a short worked analysis of an invented vehicle.

The scenario is ours: *Quillmoss*, a small uncrewed demonstrator cruising at Mach
2.2 at 15 km (standard-atmosphere static pressure 12.11 kPa, temperature
216.65 K). The tour follows the air from the nose wedge to the intake and the
control fin, printing what each gasdyn2d tool says about it.
"""

from __future__ import annotations

import numpy as np

import gasdyn2d as gd
from gasdyn2d import ureg


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


def picture():
    _rule("7. A picture of the waves")
    try:
        from gasdyn2d.plot import tour_figure
    except ImportError:
        print('matplotlib is not installed; pip install "gasdyn2d[plot]" to save a figure')
        return
    path = "gasdyn2d_tour.png"
    tour_figure(path)
    print(f"saved {path}: the polars and the wave pattern of a ramp shock in a duct")


def main() -> None:
    print("gasdyn2d tour — inviscid, perfect-gas estimates for preliminary design only;")
    print("real designs need test, validated CFD and qualified engineering review.")
    air = free_stream()
    nose_wedge(air)
    pitot(air)
    cowl_reflection(air)
    intake_ramps(air)
    control_fin(air)
    picture()


if __name__ == "__main__":
    main()
