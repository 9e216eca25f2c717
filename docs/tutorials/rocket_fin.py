"""Tutorial: loads on a fin of a small research rocket, by three theories.

Invented scenario: the *Lintwhistle-3* sounding rocket has four flat-faced fins
with a double-wedge section, 4.5 % thick with the ridge at 40 % chord. At
burnout it flies at Mach 3.2; a gust gives the fins 4° of incidence. How
much do the exact (shock-expansion), linear and second-order theories differ,
and how do lift and drag change over the coast from Mach 3.2 to 1.6?

Run: ``python rocket_fin.py [output folder]``. These are inviscid 2-D
section loads: skin friction, the fin-body junction, the fin tip and
aeroelastic twist are not in them, and real-gas effects do not matter at
these Mach numbers. Fin sizing needs test data or validated CFD.
"""

import sys
from pathlib import Path

import matplotlib
import matplotlib.pyplot as plt
import numpy as np

from gasdyn2d.design.section_loads import linear_loads, second_order_loads, shock_expansion_loads
from gasdyn2d.design.sections import Section
from gasdyn2d.plot import PALETTE, draw_surface_pressures

matplotlib.use("Agg")  # script only
out = Path(sys.argv[1]) if len(sys.argv) > 1 else Path.cwd()  # script only
out.mkdir(parents=True, exist_ok=True)  # script only

# %% [markdown]
# ## Surface pressures at burnout by the three theories

# %%
fin = Section.double_wedge(0.045, ridge=0.4)
alpha = np.radians(4.0)

fig, (ax, outline) = plt.subplots(2, 1, figsize=(7.0, 6.0), height_ratios=[4, 1],
                                  layout="constrained")
drawn = draw_surface_pressures(fin, 3.2, alpha, ax=ax, section_ax=outline)
ax.set_title("Lintwhistle-3 fin section at Mach 3.2, 4° incidence", fontsize="medium")
fig.savefig(out / "rocket_fin_pressures.png", dpi=100)  # script only

print("Lintwhistle-3 fin at Mach 3.2, 4° incidence")
print(f"{'theory':<16} {'cl':>8} {'cd':>8} {'x_cp/c':>8}")
for theory, loads in drawn.loads.items():
    print(f"{theory:<16} {loads.cl:8.4f} {loads.cd:8.5f} {loads.x_cp:8.4f}")

# %% [markdown]
# ## The coast: one batch call per theory, Mach 3.2 down to 1.6

# %%
machs = np.linspace(1.6, 3.2, 17)
coast = {name: solver(fin, machs, alpha) for name, solver in
         (("shock-expansion", shock_expansion_loads), ("linear", linear_loads),
          ("second-order", second_order_loads))}
table = coast["shock-expansion"].to_dataframe()[["M", "cl", "cd", "x_cp [chord]"]]
print("shock-expansion loads over the coast (one row per Mach number):")
print(table.iloc[::4].to_string(index=False, float_format=lambda v: f"{v:.4f}"))
worst = np.max(np.abs(coast["linear"].cl / coast["shock-expansion"].cl - 1.0))
print(f"linear theory's lift is within {100 * worst:.1f} % of shock-expansion over the coast")

# %%
fig, (top, bottom) = plt.subplots(2, 1, figsize=(7.0, 6.0), sharex=True, layout="constrained")
styles = {"shock-expansion": ("-", PALETTE["blue"]), "linear": ("--", PALETTE["vermillion"]),
          "second-order": (":", PALETTE["bluish green"])}
for name, loads in coast.items():
    style, colour = styles[name]
    top.plot(machs, loads.cl, style, color=colour, label=name)
    bottom.plot(machs, loads.cd, style, color=colour, label=name)
top.set_ylabel("lift coefficient cl [-]")
bottom.set_ylabel("wave-drag coefficient cd [-]")
bottom.set_xlabel("Mach number [-]")
top.legend(frameon=False)
top.set_title("Lintwhistle-3 fin section, 4° incidence", fontsize="medium")
fig.savefig(out / "rocket_fin_coast.png", dpi=100)  # script only
