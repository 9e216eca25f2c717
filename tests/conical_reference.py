"""Independent 30-digit reference for conical flow (Taylor–Maccoll), in mpmath.

Written from the textbook equations, not from gasdyn2d's code, and importing
nothing from gasdyn2d. The flow behind the conical shock is irrotational and
depends on the polar angle θ from the axis only; with the velocity components
V_r (along the ray) and V_θ (normal to it, negative: towards the axis) scaled
by the maximum speed, continuity and irrotationality give the Taylor–Maccoll
equation

    dV_r/dθ = V_θ
    dV_θ/dθ = [V_r V_θ² - a² (2 V_r + V_θ cot θ)] / (a² - V_θ²),
    a² = (γ-1)/2 (1 - V_r² - V_θ²)

(Taylor & Maccoll 1933; the same form in NACA Report 1135's section on cones
and in the gas-dynamics textbooks, e.g. Anderson, *Modern Compressible Flow*,
ch. 10, from memory). The start is the flow just behind the straight shock of
wave angle β, from the oblique-shock relations (NACA Report 1135, eqs. 128-138);
the cone surface is the ray where V_θ = 0.

Method (chosen for being unlike gasdyn2d's): the equation is integrated in θ
itself, from β towards the axis, by the Gragg–Bulirsch–Stoer method (modified
midpoint rule, polynomial extrapolation in h²) with adaptive macro steps at a
local tolerance of 1e-27; the surface ray is located by Newton steps on V_θ,
each one re-integrating from the last macro step. Inverses are solved by
mpmath's secant iteration; derivatives for the detachment point are central
differences at 30 digits. Every public function takes and returns Python
floats (angles in radians) and works at ``DIGITS`` digits inside.

Cost: about 0.2-1 s per shock layer, so the tests use it on a handful of cases.
"""

from __future__ import annotations

import mpmath as mp

DIGITS = 30
_TOL = mp.mpf(10) ** -27  # local tolerance of a macro step
_SEQUENCE = (2, 4, 6, 8, 10, 12, 14, 16, 18, 20, 22, 24)  # midpoint substeps per macro step


def _mpf(x):
    return x if isinstance(x, mp.mpf) else mp.mpf(float(x))


# ----------------------------------------------------------------- shock and equation


def _behind_shock(M1, beta, g):
    """(V_r, V_θ) / V_max, deflection δ and M2 just behind a shock of wave angle β."""
    mn1 = M1 * mp.sin(beta)
    # NACA Report 1135, eq. 138: tan δ = 2 cot β (M1² sin²β - 1)/(M1²(γ + cos 2β) + 2)
    delta = mp.atan(2 * mp.cot(beta) * (mn1**2 - 1) / (M1**2 * (g + mp.cos(2 * beta)) + 2))
    mn2_sq = (1 + (g - 1) / 2 * mn1**2) / (g * mn1**2 - (g - 1) / 2)  # eq. 96
    M2 = mp.sqrt(mn2_sq) / mp.sin(beta - delta)  # eq. 132
    V = 1 / mp.sqrt(1 + 2 / ((g - 1) * M2**2))  # V/V_max from the energy equation
    return [V * mp.cos(beta - delta), -V * mp.sin(beta - delta)], delta, M2


def _normal_shock(mn1, g):
    """Ratios across a normal shock of upstream Mach number mn1 (eqs. 93-99)."""
    m2 = mn1**2
    p = 1 + 2 * g / (g + 1) * (m2 - 1)
    rho = (g + 1) * m2 / ((g - 1) * m2 + 2)
    p0 = rho ** (g / (g - 1)) * p ** (-1 / (g - 1))
    return {"p2_p1": p, "rho2_rho1": rho, "T2_T1": p / rho, "p02_p01": p0}


def _taylor_maccoll(g):
    def rhs(theta, y):
        vr, vt = y
        a2 = (g - 1) / 2 * (1 - vr**2 - vt**2)
        return [vt, (vr * vt**2 - a2 * (2 * vr + vt * mp.cot(theta))) / (a2 - vt**2)]
    return rhs


# ----------------------------------------------------------------- Bulirsch–Stoer


def _midpoint(f, x, y, H, n):
    h = H / n
    z0, z1 = y, [a + h * b for a, b in zip(y, f(x, y))]
    for m in range(1, n):
        z0, z1 = z1, [a + 2 * h * b for a, b in zip(z0, f(x + m * h, z1))]
    return [(a + b + h * c) / 2 for a, b, c in zip(z1, z0, f(x + H, z1))]


def _macro_step(f, x, y, H):
    """One extrapolated step; (y(x + H), converged?)."""
    table = []
    for k, n in enumerate(_SEQUENCE):
        row = [_midpoint(f, x, y, H, n)]
        for j in range(1, k + 1):
            r = (mp.mpf(_SEQUENCE[k]) / _SEQUENCE[k - j]) ** 2
            row.append([a + (a - b) / (r - 1) for a, b in zip(row[j - 1], table[k - 1][j - 1])])
        table.append(row)
        if k >= 2 and max(abs(a - b) for a, b in zip(row[-1], row[-2])) < _TOL:
            return row[-1], True
    return row[-1], False


def _integrate(f, x, y, x_end):
    H = x_end - x
    while x != x_end:
        if abs(H) > abs(x_end - x):
            H = x_end - x
        y_new, ok = _macro_step(f, x, y, H)
        if ok:
            x, y = x + H, y_new
            H *= 1.5
        else:
            H /= 2
    return y


def _surface(M1, beta, g):
    """(θ_c, V_r at the cone, δ, M2): march from the shock until V_θ changes sign."""
    y, delta, M2 = _behind_shock(M1, beta, g)
    f = _taylor_maccoll(g)
    x, H = beta, -beta / 16
    while True:
        if x + H <= 0:
            H = -x / 2
        y_new, ok = _macro_step(f, x, y, H)
        if not ok:
            H /= 2
            continue
        if y_new[1] >= 0:
            break
        x, y, H = x + H, y_new, H * 1.5
    theta = x + H * (-y[1]) / (y_new[1] - y[1])  # secant start inside the last step
    for _ in range(30):
        yt = _integrate(f, x, y, theta)
        step = yt[1] / f(theta, yt)[1]
        theta -= step
        if abs(step) < mp.mpf(10) ** -(DIGITS - 2) * theta:
            break
    return theta, _integrate(f, x, y, theta)[0], delta, M2


# ----------------------------------------------------------------- public reference


def _fields(M1, beta, g):
    theta_c, vr, delta, M2 = _surface(M1, beta, g)
    mc2 = 2 / (g - 1) * vr**2 / (1 - vr**2)
    stag = lambda m2: 1 + (g - 1) / 2 * m2  # noqa: E731  (T0/T, eq. 43)
    shock = _normal_shock(M1 * mp.sin(beta), g)
    # isentropic from the shock to the cone, p0 falls by p02/p01 across the shock (eq. 44)
    p_c = shock["p02_p01"] * (stag(M1**2) / stag(mc2)) ** (g / (g - 1))
    T_c = stag(M1**2) / stag(mc2)
    return {"cone_angle": theta_c, "wave_angle": beta, "deflection": delta, "M2": M2,
            **shock, "M_cone": mp.sqrt(mc2), "p_cone_p1": p_c, "T_cone_T1": T_c,
            "rho_cone_rho1": p_c / T_c, "cp_cone": 2 * (p_c - 1) / (g * M1**2)}


def cone_from_wave_angle(M1, beta, g=1.4):
    """Every field of the shock layer behind a conical shock of wave angle β (floats)."""
    with mp.workdps(DIGITS):
        out = _fields(_mpf(M1), _mpf(beta), _mpf(g))
        return {k: float(v) for k, v in out.items()}


def _wave_angle(M1, theta_c, g, guess):
    f = lambda b: _surface(M1, b, g)[0] - theta_c  # noqa: E731
    return mp.findroot(f, (guess, guess * (1 + mp.mpf(10) ** -9)), solver="secant",
                       tol=mp.mpf(10) ** -(2 * DIGITS - 6))


def cone_from_cone_angle(M1, theta_c, g=1.4, *, guess):
    """Every field for a cone of half-angle θ_c; ``guess`` [rad] starts the secant
    iteration for the wave angle (any value within ~1e-6 of it: the converged root
    satisfies this module's own equation, whatever started it)."""
    with mp.workdps(DIGITS):
        M1, theta_c, g = _mpf(M1), _mpf(theta_c), _mpf(g)
        beta = _wave_angle(M1, theta_c, g, _mpf(guess))
        out = _fields(M1, beta, g)
        return {k: float(v) for k, v in out.items()}


def _slope(M1, beta, g, h=mp.mpf(10) ** -10):
    """dθ_c/dβ by a central difference (error ~1e-18 at 30 digits)."""
    return (_surface(M1, beta + h, g)[0] - _surface(M1, beta - h, g)[0]) / (2 * h)


def detachment(M1, g=1.4, *, guess):
    """(largest cone angle, its wave angle) [rad]: the zero of dθ_c/dβ, by secant
    iteration started at ``guess`` [rad] (within ~1e-3 of the answer)."""
    with mp.workdps(DIGITS):
        M1, g, guess = _mpf(M1), _mpf(g), _mpf(guess)
        beta = mp.findroot(lambda b: _slope(M1, b, g), (guess, guess + mp.mpf(10) ** -4),
                           solver="secant", tol=mp.mpf(10) ** -36)
        return float(_surface(M1, beta, g)[0]), float(beta)


def sonic_cone(M1, g=1.4, *, guess):
    """(cone angle, wave angle) [rad] at which the surface Mach number is 1; secant
    iteration on M_cone(β) - 1 started at ``guess`` [rad]."""
    with mp.workdps(DIGITS):
        M1, g, guess = _mpf(M1), _mpf(g), _mpf(guess)

        def excess(b):
            vr = _surface(M1, b, g)[1]
            return 2 / (g - 1) * vr**2 / (1 - vr**2) - 1

        beta = mp.findroot(excess, (guess, guess + mp.mpf(10) ** -6), solver="secant",
                           tol=mp.mpf(10) ** -40)
        return float(_surface(M1, beta, g)[0]), float(beta)
