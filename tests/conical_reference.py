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
wave angle β, from the oblique-shock relations (NACA Report 1135, eqs. 128-138)
written in the shock's variable w = M1² sin²β - 1; the cone surface is the ray
where V_θ = 0.

Method (chosen for being unlike gasdyn2d's): the equation is integrated in θ
itself, from β towards the axis, by the Gragg–Bulirsch–Stoer method (modified
midpoint rule, polynomial extrapolation in h²) with adaptive macro steps at a
local tolerance of 1e-27; the surface ray is located by Newton steps on V_θ,
each one re-integrating from the last macro step. Behind a weak shock the
equation's denominator a² - V_θ² is only ~w a², so every shock layer is
computed with log10(1/w) extra digits: results keep 30 digits for the weakest
shocks (w ~ 1e-16 on a 1e-4 rad cone). Inverses are secant iterations in ln w;
derivatives for the detachment point are central differences. Every public
function takes and returns Python floats (angles in radians) and works at
``DIGITS`` digits or more inside.

Cost: 0.2-2 s per shock layer (more for slender cones), so the tests run it
live on a handful of cases and keep the slowest ones in a table
(``python tests/conical_reference.py`` prints it again).
"""

from __future__ import annotations

import mpmath as mp

DIGITS = 30
_TOL_DIGITS = 27  # local tolerance of a macro step, 10^-27 at 30 digits
_SEQUENCE = (2, 4, 6, 8, 10, 12, 14, 16, 18, 20, 22, 24)  # midpoint substeps per macro step


def _mpf(x):
    return x if isinstance(x, mp.mpf) else mp.mpf(float(x))


# ----------------------------------------------------------------- shock and equation


def _behind_shock(M1, w, g):
    """β, (V_r, V_θ)/V_max, deflection δ and M2 just behind the shock with
    w = M1² sin²β - 1 (the shock's own variable: exact for the weakest shocks)."""
    beta = mp.asin(mp.sqrt(1 + w) / M1)
    mn1_sq = 1 + w
    # NACA Report 1135, eq. 138: tan δ = 2 cot β (M1² sin²β - 1)/(M1²(γ + cos 2β) + 2)
    cos_2beta = 1 - 2 * mn1_sq / M1**2
    cot_beta = mp.sqrt(M1**2 - mn1_sq) / mp.sqrt(mn1_sq)
    delta = mp.atan(2 * cot_beta * w / (M1**2 * (g + cos_2beta) + 2))
    mn2_sq = (1 + (g - 1) / 2 * mn1_sq) / (g * mn1_sq - (g - 1) / 2)  # eq. 96
    M2 = mp.sqrt(mn2_sq) / mp.sin(beta - delta)  # eq. 132
    V = 1 / mp.sqrt(1 + 2 / ((g - 1) * M2**2))  # V/V_max from the energy equation
    return beta, [V * mp.cos(beta - delta), -V * mp.sin(beta - delta)], delta, M2


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
    """One extrapolated step: (y(x + H), growth factor for the next step, or 0 if the
    extrapolation did not converge and the step must be retried shorter)."""
    tol = mp.mpf(10) ** -(mp.mp.dps - DIGITS + _TOL_DIGITS)
    table = []
    for k, n in enumerate(_SEQUENCE):
        row = [_midpoint(f, x, y, H, n)]
        for j in range(1, k + 1):
            r = (mp.mpf(_SEQUENCE[k]) / _SEQUENCE[k - j]) ** 2
            row.append([a + (a - b) / (r - 1) for a, b in zip(row[j - 1], table[k - 1][j - 1])])
        table.append(row)
        if k >= 2 and max(abs(a - b) for a, b in zip(row[-1], row[-2])) < tol:
            return row[-1], (2 if k < 7 else 1.25)
    return row[-1], 0


def _integrate(f, x, y, x_end):
    H = x_end - x
    while x != x_end:
        if abs(H) > abs(x_end - x):
            H = x_end - x
        y_new, grow = _macro_step(f, x, y, H)
        if grow:
            x, y = x + H, y_new
            H *= grow
        else:
            H /= 2
    return y


_SURFACES = {}


def _surface(M1, w, g):
    """(θ_c, V_r at the cone, β, δ, M2) behind the shock w = M1² sin²β - 1.

    Behind a weak shock the equation's denominator a² - V_θ² is ~w a², so the working
    precision is raised by log10(1/w) digits (the result keeps 30); the first step is a
    tenth of w in θ/β (the flow turns within a layer of about that relative width).
    Results are remembered.
    """
    key = (M1, w, g, mp.mp.prec)
    if key not in _SURFACES:
        extra = max(0, int(-mp.log10(w)) + 1)
        with mp.extradps(extra):
            out = _march_to_surface(+M1, +w, +g)
        _SURFACES[key] = tuple(+v for v in out)
    return _SURFACES[key]


def _march_to_surface(M1, w, g):
    beta, y, delta, M2 = _behind_shock(M1, w, g)
    f = _taylor_maccoll(g)
    x, H = beta, -beta * min(mp.mpf(1) / 16, w / 10)
    while True:
        if x + H <= 0:
            H = -x / 2
        y_new, grow = _macro_step(f, x, y, H)
        if not grow:
            H /= 2
            continue
        if y_new[1] >= 0:
            break
        x, y, H = x + H, y_new, H * grow
    theta = x + H * (-y[1]) / (y_new[1] - y[1])  # secant start inside the last step
    for _ in range(30):
        yt = _integrate(f, x, y, theta)
        step = yt[1] / f(theta, yt)[1]
        theta -= step
        if abs(step) < mp.mpf(10) ** -(mp.mp.dps - 2) * theta:
            break
    return theta, _integrate(f, x, y, theta)[0], beta, delta, M2


# ----------------------------------------------------------------- public reference


def _fields(M1, w, g):
    theta_c, vr, beta, delta, M2 = _surface(M1, w, g)
    mc2 = 2 / (g - 1) * vr**2 / (1 - vr**2)
    stag = lambda m2: 1 + (g - 1) / 2 * m2  # noqa: E731  (T0/T, eq. 43)
    shock = _normal_shock(mp.sqrt(1 + w), g)
    # isentropic from the shock to the cone, p0 falls by p02/p01 across the shock (eq. 44)
    p_c = shock["p02_p01"] * (stag(M1**2) / stag(mc2)) ** (g / (g - 1))
    T_c = stag(M1**2) / stag(mc2)
    return {"cone_angle": theta_c, "wave_angle": beta, "deflection": delta, "M2": M2,
            **shock, "M_cone": mp.sqrt(mc2), "p_cone_p1": p_c, "T_cone_T1": T_c,
            "rho_cone_rho1": p_c / T_c, "cp_cone": 2 * (p_c - 1) / (g * M1**2)}


def _w_of_beta(M1, beta):
    """w = M1² sin²β - 1 of a float β, at the precision its smallness needs."""
    with mp.extradps(20):
        w = (M1 * mp.sin(beta)) ** 2 - 1
        with mp.extradps(max(0, int(-mp.log10(w)))):
            return +((M1 * mp.sin(beta)) ** 2 - 1)


def cone_from_wave_angle(M1, beta, g=1.4):
    """Every field of the shock layer behind a conical shock of wave angle β (floats)."""
    with mp.workdps(DIGITS):
        M1, g = _mpf(M1), _mpf(g)
        out = _fields(M1, _w_of_beta(M1, _mpf(beta)), g)
        out["wave_angle"] = _mpf(beta)  # the given float (the one recomputed from w agrees)
        return {k: float(v) for k, v in out.items()}


def _secant(f, x0, x1, *, xtol, ftol, max_iter=20):
    """Secant iteration until a step below ``xtol`` or |f| below ``ftol`` (the
    integration's noise, ~1e-25, stops any iteration from reaching 30 digits)."""
    f0, f1 = f(x0), f(x1)
    for _ in range(max_iter):
        if f1 == f0 or abs(f1) <= ftol:
            break
        x0, x1, f0 = x1, x1 - f1 * (x1 - x0) / (f1 - f0), f1
        f1 = f(x1)
        if abs(x1 - x0) <= xtol:
            break
    else:
        raise ArithmeticError("the reference secant iteration did not converge")
    return x1


def _log_w(M1, theta_c, g, guess):
    """x = ln w of the cone θ_c: secant iteration on ln θ_c(x), in which slender cones
    (w ∝ θ_c⁴) stay well scaled."""
    f = lambda x: mp.log(_surface(M1, mp.exp(x), g)[0] / theta_c)  # noqa: E731
    x0 = mp.log(_w_of_beta(M1, guess))
    return _secant(f, x0, x0 + mp.mpf(10) ** -6, xtol=mp.mpf(10) ** -20, ftol=mp.mpf(10) ** -24)


def cone_from_cone_angle(M1, theta_c, g=1.4, *, guess):
    """Every field for a cone of half-angle θ_c; ``guess`` [rad], a wave angle near the
    answer, starts the secant iteration (the converged root satisfies this module's own
    equation, whatever started it)."""
    with mp.workdps(DIGITS):
        M1, theta_c, g = _mpf(M1), _mpf(theta_c), _mpf(g)
        out = _fields(M1, mp.exp(_log_w(M1, theta_c, g, _mpf(guess))), g)
        return {k: float(v) for k, v in out.items()}


def _slope(M1, x, g, h=mp.mpf(10) ** -10):
    """d ln θ_c/d ln w by a central difference (error ~1e-18 at 30 digits)."""
    return (mp.log(_surface(M1, mp.exp(x + h), g)[0])
            - mp.log(_surface(M1, mp.exp(x - h), g)[0])) / (2 * h)


def detachment(M1, g=1.4, *, guess):
    """(largest cone angle, its wave angle) [rad]: the zero of d ln θ_c/d ln w, by
    secant iteration started at the wave angle ``guess`` [rad] (within ~1e-3)."""
    with mp.workdps(DIGITS):
        M1, g = _mpf(M1), _mpf(g)
        x0 = mp.log(_w_of_beta(M1, _mpf(guess)))
        x = _secant(lambda x: _slope(M1, x, g), x0, x0 + mp.mpf(10) ** -4,
                    xtol=mp.mpf(10) ** -18, ftol=mp.mpf(10) ** -20)
        theta_c, _, beta, _, _ = _surface(M1, mp.exp(x), g)
        return float(theta_c), float(beta)


def sonic_cone(M1, g=1.4, *, guess):
    """(cone angle, wave angle) [rad] at which the surface Mach number is 1; secant
    iteration on M_cone(β) - 1 started at ``guess`` [rad]."""
    with mp.workdps(DIGITS):
        M1, g = _mpf(M1), _mpf(g)

        def excess(x):
            vr = _surface(M1, mp.exp(x), g)[1]
            return 2 / (g - 1) * vr**2 / (1 - vr**2) - 1

        x0 = mp.log(_w_of_beta(M1, _mpf(guess)))
        x = _secant(excess, x0, x0 + mp.mpf(10) ** -6, xtol=mp.mpf(10) ** -20,
                    ftol=mp.mpf(10) ** -24)
        theta_c, _, beta, _, _ = _surface(M1, mp.exp(x), g)
        return float(theta_c), float(beta)


# ----------------------------------------------------------------- slow cases, kept as a table

#: (M1, cone angle [rad], γ, a wave angle near the answer [rad]) too slow to run in the test
#: suite (slender cones, near detachment, near M1 = 1); tests/test_conical_flow.py keeps
#: their 30-digit answers in SLOW_REFERENCE, printed by ``python tests/conical_reference.py``.
SLOW_CONES = [
    (1.05, 0.0001, 1.4, 1.2609516870532782),
    (2.0, 0.0001, 1.1, 0.5235987755983009),
    (20.0, 0.0001, 1.67, 0.05002085680791693),
    (1.05, 0.17009274588749448, 1.4, 1.3736074592509133),  # 1e-4 below detachment
    (1.05, 0.17010975516208324, 1.4, 1.3759297439218554),  # 1e-8 below detachment
    (4.0, 0.8194888013117024, 1.67, 1.2164766054706355),  # 1e-6 below detachment
    (1.001, 0.012298271673821965, 1.4, 1.5265974628949164),
    (1.01, 0.0038551852049780763, 1.4, 1.4299606306784165),
    (1.02, 0.10425247048041779, 1.1, 1.4007424674639932),
]
#: (M1, γ, a wave angle near the detachment wave angle [rad])
SLOW_DETACHMENTS = [
    (1.05, 1.4, 1.3759532613983732),
    (3.0, 1.2, 1.2853581713897673),
    (1.001, 1.4, 1.541166198544173),
    (20.0, 1.67, 1.234823007025614),
]
#: (M1, γ, a wave angle near the sonic-surface wave angle [rad])
SLOW_SONIC = [
    (2.0, 1.4, 1.0000235372862012),
    (5.0, 1.3, 1.169760437445286),
]


def _print_slow_table():
    print("SLOW_REFERENCE = {")
    for M1, theta_c, g, guess in SLOW_CONES:
        out = cone_from_cone_angle(M1, theta_c, g, guess=guess)
        print(f"    ({M1!r}, {theta_c!r}, {g!r}): {{")
        for name, value in out.items():
            print(f"        {name!r}: {value!r},")
        print("    },")
    print("}")
    print("SLOW_DETACHMENT = {")
    for M1, g, guess in SLOW_DETACHMENTS:
        print(f"    ({M1!r}, {g!r}): {detachment(M1, g, guess=guess)!r},")
    print("}")
    print("SLOW_SONIC = {")
    for M1, g, guess in SLOW_SONIC:
        print(f"    ({M1!r}, {g!r}): {sonic_cone(M1, g, guess=guess)!r},")
    print("}")


if __name__ == "__main__":
    _print_slow_table()
