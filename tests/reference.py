"""Independent high-precision reference for the core relations (mpmath, 40 digits).

Written from the textbook equations, not from gasdyn2d's code: every forward
relation is the direct formula of NACA Report 1135 evaluated at 40 significant
digits, and every inverse is solved here by mpmath's own root finder on the
forward formula (or by the textbook closed form, where one exists). Nothing in
this module imports gasdyn2d.

All functions take and return Python floats (angles in radians); internally
they work in ``mpmath.mpf`` at ``DIGITS`` digits and round once at the end, so
the reference is correctly rounded to well below float64 precision.

References
----------
Ames Research Staff (1953), *Equations, Tables, and Charts for Compressible
Flow*, NACA Report 1135: isentropic eqs. 43-45, area ratio eq. 80, normal
shock eqs. 93-100, oblique shock eqs. 138-150, sonic and maximum-deflection
wave angles eqs. 167-168, Prandtl-Meyer function eq. 171 (equation numbers
from memory, as listed in /work/shared/SOURCES.md).
"""

from __future__ import annotations

import mpmath as mp

DIGITS = 40


def _mpf(x):
    return mp.mpf(float(x)) if not isinstance(x, mp.mpf) else x


def _workdps(func):
    def wrapper(*args, **kwargs):
        with mp.workdps(DIGITS):
            out = func(*[_mpf(a) if isinstance(a, (int, float)) else a for a in args], **kwargs)
        if isinstance(out, tuple):
            return tuple(float(v) for v in out)
        return float(out)

    wrapper.__name__ = func.__name__
    wrapper.__doc__ = func.__doc__
    wrapper.mp = func  # the mpf version, for use inside other references
    return wrapper


# ----------------------------------------------------------------- isentropic


def _stag(M, g):
    return 1 + (g - 1) / 2 * M**2


@_workdps
def T_T0(M, g):
    """T/T0 = (1 + (γ-1)M²/2)^-1 (NACA Report 1135, eq. 43)."""
    return 1 / _stag(M, g)


@_workdps
def p_p0(M, g):
    """p/p0 = (1 + (γ-1)M²/2)^(-γ/(γ-1)) (NACA Report 1135, eq. 44)."""
    return _stag(M, g) ** (-g / (g - 1))


@_workdps
def rho_rho0(M, g):
    """ρ/ρ0 = (1 + (γ-1)M²/2)^(-1/(γ-1)) (NACA Report 1135, eq. 45)."""
    return _stag(M, g) ** (-1 / (g - 1))


def _area(M, g):
    return (1 / M) * ((2 + (g - 1) * M**2) / (g + 1)) ** ((g + 1) / (2 * (g - 1)))


@_workdps
def A_Astar(M, g):
    """A/A* (NACA Report 1135, eq. 80)."""
    return _area(M, g)


@_workdps
def mach_angle(M):
    """μ = asin(1/M)."""
    return mp.asin(1 / M)


def _nu(M, g):
    k = mp.sqrt((g + 1) / (g - 1))
    z = mp.sqrt(M**2 - 1)
    return k * mp.atan(z / k) - mp.atan(z)


@_workdps
def nu(M, g):
    """Prandtl-Meyer function (NACA Report 1135, eq. 171)."""
    return _nu(M, g)


@_workdps
def nu_max(g):
    """ν_max = (π/2)(√((γ+1)/(γ-1)) - 1)."""
    return mp.pi / 2 * (mp.sqrt((g + 1) / (g - 1)) - 1)


# isentropic inverses: closed forms where the textbook has them


@_workdps
def M_from_T_T0(t, g):
    return mp.sqrt(2 * (1 / t - 1) / (g - 1))


@_workdps
def M_from_p_p0(p, g):
    return mp.sqrt(2 * (p ** (-(g - 1) / g) - 1) / (g - 1))


@_workdps
def M_from_rho_rho0(r, g):
    return mp.sqrt(2 * (r ** (-(g - 1)) - 1) / (g - 1))


@_workdps
def M_from_mach_angle(mu):
    return 1 / mp.sin(mu)


def _bisect_then_polish(f, lo, hi):
    """Root of f on [lo, hi] (sign change): bisection to ~1e-12, then mpmath secant."""
    flo = f(lo)
    for _ in range(45):
        mid = (lo + hi) / 2
        fm = f(mid)
        if fm == 0:
            return mid
        if (fm > 0) == (flo > 0):
            lo, flo = mid, fm
        else:
            hi = mid
    try:
        root = mp.findroot(f, (lo, hi), solver="anderson")
        if lo <= root <= hi:
            return root
    except (ValueError, ZeroDivisionError, TypeError):  # pragma: no cover - slow but sure
        # (TypeError: the secant strayed into complex values, which cannot be compared)
        pass
    for _ in range(4 * DIGITS):  # pragma: no cover
        mid = (lo + hi) / 2
        fm = f(mid)
        if (fm > 0) == (flo > 0):
            lo, flo = mid, fm
        else:
            hi = mid
    return (lo + hi) / 2  # pragma: no cover


@_workdps
def M_from_A_Astar(A, g, supersonic=True):
    """Root of A/A*(M) = A on the supersonic or subsonic branch."""
    if A == 1:
        return mp.mpf(1)
    f = lambda M: mp.log(_area(M, g)) - mp.log(A)  # noqa: E731
    if supersonic:
        hi = mp.mpf(2)
        while f(hi) < 0:
            hi *= 2
        return _bisect_then_polish(f, mp.mpf(1), hi)
    lo = mp.mpf(1) / 2
    while f(lo) < 0:
        lo /= 2
    return _bisect_then_polish(f, lo, mp.mpf(1))


@_workdps
def M_from_nu(v, g):
    """Root of ν(M) = v."""
    if v == 0:
        return mp.mpf(1)
    f = lambda M: _nu(M, g) - v  # noqa: E731
    hi = mp.mpf(2)
    while f(hi) < 0:
        hi *= 2
    return _bisect_then_polish(f, mp.mpf(1), hi)


# ----------------------------------------------------------------- normal shock


def _ns(M1, g):
    m2 = M1**2
    p = (2 * g * m2 - (g - 1)) / (g + 1)  # eq. 93
    r = (g + 1) * m2 / ((g - 1) * m2 + 2)  # eq. 94
    T = p / r  # eq. 95
    M2 = mp.sqrt(((g - 1) * m2 + 2) / (2 * g * m2 - (g - 1)))  # eq. 96
    p0 = r ** (g / (g - 1)) * p ** (-1 / (g - 1))  # eq. 99
    pitot = ((g + 1) / 2 * m2) ** (g / (g - 1)) * ((g + 1) / (2 * g * m2 - (g - 1))) ** (
        1 / (g - 1))  # eq. 100
    strength = 2 * g * (m2 - 1) / (g + 1)  # p2/p1 - 1, eq. 93
    return {"M2": M2, "p2_p1": p, "rho2_rho1": r, "T2_T1": T, "p02_p01": p0, "p02_p1": pitot,
            "strength": strength}


def normal_shock(M1, g):
    """Every ratio across a normal shock, as floats (NACA Report 1135, eqs. 93-100)."""
    with mp.workdps(DIGITS):
        return {k: float(v) for k, v in _ns(_mpf(M1), _mpf(g)).items()}


@_workdps
def M1_from_normal_shock(name, value, g):
    """Upstream Mach number of the normal shock with ``name`` = ``value`` (root finding)."""
    if name == "M2":
        m2 = value**2
        return mp.sqrt(((g - 1) * m2 + 2) / (2 * g * m2 - (g - 1)))
    if name == "p2_p1":
        return mp.sqrt(((g + 1) * value + (g - 1)) / (2 * g))
    if name == "rho2_rho1":
        return mp.sqrt(2 * value / ((g + 1) - (g - 1) * value))
    # T2/T1, p02/p01, p02/p1: solve the forward formula numerically
    sign = -1 if name == "p02_p01" else 1
    f = lambda M: sign * (mp.log(_ns(M, g)[name]) - mp.log(value))  # noqa: E731
    if f(mp.mpf(1)) == 0:
        return mp.mpf(1)
    hi = mp.mpf(2)
    while f(hi) < 0:
        hi *= 2
    return _bisect_then_polish(f, mp.mpf(1), hi)


# ----------------------------------------------------------------- oblique shock


def _theta(M1, beta, g):
    """θ(β): tan θ = 2 cot β (M² sin²β - 1)/(M²(γ + cos 2β) + 2) (NACA Report 1135, eq. 138)."""
    return mp.atan(2 / mp.tan(beta) * (M1**2 * mp.sin(beta) ** 2 - 1)
                   / (M1**2 * (g + mp.cos(2 * beta)) + 2))


def _beta_star(M1, g):
    """Wave angle at maximum deflection (NACA Report 1135, eq. 168)."""
    m2 = M1**2
    s2 = ((g + 1) * m2 / 4 - 1 + mp.sqrt((g + 1) * ((g + 1) * m2**2 / 16
                                                    + (g - 1) * m2 / 2 + 1))) / (g * m2)
    return mp.asin(mp.sqrt(s2))


def _beta_sonic(M1, g):
    """Wave angle with sonic downstream flow (NACA Report 1135, eq. 167)."""
    m2 = M1**2
    s2 = ((g + 1) * m2 / 4 - (3 - g) / 4 + mp.sqrt(
        (g + 1) * ((9 + g) / 16 - (3 - g) * m2 / 8 + (g + 1) * m2**2 / 16))) / (g * m2)
    return mp.asin(mp.sqrt(s2))


@_workdps
def deflection(M1, beta, g):
    """θ from (M1, β)."""
    return _theta(M1, beta, g)


@_workdps
def detachment(M1, g):
    """(θmax, β*) in closed form."""
    b = _beta_star(M1, g)
    return _theta(M1, b, g), b


@_workdps
def detachment_by_maximisation(M1, g):
    """(θmax, β*) found by solving dθ/dβ = 0 numerically (no closed form used)."""
    mu = mp.asin(1 / M1)
    f = lambda b: mp.diff(lambda x: _theta(M1, x, g), b)  # noqa: E731
    b = _bisect_then_polish(f, mu + (mp.pi / 2 - mu) * mp.mpf("1e-6"),
                            mp.pi / 2 - (mp.pi / 2 - mu) * mp.mpf("1e-6"))
    return _theta(M1, b, g), b


@_workdps
def sonic(M1, g):
    """(θ, β) at sonic downstream flow, closed form."""
    b = _beta_sonic(M1, g)
    return _theta(M1, b, g), b


def _oblique_M2(M1, beta, g):
    mn1 = M1 * mp.sin(beta)
    ns = _ns(mn1, g)
    return ns["M2"] / mp.sin(beta - _theta(M1, beta, g))


@_workdps
def downstream_mach(M1, beta, g):
    """M2 behind an oblique shock of wave angle β."""
    return _oblique_M2(M1, beta, g)


@_workdps
def wave_angle(M1, theta, g, strong=False):
    """β on the weak or strong branch, by bracketed root finding on θ(β) = θ."""
    mu = mp.asin(1 / M1)
    b_star = _beta_star(M1, g)
    if theta == 0:
        return mp.pi / 2 if strong else mu
    f = lambda b: _theta(M1, b, g) - theta  # noqa: E731
    if strong:
        return _bisect_then_polish(lambda b: -f(b), b_star, mp.pi / 2)
    return _bisect_then_polish(f, mu, b_star)


@_workdps
def wave_angle_and_strength(M1, theta, g, strong=False):
    """(β, p2/p1 - 1) of the shock of deflection θ; the strength 2γ(M1² sin²β - 1)/(γ+1)
    (NACA Report 1135, eq. 93 with Mn1 = M1 sin β) keeps ~28 of the 40 digits at
    M1 - 1 = 1e-12, where p2/p1 - 1 ~ 1e-12."""
    beta = wave_angle.mp(M1, theta, g, strong)
    return beta, 2 * g / (g + 1) * (M1**2 * mp.sin(beta) ** 2 - 1)


def strength_condition(M1, theta, g, strong=False):
    """|d ln(p2/p1 - 1)/d ln θ| at fixed M1: the conditioning of the strength (a float).

    From the θ-β-M relation in w = M1² sin²β - 1 (the strength is 2γw/(γ+1)):
    tan θ = 2w √(v/(1+w))/((γ-1)M1² + 2 + 2v), v = M1² - 1 - w (NACA Report 1135,
    eq. 138 rewritten), so d ln w/d ln θ = θ (1 + tan²θ)/(w d tan θ/dw).
    """
    with mp.workdps(DIGITS):
        M1, theta, g = _mpf(M1), _mpf(theta), _mpf(g)
        beta = wave_angle.mp(M1, theta, g, strong)
        w = M1**2 * mp.sin(beta) ** 2 - 1
        tan_theta = lambda x: 2 * x * mp.sqrt((M1**2 - 1 - x) / (1 + x)) / (  # noqa: E731
            (g - 1) * M1**2 + 2 + 2 * (M1**2 - 1 - x))
        slope = mp.diff(tan_theta, w)
        return float(abs(theta * (1 + mp.tan(theta) ** 2) / (w * slope))) if slope else float("inf")


def oblique_shock(M1, beta, g):
    """Every ratio behind an oblique shock of wave angle β (floats)."""
    with mp.workdps(DIGITS):
        M1, beta, g = _mpf(M1), _mpf(beta), _mpf(g)
        mn1 = M1 * mp.sin(beta)
        ns = _ns(mn1, g)
        theta = _theta(M1, beta, g)
        out = {"deflection": theta, "Mn1": mn1, "Mn2": ns["M2"],
               "M2": ns["M2"] / mp.sin(beta - theta), "p2_p1": ns["p2_p1"],
               "rho2_rho1": ns["rho2_rho1"], "T2_T1": ns["T2_T1"], "p02_p01": ns["p02_p01"],
               "strength": ns["strength"]}
        return {k: float(v) for k, v in out.items()}


# ----------------------------------------------------------------- fans


@_workdps
def fan_M2(M1, turn, g):
    """Mach number after an isentropic turn away from the flow by ``turn``."""
    return M_from_nu.mp(_nu(M1, g) + turn, g)


@_workdps
def fan_p2_p1(M1, M2, g):
    return (_stag(M1, g) / _stag(M2, g)) ** (g / (g - 1))


def condition(func, x):
    """|d ln f / d ln x| of an mpmath function at x (the relative condition number)."""
    with mp.workdps(DIGITS):
        x = _mpf(x)
        d = mp.diff(func, x)
        return float(abs(d * x / func(x)))


# ----------------------------------------------------------------- conditioning


def _cond(func_mp, x):
    x = _mpf(x)
    return abs(mp.diff(func_mp, x) * x / func_mp(x))


def inverse_condition(forward_mp, y, x):
    """|d ln x/d ln y| of the inverse of ``forward_mp`` at x (y = forward(x)), a float.

    A backward-stable inverse returns x with a relative error of about this
    number times the rounding error of y: it is the limit that no float64
    algorithm can beat, infinite where the forward relation is flat (M = 1 for
    A/A*, p02/p01 → 1, detachment).
    """
    with mp.workdps(DIGITS):
        c = _cond(forward_mp, x)
        return float(1 / c) if c != 0 else float("inf")


def wave_angle_condition(M1, theta, g, strong=False):
    """|d ln β/d ln θ| at the shock of deflection θ on the given branch."""
    with mp.workdps(DIGITS):
        M1, theta, g = _mpf(M1), _mpf(theta), _mpf(g)
        beta = wave_angle.mp(M1, theta, g, strong)
        slope = mp.diff(lambda b: _theta(M1, b, g), beta)
        return float(abs(theta / (beta * slope))) if slope != 0 else float("inf")


# ----------------------------------------------------------------- test helpers

import numpy as _np  # noqa: E402  (helpers only; the reference above is pure mpmath)

EPS = float(_np.finfo(float).eps)


def relative_error(got, ref):
    """Elementwise |got/ref - 1| (|got - ref| where ref == 0), as an ndarray."""
    got = _np.asarray(got, dtype=float)
    ref = _np.asarray(ref, dtype=float)
    with _np.errstate(divide="ignore", invalid="ignore"):
        return _np.where(ref == 0, _np.abs(got - ref), _np.abs(got / ref - 1.0))


def random_mach_and_gamma(n, seed, low=1.001, high=50.0):
    """n random (M, γ): M log-uniform in [low, high], γ uniform in [1.05, 1.67]."""
    rng = _np.random.default_rng(seed)
    M = _np.exp(rng.uniform(_np.log(low), _np.log(high), n))
    gamma = rng.uniform(1.05, 1.67, n)
    return M, gamma


def printed_tolerance(text):
    """Half a unit in the last printed place of a table entry such as "0.0585277"."""
    decimals = len(text.split(".")[1]) if "." in text else 0
    return 0.5 * 10.0 ** (-decimals) * (1.0 + 1e-9)


def agrees_to_print(value, text):
    """True when ``value`` rounds to the printed table entry ``text``."""
    return abs(float(value) - float(text)) <= printed_tolerance(text)
