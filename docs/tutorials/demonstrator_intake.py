"""Tutorial: a two-ramp intake for an uncrewed Mach 2.5 demonstrator.

Invented scenario: the *Burrowlamp-25* demonstrator cruises at Mach 2.5 and needs
a planar two-ramp external-compression intake with a capture height set by
a 0.30 m first ramp. Which ramp turns give the best pressure recovery, where
do the ramp shocks go, and what happens off design at Mach 2.2?

The two ramp shocks cannot run through each other: where they meet they
merge into one stronger shock, with a weak reflected wave and a slip line
behind the meeting point (the region graph's merging-shocks pattern). At the
design point they meet on the cowl lip; at Mach 2.2 they meet ahead of it,
where the merged shock would have to turn the flow more than an attached
shock can: it stands off as a curved shock, which a region graph of straight
waves does not model, so the drawing stops at the meeting point.

Run: ``python demonstrator_intake.py [output folder]``. Inviscid estimate:
the ramp boundary layer (bleed, separation under the terminal shock), the
cowl's own shock and the subsonic diffuser decide the real recovery, and
the separation flags below are only a rule-based warning.
"""

import sys
from pathlib import Path

import matplotlib
import matplotlib.pyplot as plt
import numpy as np

from gasdyn2d.design.intake_design import optimal_ramps
from gasdyn2d.design.intakes import ramp_intake
from gasdyn2d.patterns.graph import WavePattern
from gasdyn2d.plot import PALETTE, WAVE_STYLES, draw_wave_pattern

matplotlib.use("Agg")  # script only
out = Path(sys.argv[1]) if len(sys.argv) > 1 else Path.cwd()  # script only
out.mkdir(parents=True, exist_ok=True)  # script only

# %% [markdown]
# ## The best ramp turns at the design Mach number

# %%
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

# %% [markdown]
# ## Where the ramp shocks go
#
# The two ramp shocks run from the ramp corners. Where they meet they merge:
# the region graph solves the merged shock, the wave reflected back towards
# the ramp and the slip line between the two streams, and the drawing ends
# the ramp shocks at their meeting point. Where the merged shock would detach,
# only the ramp shocks are drawn, up to the point where they meet.


# %%
def ramp_geometry(intake):
    lengths, angles = np.asarray(intake.ramp_lengths), np.asarray(intake.ramp_angles)
    x = np.concatenate([[0.0], np.cumsum(lengths * np.cos(angles))])
    y = np.concatenate([[0.0], np.cumsum(lengths * np.sin(angles))])
    return x, y


def ramp_pattern(M, intake, *, merge=True):
    """The ramp shocks from the two corners, merging where they meet (if they can)."""
    x, y = ramp_geometry(intake)
    pattern = WavePattern(M)
    pattern.add_wave("first ramp shock", upstream="1", downstream="2", family="left",
                     turn=turns[0], start=(x[0], y[0]))
    pattern.add_wave("second ramp shock", upstream="2", downstream="3", family="left",
                     turn=turns[1], start=(x[1], y[1]))
    if merge:
        pattern.add_wave("merged shock", upstream="1", downstream="4", family="left")
        pattern.add_wave("reflected wave", upstream="3", downstream="5", family="right")
        pattern.add_slip_line("4", "5")
    solution = pattern.solve(errors="nan")
    if merge and not solution.ok:
        print(f"Mach {M}: no attached merged shock ({solution.failure.split(':')[0]}); "
              "drawing the ramp shocks up to where they meet")
        return ramp_pattern(M, intake, merge=False)
    return solution, x, y


EXTENT = (-0.05, 0.65, -0.02, 0.42)  # [m]
fig, axes = plt.subplots(2, 1, figsize=(7.0, 9.0), layout="constrained")
for ax, M, intake in zip(axes, (M_CRUISE, M_OFF), (design, off)):
    solution, x, y = ramp_pattern(M, intake)
    ramp = (np.concatenate([[-0.05], x, [x[-1] + 0.1]]),
            np.concatenate([[0.0], y, [y[-1]]]))
    lip = float(intake.lip_x), float(intake.lip_y)
    cowl = ([lip[0], lip[0] + 0.15], [lip[1], lip[1] + 0.01])
    drawn = draw_wave_pattern(solution, walls=[ramp, cowl], extent=EXTENT,
                              length_unit="mm", ax=ax)
    ax.plot(1000 * lip[0], 1000 * lip[1], marker="o", color="black", ms=4)
    meet_x, meet_y = solution.meeting_point("first ramp shock", "second ramp shock")
    ahead = 1000 * (lip[0] - meet_x)  # [mm]
    where = "on the lip" if abs(ahead) < 1.0 else f"{ahead:.0f} mm ahead of the lip"
    ax.plot(1000 * meet_x, 1000 * meet_y, marker="x", color="black", ms=6)
    print(f"Mach {M}: the ramp shocks meet at x = {1000 * meet_x:.0f} mm, "
          f"y = {1000 * meet_y:.0f} mm ({where})")
    ax.set_title(f"Burrowlamp-25 intake ramps at Mach {M}", fontsize="medium")
fig.savefig(out / "demonstrator_intake.png", dpi=100)  # script only

# %% [markdown]
# ## Off design: recovery and spillage over a Mach sweep

# %%
machs = np.linspace(1.8, 3.0, 25)
sweep = ramp_intake(machs, turns, design_mach=M_CRUISE, first_ramp_length=0.30, errors="nan")
attached = np.isfinite(sweep.recovery)
print(f"at Mach {machs[~attached].max():.2f} and below the second ramp shock detaches "
      "(no attached solution; NaN in the sweep)")
fig, ax = plt.subplots(figsize=(7.0, 4.2), layout="constrained")
ax.plot(machs, sweep.recovery, color=PALETTE["blue"], label="pressure recovery p0,out/p0")
ax.plot(machs, sweep.mass_flow_ratio, "--", color=PALETTE["vermillion"],
        label="mass-flow ratio")
ax.axvline(M_CRUISE, color="grey", lw=0.8)
ax.annotate(f"design Mach {M_CRUISE}", (M_CRUISE, 0.02), xycoords=("data", "axes fraction"),
            xytext=(4, 0), textcoords="offset points", fontsize="small", color="dimgrey")
ax.set_xlim(machs[attached][0], machs[-1])  # the sweep's attached cases only
ax.set_xlabel("flight Mach number [-]")
ax.set_ylabel("ratio [-]")
ax.legend(frameon=False, loc="lower left")
ax.set_title("Burrowlamp-25 intake off design (attached ramp shocks only)", fontsize="medium")
fig.savefig(out / "demonstrator_intake_sweep.png", dpi=100)  # script only
