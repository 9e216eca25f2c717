"""The figures of the relation pages and the plotting page, drawn when the docs are built.

Each function returns a matplotlib Figure drawn from gasdyn2d itself, so the
pictures always show what the code computes. :data:`FIGURES` maps the file
name each page links to (``figures/<name>``) to its function.
"""

from __future__ import annotations

import io

import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402

import gasdyn2d as gd  # noqa: E402
from gasdyn2d.relations.oblique_shocks import deflection_from_wave_angle  # noqa: E402
from gasdyn2d.plot import (PALETTE, draw_characteristic_net, draw_gas_model_comparison,  # noqa: E402
                           draw_pattern_polars, draw_pressure_signature, draw_surface_pressures,
                           draw_wave_pattern)

CYCLE = [PALETTE[k] for k in ("blue", "vermillion", "bluish green", "reddish purple",
                               "orange", "sky blue", "black")]


def _axes(figsize=(7.0, 4.4)):
    figure, ax = plt.subplots(figsize=figsize, layout="constrained")
    ax.grid(True, color="#E5E5E5", linewidth=0.6)
    ax.set_axisbelow(True)
    for side in ("top", "right"):
        ax.spines[side].set_visible(False)
    return figure, ax


def isentropic_ratios():
    M = np.linspace(0.01, 5.0, 500)
    flow = gd.isentropic_flow(M)
    figure, ax = _axes()
    for (label, values), colour in zip((("p/p0", flow.p_p0), ("T/T0", flow.T_T0),
                                        ("ρ/ρ0", flow.rho_rho0), ("A*/A", 1.0 / flow.A_Astar)),
                                       CYCLE):
        ax.plot(M, values, color=colour, lw=1.8, label=label)
    ax.axvline(1.0, color="grey", lw=0.8)
    ax.set_xlim(0.0, 5.0)
    ax.set_ylim(0.0, 1.02)
    ax.set_xlabel("Mach number M [-]")
    ax.set_ylabel("ratio [-]")
    ax.set_title("Isentropic ratios, γ = 1.4 (A*/A is the inverse of A/A*)", fontsize="medium")
    ax.legend(frameon=False)
    return figure


def normal_shock_chart():
    M1 = np.linspace(1.0, 5.0, 400)
    shock = gd.normal_shock(M1)
    figure, (left, right) = plt.subplots(1, 2, figsize=(9.0, 4.0), layout="constrained")
    for ax in (left, right):
        ax.grid(True, color="#E5E5E5", linewidth=0.6)
        ax.set_xlabel("upstream Mach number M1 [-]")
        ax.set_xlim(1.0, 5.0)
    left.plot(M1, shock.M2, color=CYCLE[0], lw=1.8, label="M2")
    left.plot(M1, shock.p02_p01, color=CYCLE[1], lw=1.8, label="p02/p01 (recovery)")
    left.set_ylabel("[-]")
    left.legend(frameon=False)
    right.plot(M1, shock.p2_p1, color=CYCLE[0], lw=1.8, label="p2/p1")
    right.plot(M1, shock.rho2_rho1, color=CYCLE[1], lw=1.8, label="ρ2/ρ1")
    right.plot(M1, shock.T2_T1, color=CYCLE[2], lw=1.8, label="T2/T1")
    right.set_yscale("log")
    right.set_ylabel("ratio across the shock [-]")
    right.legend(frameon=False)
    figure.suptitle("Normal shock, γ = 1.4", fontsize="medium")
    return figure


def theta_beta_mach():
    figure, ax = _axes(figsize=(7.0, 5.2))
    machs = [1.2, 1.5, 2.0, 3.0, 5.0, 20.0]
    for M, colour in zip(machs, CYCLE):
        mu = np.arcsin(1.0 / M)
        beta = np.linspace(mu, np.pi / 2, 600)
        theta = deflection_from_wave_angle(M, beta)
        theta_max, beta_max = gd.max_deflection(M)
        weak = beta <= beta_max
        ax.plot(np.degrees(theta[weak]), np.degrees(beta[weak]), color=colour, lw=1.8,
                label=f"M1 = {M:g}")
        ax.plot(np.degrees(theta[~weak]), np.degrees(beta[~weak]), color=colour, lw=1.2,
                ls=(0, (5, 2)))
    M = np.geomspace(1.0001, 40.0, 400)
    theta_max, beta_max = gd.max_deflection(M)
    theta_sonic, beta_sonic = gd.sonic_deflection(M)
    ax.plot(np.degrees(theta_max), np.degrees(beta_max), color="black", lw=1.0,
            label="largest deflection (detachment)")
    ax.plot(np.degrees(theta_sonic), np.degrees(beta_sonic), color="black", lw=1.0,
            ls=(0, (1, 1.5)), label="M2 = 1 (sonic)")
    ax.set_xlim(0.0, 46.0)
    ax.set_ylim(0.0, 90.0)
    ax.set_xlabel("flow deflection θ [deg]")
    ax.set_ylabel("wave angle β [deg]")
    ax.set_title("θ-β-M relation, γ = 1.4: weak branch solid, strong branch dashed",
                 fontsize="medium")
    ax.legend(frameon=False, fontsize="small", loc="lower right")
    return figure


def prandtl_meyer_function():
    figure, ax = _axes()
    M = np.linspace(1.0, 8.0, 500)
    for gamma, colour in zip((1.1, 1.3, 1.4, 5.0 / 3.0), CYCLE):
        ax.plot(M, np.degrees(gd.prandtl_meyer(M, gamma=gamma)), color=colour, lw=1.8,
                label=f"ν(M), γ = {gamma:.3g}")
    ax.plot(M, np.degrees(np.arcsin(1.0 / M)), color="black", lw=1.0, ls=(0, (5, 2)),
            label="Mach angle μ = asin(1/M)")
    ax.set_xlim(1.0, 8.0)
    ax.set_ylim(0.0, 130.0)
    ax.set_xlabel("Mach number M [-]")
    ax.set_ylabel("angle [deg]")
    ax.set_title("Prandtl–Meyer function and Mach angle", fontsize="medium")
    ax.legend(frameon=False, fontsize="small")
    return figure


def _tunnel():
    """The Spindlebrook test section of the plotting page: a 7° wedge at Mach 2.6."""
    tunnel = gd.WavePattern(2.6)
    tunnel.add_wave("wedge shock", upstream="1", downstream="2", family="left",
                    turn=np.radians(7.0), start=(0.0, 0.0))
    tunnel.add_wave("roof reflection", upstream="2", downstream="3", family="right")
    tunnel.add_wall("3", direction=0.0)
    floor = ([-0.05, 0.0, 0.298, 0.298, 0.55], [0.0, 0.0, 0.0366, 0.0, 0.0])
    roof = ([-0.05, 0.55], [0.12, 0.12])
    return tunnel.solve(), [floor, roof]


def plotting_wave_pattern():
    solution, walls = _tunnel()
    drawn = draw_wave_pattern(solution, walls=walls, length_unit="mm")
    drawn.ax.set_title("draw_wave_pattern: a wedge shock reflecting from the roof",
                       fontsize="medium")
    return drawn.figure


def plotting_polars():
    solution, _ = _tunnel()
    drawn = draw_pattern_polars(solution, ["1", "2"], marks=["2", "3"])
    drawn.ax.set_title("draw_pattern_polars: regions 1 and 2, states 2 and 3 marked",
                       fontsize="medium")
    return drawn.figure


def plotting_net():
    jet = gd.underexpanded_slot_jet(1.5, 2.0, n_characteristics=10)
    drawn = draw_characteristic_net(jet)
    drawn.ax.set_title("draw_characteristic_net: an underexpanded slot jet (upper half)",
                       fontsize="medium")
    return drawn.figure


def plotting_pressures():
    drawn = draw_surface_pressures(gd.Section.double_wedge(0.045, ridge=0.4), 3.2,
                                   np.radians(4.0))
    return drawn.figure


def near_field_signature():
    # the invented survey-drone fin of docs/near-fields.md
    field = gd.section_near_field(gd.Section.biconvex(0.04, n=48), 1.7, np.radians(1.5),
                                  [0.8, 3.2], chord=0.32)
    drawn = draw_pressure_signature(field, sides=("below", "above"))
    drawn.ax.set_title("draw_pressure_signature: a 4 % biconvex fin, chord 0.32 m, "
                       "M 1.7, α 1.5°", fontsize="medium")
    return drawn.figure


def near_field_decay():
    # leading- and trailing-shock strength of two invented biconvex fins against distance
    figure, ax = _axes()
    for colour, (t, n) in zip(CYCLE, ((0.03, 256), (0.06, 256))):
        field = gd.section_near_field(gd.Section.biconvex(t, n=n), 2.0, 0.0, [1.0],
                                      max_line_turn=np.radians(0.02))
        for shock, style, name in ((field.leading_shock_below, "-", "leading"),
                                   (field.trailing_shock_below, "--", "trailing")):
            y, strength = np.abs(shock.y[1:]), shock.pressure_ratio[1:] - 1.0
            keep = strength > 0.0
            ax.loglog(y[keep], strength[keep], ls=style, color=colour,
                      label=f"{t:.0%} biconvex, {name} shock")
    y = np.array([3.0, 3000.0])
    ax.loglog(y, 0.25 * (y / 3.0) ** -0.5, color="#8C8C8C", lw=0.9, ls=":",
              label="distance^(-1/2) (Whitham 1974)")
    ax.set_xlabel("distance below the section [chord]")
    ax.set_ylabel("shock strength p2/p1 - 1 [-]")
    ax.set_title("section_near_field: shock decay at Mach 2", fontsize="medium")
    ax.legend(fontsize="small", frameon=False)
    return figure


def thermally_perfect_comparison():
    drawn = draw_gas_model_comparison(250.0, quantities=("T2_T1", "rho2_rho1", "p2_p1"))
    return drawn.figure


FIGURES = {
    "isentropic-ratios.png": isentropic_ratios,
    "normal-shock-chart.png": normal_shock_chart,
    "theta-beta-mach.png": theta_beta_mach,
    "prandtl-meyer-function.png": prandtl_meyer_function,
    "plotting-wave-pattern.png": plotting_wave_pattern,
    "plotting-polars.png": plotting_polars,
    "plotting-net.png": plotting_net,
    "plotting-pressures.png": plotting_pressures,
    "thermally-perfect-comparison.png": thermally_perfect_comparison,
    "near-field-signature.png": near_field_signature,
    "near-field-decay.png": near_field_decay,
}


def png(name: str, *, dpi: int = 100) -> bytes:
    """The PNG bytes of figure ``name``."""
    figure = FIGURES[name]()
    buffer = io.BytesIO()
    figure.savefig(buffer, format="png", dpi=dpi)
    plt.close(figure)
    return buffer.getvalue()
