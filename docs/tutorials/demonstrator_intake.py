"""Tutorial: a two-ramp intake for an uncrewed Mach 2.5 demonstrator.

Invented scenario: the *Burrowlamp-25* demonstrator cruises at Mach 2.5 and needs
a planar two-ramp external-compression intake with a capture height set by
a 0.30 m first ramp. Which ramp turns give the best pressure recovery, where
do the ramp shocks go, and what happens off design at Mach 2.2?

Run: ``python demonstrator_intake.py [output folder]``. Inviscid estimate:
the ramp boundary layer (bleed, separation under the terminal shock), the
cowl's own shock and the subsonic diffuser decide the real recovery, and
the separation flags below are only a rule-based warning.
"""

import sys
from pathlib import Path

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402

from gasdyn2d.design.intake_design import optimal_ramps  # noqa: E402
from gasdyn2d.design.intakes import ramp_intake  # noqa: E402
from gasdyn2d.plot import PALETTE, draw_wave_pattern  # noqa: E402
from gasdyn2d.patterns.graph import WavePattern  # noqa: E402

out = Path(sys.argv[1]) if len(sys.argv) > 1 else Path.cwd()
out.mkdir(parents=True, exist_ok=True)

M_CRUISE, M_OFF = 2.5, 2.2
best = optimal_ramps(M_CRUISE, 2)
turns = np.asarray(best.deflections)
print(f"best ramp turns at Mach {M_CRUISE}: {np.degrees(turns[0]):.2f}° and "
      f"{np.degrees(turns[1]):.2f}°, recovery {best.recovery:.4f} "
      f"(all-shocks-equal rule: {best.equal_strength_recovery:.4f})")

design = ramp_intake(M_CRUISE, turns, first_ramp_length=0.30)
off = ramp_intake(M_OFF, turns, design_mach=M_CRUISE, first_ramp_length=0.30)
for name, intake in (("design", design), ("off design", off)):
    print(f"{name:>10}: M = {intake.M:.2f}, recovery {intake.recovery:.4f}, "
          f"mass-flow ratio {intake.mass_flow_ratio:.4f}, "
          f"separation risk at shocks {np.nonzero(np.asarray(intake.separation_risk))[0] + 1}")
print(f"cowl lip at x = {design.lip_x:.3f} m, y = {design.lip_y:.3f} m")


def ramp_geometry(intake):
    lengths, angles = np.asarray(intake.ramp_lengths), np.asarray(intake.ramp_angles)
    x = np.concatenate([[0.0], np.cumsum(lengths * np.cos(angles))])
    y = np.concatenate([[0.0], np.cumsum(lengths * np.sin(angles))])
    return x, y


def ramp_pattern(M, intake):
    x, y = ramp_geometry(intake)
    pattern = WavePattern(M)
    pattern.add_wave("first ramp shock", upstream="1", downstream="2", family="left",
                     turn=turns[0], start=(x[0], y[0]))
    pattern.add_wave("second ramp shock", upstream="2", downstream="3", family="left",
                     turn=turns[1], start=(x[1], y[1]))
    return pattern.solve(), x, y


fig, axes = plt.subplots(2, 1, figsize=(7, 7.5), layout="constrained")
for ax, M, intake in zip(axes, (M_CRUISE, M_OFF), (design, off)):
    solution, x, y = ramp_pattern(M, intake)
    ramp = (np.concatenate([[-0.05], x, [x[-1] + 0.1]]),
            np.concatenate([[0.0], y, [y[-1]]]))
    lip = float(intake.lip_x), float(intake.lip_y)
    cowl = ([lip[0], lip[0] + 0.15], [lip[1], lip[1] + 0.01])
    drawn = draw_wave_pattern(solution, walls=[ramp, cowl], stop_at_waves=False,
                              extent=(-0.05, 0.6, -0.02, 0.40), ax=ax)
    ax.plot(*lip, marker="o", color="black", ms=4)
    ax.set_title(f"Burrowlamp-25 intake ramps at Mach {M}", fontsize="medium")
fig.savefig(out / "demonstrator_intake.png", dpi=110)

machs = np.linspace(1.8, 3.0, 25)
sweep = ramp_intake(machs, turns, design_mach=M_CRUISE, first_ramp_length=0.30, errors="nan")
fig, ax = plt.subplots(figsize=(6, 4), layout="constrained")
ax.plot(machs, sweep.recovery, color=PALETTE["blue"], label="pressure recovery p0,out/p0")
ax.plot(machs, sweep.mass_flow_ratio, "--", color=PALETTE["vermillion"],
        label="mass-flow ratio")
ax.axvline(M_CRUISE, color="grey", lw=0.8)
detached = machs[np.isnan(sweep.recovery)]
if detached.size:
    print(f"at Mach {detached.max():.2f} and below the second ramp shock detaches "
          "(no attached solution; NaN in the sweep)")
ax.set_xlim(machs[0], machs[-1])
ax.set_xlabel("flight Mach number [-]")
ax.set_ylabel("ratio [-]")
ax.legend(frameon=False)
fig.savefig(out / "demonstrator_intake_sweep.png", dpi=110)
