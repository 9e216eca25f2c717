"""Tutorial: a wedge shock reflecting in the test section of a wind tunnel.

Invented scenario: the *Spindlebrook* blowdown tunnel has a Mach 2.6 test section
120 mm high. A 7° wedge model sits on the floor with its tip at x = 0; its
shock crosses the test section, reflects from the roof, and comes back down.
Where does the reflected shock land, and is the reflection regular?

Run: ``python duct_reflection.py [output folder]``. Inviscid, perfect-gas
estimate: the roof's boundary layer thickens and may separate where the
shock reflects, which moves the reflected shock; check against the tunnel's
schlieren pictures before trusting a model position.
"""

import sys
from pathlib import Path

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402

from gasdyn2d.plot import draw_pattern_polars, draw_wave_pattern  # noqa: E402
from gasdyn2d.patterns.reflections import wall_reflection  # noqa: E402
from gasdyn2d.patterns.graph import WavePattern  # noqa: E402

out = Path(sys.argv[1]) if len(sys.argv) > 1 else Path.cwd()
out.mkdir(parents=True, exist_ok=True)

M_TEST = 2.6  # test-section Mach number
HEIGHT = 0.120  # test-section height [m]
WEDGE = np.radians(7.0)  # wedge half-angle seen by the stream
MODEL_LENGTH = 0.30  # wedge surface length [m]

# Is a regular reflection possible at all?
reflection = wall_reflection(M_TEST, WEDGE)
print(f"reflection at the roof: {reflection.kind}; "
      f"p3/p1 = {reflection.p3_p1:.3f}, M3 = {reflection.M3:.3f}")

# The same pattern as a region graph with geometry: wedge shock from the tip.
pattern = WavePattern(M_TEST)
pattern.add_wave("wedge shock", upstream="1", downstream="2", family="left", turn=WEDGE,
                 start=(0.0, 0.0))
pattern.add_wave("roof reflection", upstream="2", downstream="3", family="right")
pattern.add_wall("3", direction=0.0)  # the roof is parallel to the free stream
solution = pattern.solve()
print(solution)

x_end = 0.55
base_x, base_y = MODEL_LENGTH * np.cos(WEDGE), MODEL_LENGTH * np.sin(WEDGE)
floor = ([-0.05, 0.0, base_x, base_x, x_end], [0.0, 0.0, base_y, 0.0, 0.0])
roof = ([-0.05, x_end], [HEIGHT, HEIGHT])
fig, (left, right) = plt.subplots(1, 2, figsize=(11, 4), width_ratios=[1, 1.7],
                                  layout="constrained")
draw_pattern_polars(solution, ["1", "2"], marks=["2", "3"], ax=left)
left.set_title("polars of the free stream and of region 2", fontsize="medium")
drawn = draw_wave_pattern(solution, walls=[floor, roof], extent=(-0.05, x_end, -0.005, 0.125),
                          ax=right)
right.set_title("Spindlebrook test section, 7° wedge at Mach 2.6", fontsize="medium")
fig.savefig(out / "duct_reflection.png", dpi=110)

x_hit, y_hit = drawn["lines"]["roof reflection"][0][2:]
print(f"the wedge shock reaches the roof at x = {1000 * drawn['lines']['wedge shock'][0][2]:.1f} "
      f"mm; the reflection lands at x = {1000 * x_hit:.1f} mm, y = {1000 * abs(y_hit):.1f} mm")
on_model = x_hit <= base_x
print("the reflected shock lands on the model: move the model upstream or shorten it"
      if on_model else "the reflected shock lands behind the model")
