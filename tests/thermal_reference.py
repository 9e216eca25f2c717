"""Independent high-precision reference for a thermally perfect gas (mpmath, 30 digits).

Written from the conservation laws and the harmonic-oscillator gas model, not from
gasdyn2d's code (nothing here imports gasdyn2d):

- the gas: cp(T) = cp_f + R x² e^x/(e^x - 1)², x = θv/T, h(T) = cp_f T + R θv/(e^x - 1),
  φ(T) = cp_f ln T + R [x/(e^x - 1) - ln(1 - e^-x)], γ(T) = cp/(cp - R), a² = γ R T
  (NACA Report 1135, imperfect-gas section, from memory);
- isentropic flow at stagnation temperature T0: energy h(T0) = h(T) + V²/2 with V = M a(T),
  solved for T by mpmath's findroot; p/p0 = exp((φ(T) - φ(T0))/R) (the entropy integral);
  ρ/ρ0 = (p/p0)(T0/T); A/A* = ρ*V*/(ρV) with the sonic state from the same energy equation;
- normal shock from (M1, T1): mass ρ1u1 = ρ2u2, momentum p1 + ρ1u1² = p2 + ρ2u2² and energy
  h(T1) + u1²/2 = h(T2) + u2²/2 with p = ρRT, solved as a 2x2 system (u2, T2) by findroot;
  the stagnation-pressure ratio from the entropy rise, p02/p01 = exp(-(s2 - s1)/R);
- oblique shock: the normal-shock solution for the normal component M1 sin β at the same T1,
  the tangential velocity conserved; θ(β) solved for β by findroot, detachment where
  dθ/dβ = 0 (mpmath's numerical derivative), the sonic point where M2 = 1;
- Prandtl–Meyer function: ν = ∫ √(M² - 1) dV/V along the isentrope, written in T as
  ∫_T^T* √(M² - 1) cp/V² dT' and integrated by mpmath's tanh-sinh quadrature.

Functions take Python floats (θv, frozen γ and R given as ``gas=(theta, gamma, R)``) and
return Python floats, rounded once from 30-digit results.
"""

from __future__ import annotations

import mpmath as mp

DIGITS = 30
AIR = (3055.6, 1.4, 287.05)  # θv [K], frozen γ, R [J/(kg·K)] (NACA Report 1135, from memory)


def _f(x):
    return mp.mpf(float(x)) if not isinstance(x, mp.mpf) else x


class _Gas:
    """The harmonic-oscillator gas in mpf arithmetic."""

    def __init__(self, gas):
        theta, gamma, R = (_f(v) for v in gas)
        self.theta, self.R = theta, R
        self.cpf = gamma * R / (gamma - 1)

    # beyond x = θv/T = 1000 the vibrational terms are below e^-990 of the frozen ones
    # (far under 30 digits) and are dropped, so that quadratures may reach T → 0
    def cp(self, T):
        x = self.theta / T
        if x > 1000:
            return self.cpf
        return self.cpf + self.R * x**2 * mp.exp(x) / mp.expm1(x) ** 2

    def h(self, T):
        x = self.theta / T
        if x > 1000:
            return self.cpf * T
        return self.cpf * T + self.R * self.theta / mp.expm1(x)

    def phi(self, T):
        x = self.theta / T
        if x > 1000:
            return self.cpf * mp.log(T)
        return self.cpf * mp.log(T) + self.R * (x / mp.expm1(x) - mp.log(-mp.expm1(-x)))

    def gamma(self, T):
        cp = self.cp(T)
        return cp / (cp - self.R)

    def a2(self, T):
        return self.gamma(T) * self.R * T


def _run(func):
    def wrapper(*args, gas=AIR, **kwargs):
        with mp.workdps(DIGITS):
            out = func(_Gas(gas), *[_f(a) if isinstance(a, (int, float)) else a for a in args],
                       **kwargs)
        if isinstance(out, dict):
            return {k: float(v) for k, v in out.items()}
        if isinstance(out, tuple):
            return tuple(float(v) for v in out)
        return float(out)

    wrapper.__name__ = func.__name__
    wrapper.__doc__ = func.__doc__
    wrapper.mp = func
    return wrapper


# ----------------------------------------------------------------- isentropic


def _static_temperature(g, M, T0):
    """T from h(T0) = h(T) + M² a(T)²/2 (energy), started from the perfect-gas value."""
    h0 = g.h(T0)
    gamma0 = g.gamma(T0)
    start = T0 / (1 + (gamma0 - 1) / 2 * M**2)
    return mp.findroot(lambda T: g.h(T) + M**2 * g.a2(T) / 2 - h0, start)


def _sonic_temperature(g, T0):
    return _static_temperature(g, mp.mpf(1), T0)


@_run
def isentropic(g, M, T0):
    """{T_T0, p_p0, rho_rho0, A_Astar} at Mach M for stagnation temperature T0 [K]."""
    T = _static_temperature(g, M, T0)
    Ts = _sonic_temperature(g, T0)
    log_p = (g.phi(T) - g.phi(T0)) / g.R  # entropy integral
    log_ps = (g.phi(Ts) - g.phi(T0)) / g.R
    flux = mp.exp(log_p) / T * M * mp.sqrt(g.a2(T))  # ρV up to a constant factor
    flux_star = mp.exp(log_ps) / Ts * mp.sqrt(g.a2(Ts))
    return {"T_T0": T / T0, "p_p0": mp.exp(log_p), "rho_rho0": mp.exp(log_p) * T0 / T,
            "A_Astar": flux_star / flux, "T": T}


@_run
def sonic_temperature(g, T0):
    """T* [K] at stagnation temperature T0."""
    return _sonic_temperature(g, T0)


def _mach_at(g, T, T0):
    return mp.sqrt(2 * (g.h(T0) - g.h(T)) / g.a2(T))


def _nu_of_temperature(g, T, T0):
    Ts = _sonic_temperature(g, T0)
    h0 = g.h(T0)

    def integrand(Tp):
        V2 = 2 * (h0 - g.h(Tp))
        M2 = V2 / g.a2(Tp)
        return mp.sqrt(max(M2 - 1, 0)) * g.cp(Tp) / V2  # √(M²-1) dV/V per dT

    return mp.quad(integrand, [T, Ts])


@_run
def prandtl_meyer(g, M, T0):
    """ν(M) [rad] at stagnation temperature T0 [K]."""
    return _nu_of_temperature(g, _static_temperature(g, M, T0), T0)


@_run
def max_prandtl_meyer(g, T0):
    """ν at M → ∞ (T → 0) [rad]."""
    return _nu_of_temperature(g, mp.mpf(0), T0)  # the integrand ~ T^(-1/2): tanh-sinh copes


@_run
def expansion_fan(g, M1, T1, turn):
    """{M2, T2_T1, p2_p1} behind a centred fan turning a stream (M1, T1) by ``turn`` [rad]."""
    T0 = mp.findroot(lambda T: g.h(T) - g.h(T1) - M1**2 * g.a2(T1) / 2, T1 * 2)
    nu2 = _nu_of_temperature(g, T1, T0) + turn
    T2 = mp.findroot(lambda T: _nu_of_temperature(g, T, T0) - nu2,
                     T1 * (1 - 0.5 * turn))
    return {"M2": _mach_at(g, T2, T0), "T2_T1": T2 / T1,
            "p2_p1": mp.exp((g.phi(T2) - g.phi(T1)) / g.R)}


# ----------------------------------------------------------------- normal shock


def _normal_shock(g, M1, T1):
    R = g.R
    u1 = M1 * mp.sqrt(g.a2(T1))
    rho1 = mp.mpf(1)
    p1 = rho1 * R * T1
    gamma1 = g.gamma(T1)
    # start: the perfect-gas shock with γ(T1)
    m2 = M1**2
    eps0 = ((gamma1 - 1) * m2 + 2) / ((gamma1 + 1) * m2)
    T20 = T1 * (2 * gamma1 * m2 - (gamma1 - 1)) * ((gamma1 - 1) * m2 + 2) / ((gamma1 + 1) ** 2 * m2)

    def equations(u2, T2):
        rho2 = rho1 * u1 / u2  # mass
        momentum = p1 + rho1 * u1**2 - rho2 * R * T2 - rho2 * u2**2
        energy = g.h(T1) + u1**2 / 2 - g.h(T2) - u2**2 / 2
        return [momentum / p1, energy / g.h(T1)]

    u2, T2 = mp.findroot(equations, (u1 * eps0, T20))
    if M1 > 1 and not u2 < u1 * (1 - mp.mpf(10) ** -20):
        raise ArithmeticError(f"findroot found the trivial root at M1 = {M1}")
    rho2 = rho1 * u1 / u2
    p2 = rho2 * R * T2
    ds = (g.phi(T2) - g.phi(T1)) - R * mp.log(p2 / p1)  # entropy rise
    return {"M2": u2 / mp.sqrt(g.a2(T2)), "p2_p1": p2 / p1, "rho2_rho1": rho2 / rho1,
            "T2_T1": T2 / T1, "p02_p01": mp.exp(-ds / R), "gamma2": g.gamma(T2),
            "entropy_rise": ds, "strength": (p2 - p1) / p1, "gamma1": g.gamma(T1)}


@_run
def normal_shock(g, M1, T1):
    """{M2, p2_p1, rho2_rho1, T2_T1, p02_p01, gamma2, entropy_rise, strength, gamma1} for
    (M1, T1 [K]); the strength is (p2 - p1)/p1 at 30 digits."""
    return _normal_shock(g, M1, T1)


@_run
def pitot_ratio(g, M1, T1):
    """p02/p1: stagnation pressure behind a normal shock over static pressure ahead."""
    shock = _normal_shock(g, M1, T1)
    T0 = mp.findroot(lambda T: g.h(T) - g.h(T1) - M1**2 * g.a2(T1) / 2, 2 * T1)
    p01_p1 = mp.exp((g.phi(T0) - g.phi(T1)) / g.R)
    return shock["p02_p01"] * p01_p1


# ----------------------------------------------------------------- oblique shock


def _oblique(g, M1, T1, beta):
    normal = _normal_shock(g, M1 * mp.sin(beta), T1)
    eps = 1 / normal["rho2_rho1"]
    theta = beta - mp.atan(eps * mp.tan(beta))  # tangential velocity conserved
    # M2² = (un2² + ut²)/a2², in units of a1²
    un2 = eps * M1 * mp.sin(beta)
    ut = M1 * mp.cos(beta)
    a2_a1 = mp.sqrt(normal["T2_T1"] * g.gamma(normal["T2_T1"] * T1) / g.gamma(T1))
    out = dict(normal)
    out["deflection"] = theta
    out["M2"] = mp.sqrt(un2**2 + ut**2) / a2_a1
    out["Mn2"] = normal["M2"]
    return out


@_run
def oblique_from_wave_angle(g, M1, T1, beta):
    """Every quantity behind an oblique shock of wave angle β [rad] (normal component at T1)."""
    return _oblique(g, M1, T1, beta)


_DETACHMENT_CACHE = {}


def _detachment(g, M1, T1):
    key = (g.theta, g.cpf, g.R, M1, T1, mp.mp.dps)
    if key not in _DETACHMENT_CACHE:
        _DETACHMENT_CACHE[key] = _detachment_uncached(g, M1, T1)
    return _DETACHMENT_CACHE[key]


def _detachment_uncached(g, M1, T1):
    theta = lambda b: _oblique(g, M1, T1, b)["deflection"]  # noqa: E731
    mu = mp.asin(1 / M1)
    # bracket the maximum on a coarse grid, then solve dθ/dβ = 0
    grid = [mu + (mp.pi / 2 - mu) * k / 40 for k in range(1, 40)]
    best = max(grid, key=theta)
    beta = mp.findroot(lambda b: mp.diff(theta, b), best)
    return theta(beta), beta


@_run
def detachment(g, M1, T1):
    """(θmax, β at θmax) [rad]."""
    return _detachment(g, M1, T1)


@_run
def sonic_point(g, M1, T1):
    """(θ, β) [rad] with M2 = 1."""
    _, beta_max = _detachment(g, M1, T1)
    beta = mp.findroot(lambda b: _oblique(g, M1, T1, b)["M2"] - 1, beta_max - mp.mpf("0.01"))
    return _oblique(g, M1, T1, beta)["deflection"], beta


@_run
def oblique_from_deflection(g, M1, T1, theta, strong=False):
    """Every quantity behind the weak (or strong) shock of deflection θ [rad]."""
    theta_max, beta_max = _detachment(g, M1, T1)
    mu = mp.asin(1 / M1)
    if strong:
        lo, hi = beta_max, mp.pi / 2
    else:
        lo, hi = mu + (beta_max - mu) / 1000, beta_max  # well off the degenerate Mach wave
    beta = mp.findroot(lambda b: _oblique(g, M1, T1, b)["deflection"] - theta, (lo, hi),
                       solver="anderson")
    out = _oblique(g, M1, T1, beta)
    out["wave_angle"] = beta
    return out
