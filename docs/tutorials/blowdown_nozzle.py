"""Tutorial: the contour of a blowdown-tunnel nozzle by the method of characteristics.

Invented scenario: a university group is building the *Teaselgate* blowdown
tunnel, Mach 3.0 in a test section 72 mm high (half-height 36 mm). A planar minimum-length
nozzle with a sharp throat gives the shortest contour; how long is it, how
close is its exit to the isentropic area ratio, and how does that change with
the number of characteristics?

Run: ``python blowdown_nozzle.py [output folder]``. The contour is inviscid:
a real nozzle needs a boundary-layer displacement correction and a rounded
throat, and the tunnel's settling chamber and its pressure vessel need
qualified engineering review.
"""

import sys
from pathlib import Path

import matplotlib
import numpy as np

from gasdyn2d.characteristics.nozzles import minimum_length_nozzle
from gasdyn2d.plot import draw_characteristic_net
from gasdyn2d.relations.isentropic import isentropic_flow

matplotlib.use("Agg")  # script only
out = Path(sys.argv[1]) if len(sys.argv) > 1 else Path.cwd()  # script only
out.mkdir(parents=True, exist_ok=True)  # script only

# %% [markdown]
# ## The throat the test section needs

# %%
M_EXIT = 3.0
exit_half_height = 0.036  # [m]
A_ratio = float(isentropic_flow(M_EXIT).A_Astar)
throat_half_height = exit_half_height / A_ratio
print(f"Mach {M_EXIT}: A/A* = {A_ratio:.4f}, throat half-height "
      f"{1000 * throat_half_height:.2f} mm")

# %% [markdown]
# ## Convergence with the number of characteristics

# %%
for n in (8, 16, 32, 64):
    nozzle = minimum_length_nozzle(M_EXIT, n_characteristics=n,
                                   throat_half_height=throat_half_height)
    error = nozzle.area_ratio / nozzle.area_ratio_isentropic - 1.0
    print(f"n = {n:3d}: length {1000 * nozzle.length:6.1f} mm, exit half-height "
          f"{1000 * nozzle.exit_half_height:6.2f} mm, area-ratio error {100 * error:+.3f} %")

# %% [markdown]
# ## The characteristic net of the contour

# %%
nozzle = minimum_length_nozzle(M_EXIT, n_characteristics=16,
                               throat_half_height=throat_half_height)
drawn = draw_characteristic_net(nozzle, length_unit="mm")
drawn.ax.set_title("Teaselgate tunnel: Mach 3 minimum-length nozzle, 16 characteristics "
                   "(upper half)", fontsize="medium")
drawn.figure.savefig(out / "blowdown_nozzle_net.png", dpi=100)  # script only
print(f"largest wall angle at the throat corner: {np.degrees(nozzle.max_wall_angle):.2f}°")
