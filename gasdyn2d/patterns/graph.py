"""Coupled planar wave patterns as a graph of uniform regions, solved in batches.

A steady planar wave pattern is a graph: uniform flow regions are its nodes,
simple waves (oblique shocks and centred Prandtl–Meyer fans) are its edges,
and conditions tie regions to walls (fixed direction), to free boundaries
(fixed pressure) and to each other across slip lines (equal pressure and
direction). :class:`WavePattern` lets the user state such a pattern; its
:meth:`~WavePattern.solve` finds every unknown wave turn so that all the
conditions hold, for one case or for many cases at once, and returns a
:class:`PatternSolution` with every region's state and every wave's type,
angles and turn.

Conventions
-----------
- Flow direction is counterclockwise from the x axis [rad].
- A ``"left"``-running wave leans to the left of the flow seen from upstream
  (from a lower wall, a compression turns the flow counterclockwise); a
  ``"right"``-running wave leans to the right (from an upper wall, a
  compression turns the flow clockwise).
- A wave's ``turn`` is the signed change of flow direction across it
  (counterclockwise positive). Its sign and the family decide the wave type:
  left-running with turn > 0, or right-running with turn < 0, is an oblique
  shock; the other signs give an expansion fan.

The solution is exact for the relations of each wave: fans are centred
simple waves and shocks are straight, so states reached after two fans cross
or after a fan reflects from a wall are exact (Riemann invariants are carried
unchanged across the other family), while states after a shock meets a fan
are the usual wave-by-wave approximation of the curved interaction.
"""

from __future__ import annotations

import dataclasses

import numpy as np

from .. import _numerics as nx
from ..boundary.checks import Check, errors_mode, format_value
from ..errors import DetachedShockError, IllPosedProblemError, InvalidInputError, NoSolutionError
from ..relations.isentropic import mach_angle_of
from ..relations.oblique_shocks import detachment_angles, oblique_shock_ratios
from .solution import PatternSolution, RegionSolution, WaveSolution, region_name
from ..relations.flow_state import FlowState
from ..relations.simple_waves import turn_for_pressure_ratio, turn_state

__all__ = ["WavePattern", "PatternSolution", "RegionSolution", "WaveSolution"]

_FAMILY_SIGN = {"left": 1.0, "right": -1.0}
_FD_STEP = 1e-7  # finite-difference step in a turn [rad] for the Jacobian
_MAX_HALVINGS = 30


@dataclasses.dataclass(frozen=True)
class _Wave:
    name: str
    upstream: str
    downstream: str
    sign: float  # +1 left-running, -1 right-running
    spec: str  # "turn", "direction", "pressure" or "unknown"
    value: object  # ndarray (SI) or None
    strong: bool
    guess: object
    start: object


@dataclasses.dataclass(frozen=True)
class _Condition:
    kind: str  # "wall", "free boundary", "slip line"
    regions: tuple
    value: object
    through: object = None  # (x, y) [m] on a straight wall or free boundary, or None

    def label(self):
        if self.kind == "slip line":
            return f"slip line between {self.regions[0]!r} and {self.regions[1]!r}"
        return f"{self.kind} on {self.regions[0]!r}"


# --------------------------------------------------------------------- pattern


class WavePattern:
    """A planar wave pattern to be solved: regions, waves and conditions.

    Parameters
    ----------
    inflow : FlowState or float or array_like
        The given upstream region: a :class:`~gasdyn2d.FlowState` (then
        pressures in conditions are absolute [Pa] and :meth:`PatternSolution.state`
        gives full states), or a Mach number (array for a batch; pressures
        in conditions are then ratios to the inflow pressure).
    direction : float or Quantity, optional
        Inflow direction [rad] when ``inflow`` is a Mach number.
    gamma : float or array_like, optional
        Ratio of specific heats when ``inflow`` is a Mach number (may be an array).
    name : str, optional
        Name of the inflow region (default ``"1"``).

    Notes
    -----
    Angles in the solution are plain radians, or Quantities in the unit of
    the first angle given as a Quantity (inflow direction, a turn, a wave's
    direction or a wall direction).

    Each wave adds one region (its ``downstream``) reached from an existing
    one; each wave of unknown turn adds one unknown; a wall or a free
    boundary adds one condition and a slip line two (equal pressure, equal
    direction). :meth:`check` reports precisely what is missing or extra.
    The Newton iteration runs on all cases at once: residuals are the
    direction and log-pressure mismatches; the Jacobian is a forward
    difference over each unknown turn (one-sided away from detachment),
    re-evaluating only the waves downstream of that unknown; a step that
    lands beyond detachment or increases the residual is halved.

    Examples
    --------
    A 6° ramp shock in a Mach 2.6 test-section duct, reflecting from the
    opposite (upper) wall:

    >>> import numpy as np
    >>> from gasdyn2d.patterns.graph import WavePattern
    >>> duct = WavePattern(2.6)
    >>> _ = duct.add_wave("ramp shock", upstream="1", downstream="2", family="left",
    ...                   turn=np.radians(6.0))
    >>> _ = duct.add_wave("reflected", upstream="2", downstream="3", family="right")
    >>> _ = duct.add_wall("3", direction=0.0)
    >>> solution = duct.solve()
    >>> round(solution.region("3").M, 4), round(solution.region("3").p_ratio, 4)
    (2.1051, 2.1404)
    """

    def __init__(self, inflow, *, direction=None, gamma=None, name="1"):
        if isinstance(inflow, FlowState):
            if direction is not None or gamma is not None:
                given = " and ".join(k for k, v in (("direction", direction), ("gamma", gamma))
                                     if v is not None)
                raise InvalidInputError(
                    f"{given} cannot be given with a FlowState inflow, which carries its own "
                    "direction and gas; set them on the FlowState instead, e.g. "
                    "FlowState(M, p, T, direction=..., gas=Gas(gamma=...)).")
            self._inflow_state = inflow
            M, d, g = inflow.M_si, inflow.direction_si, np.asarray(inflow.gas.gamma)
            self._angle_units = [getattr(inflow.direction, "units", None)]  # its angle unit
            self._pressure_scale = inflow.p_si
            self._pressure_kind = "pressure"
        else:
            self._inflow_state = None
            M, _ = nx.to_si(inflow, "inflow", "dimensionless")
            d, unit = nx.to_si(0.0 if direction is None else direction, "direction", "angle")
            self._angle_units = [unit]
            g, _ = nx.to_si(1.4 if gamma is None else gamma, "gamma", "dimensionless")
            self._pressure_scale = np.asarray(1.0)
            self._pressure_kind = "dimensionless"
        self._M_in, self._d_in, self._gamma = _frozen(M), _frozen(d), _frozen(g)
        self.inflow_name = region_name(name, "name")
        self._waves: dict[str, _Wave] = {}
        self._conditions: list[_Condition] = []

    @property
    def inflow_state(self):
        """The inflow :class:`~gasdyn2d.FlowState`, or None if the inflow was a Mach number."""
        return self._inflow_state

    # -- building the pattern
    def add_wave(self, name, *, upstream, downstream, family, turn=None, direction=None,
                 pressure=None, branch="weak", guess=None, start=None):
        """Add a wave from region ``upstream`` to a new region ``downstream``.

        Parameters
        ----------
        name : str
            The wave's name.
        upstream, downstream : str
            Region names; ``downstream`` must be new.
        family : {"left", "right"}
            Left- or right-running (see the module conventions).
        turn, direction, pressure : float, array_like or Quantity, optional
            At most one: the signed turn [rad]; the downstream flow direction
            [rad]; or the downstream static pressure ([Pa], or a ratio to the
            inflow pressure when the inflow was a Mach number). None of them:
            the turn is an unknown of the pattern.
        branch : {"weak", "strong"}
            Branch of the shock when the wave is a compression.
        guess : float or array_like, optional
            Starting turn [rad] for an unknown wave (default 0).
        start : (x, y), optional
            Point [m] where the wave starts (floats, batch arrays or length
            Quantities). Without it the solution may place the wave itself:
            at the point where the wave that made ``upstream`` meets a wall
            or free boundary placed with ``through=``, or at the crossing of
            two placed waves ahead of a slip line (see
            :class:`PatternSolution`, Notes).

        Returns
        -------
        WavePattern
            ``self``, so calls can be chained.
        """
        name = region_name(name, "name")
        upstream = region_name(upstream, "upstream")
        downstream = region_name(downstream, "downstream")
        if name in self._waves:
            raise IllPosedProblemError(f"a wave named {name!r} already exists; give each wave "
                                       "its own name.")
        if family not in _FAMILY_SIGN:
            raise nx.InvalidInputError(f"family must be 'left' or 'right'; got {family!r}.")
        nx.check_branch(branch, ("weak", "strong"))
        given = {k: v for k, v in (("turn", turn), ("direction", direction),
                                   ("pressure", pressure)) if v is not None}
        if len(given) > 1:
            raise IllPosedProblemError(
                f"wave {name!r}: give at most one of turn, direction and pressure; got "
                f"{', '.join(given)}.")
        spec, value = next(iter(given.items())) if given else ("unknown", None)
        if spec in ("turn", "direction"):
            value, unit = nx.to_si(value, spec, "angle")
            self._angle_units.append(unit)
            value = _frozen(value)
        elif spec == "pressure":
            value = _frozen(nx.to_si(value, "pressure", self._pressure_kind)[0]
                            / self._pressure_scale)
        if downstream == upstream:
            raise IllPosedProblemError(f"wave {name!r} has the same region {upstream!r} on "
                                       "both sides.")
        if guess is not None:
            guess = _frozen(nx.to_si(guess, "guess", "angle")[0])
        self._waves[name] = _Wave(name, upstream, downstream, _FAMILY_SIGN[family],
                                  spec, value, branch == "strong", guess,
                                  _point(start, "start"))
        return self

    def add_wall(self, region, direction, *, through=None):
        """Require region ``region`` to flow along a wall of direction ``direction`` [rad].

        ``through=(x, y)`` [m], a point of the (straight) wall, places it in
        the plane: the wave that made ``region``'s upstream region then
        meets the wall at a point the solution reports, and the wave leaving
        into ``region`` starts there unless it was given a ``start``.
        """
        value, unit = nx.to_si(direction, "direction", "angle")
        self._angle_units.append(unit)
        self._conditions.append(_Condition("wall", (region_name(region, "region"),),
                                           _frozen(value),
                                           _point(through, "through")))
        return self

    def add_free_boundary(self, region, pressure, *, through=None):
        """Require region ``region`` to be at ``pressure`` (a free boundary of fixed pressure).

        ``pressure`` is absolute [Pa] when the inflow was a ``FlowState``,
        a ratio to the inflow pressure otherwise. ``through=(x, y)`` [m] is a
        point of the boundary upstream of where a wave meets it (that
        stretch runs along the flow of the meeting wave's upstream region);
        as for :meth:`add_wall`, it places the meeting point and the start
        of the wave leaving into ``region``.
        """
        value = nx.to_si(pressure, "pressure", self._pressure_kind)[0] / self._pressure_scale
        self._conditions.append(_Condition("free boundary", (region_name(region, "region"),),
                                           _frozen(value),
                                           _point(through, "through")))
        return self

    def add_slip_line(self, region_a, region_b):
        """Join two regions by a slip line: equal pressure and equal direction."""
        self._conditions.append(_Condition("slip line", (region_name(region_a, "region_a"),
                                                         region_name(region_b, "region_b")),
                                           None))
        return self

    # -- well-posedness
    def _order(self):
        """Waves in an order where each upstream region is known before use."""
        known = {self.inflow_name}
        reached_by = {}
        for w in self._waves.values():
            if w.downstream == self.inflow_name:
                raise IllPosedProblemError(
                    f"wave {w.name!r} ends in the inflow region {self.inflow_name!r}; the "
                    "inflow state is given and cannot be downstream of a wave.")
            if w.downstream in reached_by:
                raise IllPosedProblemError(
                    f"region {w.downstream!r} is downstream of two waves, "
                    f"{reached_by[w.downstream]!r} and {w.name!r}; each region is reached "
                    "through exactly one wave: give the second wave its own downstream region "
                    "and join the two regions with add_slip_line.")
            reached_by[w.downstream] = w.name
        order, pending = [], list(self._waves.values())
        while pending:
            ready = [w for w in pending if w.upstream in known]
            if not ready:
                names = ", ".join(f"{w.name!r} (from {w.upstream!r})" for w in pending)
                raise IllPosedProblemError(
                    f"waves {names} cannot be reached from the inflow region "
                    f"{self.inflow_name!r}: their upstream regions are not downstream of any "
                    "wave. Add the missing waves or correct the region names.")
            for w in ready:
                order.append(w)
                known.add(w.downstream)
                pending.remove(w)
        return order, known

    def check(self):
        """Check the pattern is well posed; raise :class:`IllPosedProblemError` if not.

        Returns
        -------
        (order, dependencies)
            Internal solve plan (waves in order; the unknowns each region depends on).
        """
        order, known = self._order()
        for c in self._conditions:
            for r in c.regions:
                if r not in known:
                    raise IllPosedProblemError(
                        f"the {c.label()} names region {r!r}, which no wave reaches; the "
                        f"regions are {sorted(known)}.")
        unknowns = [w.name for w in order if w.spec == "unknown"]
        n_eq = sum(2 if c.kind == "slip line" else 1 for c in self._conditions)
        if len(unknowns) != n_eq:
            listed = ", ".join(repr(u) for u in unknowns) or "none"
            conds = "; ".join(c.label() + (" (2 conditions)" if c.kind == "slip line" else "")
                              for c in self._conditions) or "none"
            diff = len(unknowns) - n_eq
            advice = (f"add {diff} condition(s) (wall, free boundary or slip line) or give "
                      f"{diff} of these waves a turn, direction or pressure" if diff > 0 else
                      f"remove {-diff} condition(s) or leave {-diff} more wave turn(s) unknown")
            raise IllPosedProblemError(
                f"the pattern has {len(unknowns)} unknown wave turn(s) ({listed}) but {n_eq} "
                f"condition(s) ({conds}): {advice}.")
        deps = {self.inflow_name: frozenset()}
        for w in order:
            own = {w.name} if w.spec == "unknown" else set()
            deps[w.downstream] = deps[w.upstream] | own
        self._check_structure(unknowns, deps)
        return order, deps

    def _check_structure(self, unknowns, deps):
        """Every condition must be matched to its own unknown (bipartite matching)."""
        rows = []
        for c in self._conditions:
            touched = set().union(*(deps[r] for r in c.regions))
            if c.kind == "slip line":
                touched = deps[c.regions[0]] ^ deps[c.regions[1]]
                rows += [(c.label() + " (pressure)", touched), (c.label() + " (direction)",
                                                                 touched)]
            else:
                rows.append((c.label(), touched))
        match = {}

        def augment(i, seen):
            for u in rows[i][1]:
                if u not in seen:
                    seen.add(u)
                    if u not in match or augment(match[u], seen):
                        match[u] = i
                        return True
            return False

        for i, (label, touched) in enumerate(rows):
            if not augment(i, set()):
                raise IllPosedProblemError(
                    f"the {label} cannot be met by a wave of its own: the unknown waves it "
                    f"depends on ({', '.join(sorted(map(repr, touched))) or 'none'}) are all "
                    "needed by other conditions. Leave a wave upstream of it unknown, or drop "
                    "the condition.")

    # -- evaluation
    def _cases(self):
        arrays = {"M": self._M_in, "d": self._d_in, "g": self._gamma}
        for w in self._waves.values():
            if w.value is not None:
                arrays["w:" + w.name] = w.value
            if w.guess is not None:
                arrays["guess:" + w.name] = w.guess
        for i, c in enumerate(self._conditions):
            if c.value is not None:
                arrays[f"c:{i}"] = c.value
        names = list(arrays)
        shaped = nx.broadcast(**{k.replace(":", "_").replace(" ", "_"): arrays[k]
                                 for k in names})
        shape = shaped[0].shape
        return {k: a.reshape(-1) for k, a in zip(names, shaped)}, shape

    @staticmethod
    def _wave_state(wave, M_up, lnp_up, d_up, x_turn, case):
        g = case["g"]
        if wave.spec == "turn":
            turn = case["w:" + wave.name]
        elif wave.spec == "direction":
            turn = case["w:" + wave.name] - d_up
        elif wave.spec == "pressure":
            ratio = np.exp(np.log(case["w:" + wave.name]) - lnp_up)
            signed = turn_for_pressure_ratio(M_up, ratio, g)
            _, beta_star = detachment_angles(M_up, g)
            strong = ratio > oblique_shock_ratios(M_up, beta_star, g).p2_p1
            weak_state = turn_state(M_up, signed, g, strong=False)
            strong_state = turn_state(M_up, signed, g, strong=True)
            state = type(weak_state)(*(np.where(strong, b, a)
                                       for a, b in zip(weak_state, strong_state)))
            return wave.sign * signed, state
        else:
            turn = x_turn
        return turn, turn_state(M_up, wave.sign * turn, g, strong=wave.strong)

    def _evaluate(self, plan, x, case, base=None, changed=None):
        """Propagate states through the waves; returns (regions, waves) dicts of arrays."""
        order, deps, unknown_index = plan
        regions = {self.inflow_name: (case["M"], np.zeros_like(case["M"]), case["d"],
                                      np.zeros_like(case["M"]), np.zeros_like(case["M"]))}
        waves = {}
        for w in order:
            if base is not None and not (deps[w.downstream] & changed):
                regions[w.downstream] = base[0][w.downstream]
                waves[w.name] = base[1][w.name]
                continue
            M, lnp, d, lnT, lnp0 = regions[w.upstream]
            x_turn = x[unknown_index[w.name]] if w.name in unknown_index else None
            turn, s = self._wave_state(w, M, lnp, d, x_turn, case)
            with np.errstate(divide="ignore", invalid="ignore"):
                regions[w.downstream] = (s.M2, lnp + np.log(s.p2_p1), d + turn,
                                         lnT + np.log(s.T2_T1), lnp0 + np.log(s.p02_p01))
            waves[w.name] = (turn, s)
        return regions, waves

    def _residuals(self, regions, case):
        out = []
        for i, c in enumerate(self._conditions):
            if c.kind == "wall":
                out.append(regions[c.regions[0]][2] - case[f"c:{i}"])
            elif c.kind == "free boundary":
                out.append(regions[c.regions[0]][1] - np.log(case[f"c:{i}"]))
            else:
                a, b = regions[c.regions[0]], regions[c.regions[1]]
                out += [a[1] - b[1], a[2] - b[2]]
        if not out:
            return np.zeros((0, case["M"].size))
        return np.array(out).reshape(len(out), -1)

    # -- solving
    def solve(self, *, errors="raise", max_iterations=40):
        """Find every unknown turn so that all conditions hold, for all cases.

        Parameters
        ----------
        errors : {"raise", "nan"}
            On a case without solution, raise :class:`~gasdyn2d.errors.NoSolutionError`
            naming the case and the reason, or return NaN for it (reason in
            ``solution.failure``).
        max_iterations : int
            Newton iterations before a case is declared not converged.

        Returns
        -------
        PatternSolution
        """
        nan_mode = errors_mode(errors)
        order, deps = self.check()
        unknown_names = [w.name for w in order if w.spec == "unknown"]
        plan = (order, deps, {n: i for i, n in enumerate(unknown_names)})
        case, shape = self._cases()
        n = case["M"].size
        reasons = self._validate(case, shape, Check(nan_mode))
        # NaN in gives NaN out: a case with any NaN input is not solved and is no failure
        live = np.ones(n, dtype=bool)
        for key, value in case.items():
            live &= ~np.isnan(value)
        case["live"] = live
        k = len(unknown_names)
        x = np.zeros((k, n))
        for i, name in enumerate(unknown_names):
            if "guess:" + name in case:
                x[i] = case["guess:" + name]
        x[:, ~live] = np.nan
        x, converged, iterations, (regions, waves), step = self._newton(plan, x, case,
                                                                        max_iterations)
        residual = self._residuals(regions, case)
        finite = np.all(np.isfinite(residual), axis=0) & np.isfinite(_regions_lnp(regions))
        ok = converged & finite & np.all(np.isfinite(x), axis=0) & live
        failure, detached_given = self._diagnose(plan, x, step, case, ok, regions, waves)
        failure = np.where(reasons != "", reasons, failure)
        ok &= failure == ""
        failed = ~ok & live
        if not nan_mode and failed.any():
            first = int(np.flatnonzero(failed)[0])
            count = int(np.count_nonzero(failed))
            index = tuple(int(i) for i in np.unravel_index(first, shape))
            where = f" at index {index} ({count} of {n} cases fail)" if shape else ""
            error = DetachedShockError if detached_given[first] else NoSolutionError
            raise error(
                f"no solution{where}: {failure[first]} Pass errors='nan' to get NaN for "
                "these cases, with the reason in solution.failure.")
        return self._package(regions, waves, ok, failure, iterations, shape, case["g"])

    def _validate(self, case, shape, check):
        """Check the case inputs in place (raise, or NaN them); the per-case reasons."""
        reasons = np.full(case["M"].size, "", dtype=object)

        def checked(key, name, test, requirement, **kwargs):
            value = case[key].reshape(shape)
            with np.errstate(invalid="ignore"):
                bad = test(value) & ~np.isnan(value)
            out = check.reject(bad, value, name, requirement, **kwargs)
            flat_bad = bad.reshape(-1)
            for i in np.flatnonzero(flat_bad & (reasons == "")):
                reasons[i] = (f"{name} = {_show(case[key][i], kwargs.get('unit_text', ''))} is "
                              f"not {requirement}.")
            case[key] = np.asarray(out, dtype=float).reshape(-1)

        checked("M", "inflow Mach number", lambda v: ~(v >= 1.0) | np.isinf(v),
                "finite and >= 1 (supersonic flow)")
        checked("g", "gamma", lambda v: ~(v > 1.0) | np.isinf(v),
                "a finite ratio of specific heats > 1")
        checked("d", "direction", np.isinf, "finite", unit_text="rad")
        for w in self._waves.values():
            if w.spec == "pressure":
                checked("w:" + w.name, f"pressure (of wave {w.name!r})",
                        lambda v: ~(v > 0.0) | np.isinf(v), "finite and > 0")
            elif w.spec != "unknown":
                checked("w:" + w.name, f"{w.spec} (of wave {w.name!r})", np.isinf, "finite",
                        unit_text="rad")
        for i, c in enumerate(self._conditions):
            if c.kind == "wall":
                checked(f"c:{i}", f"direction (of the {c.label()})", np.isinf, "finite",
                        unit_text="rad")
            elif c.kind == "free boundary":
                checked(f"c:{i}", f"pressure (of the {c.label()})",
                        lambda v: ~(v > 0.0) | np.isinf(v), "finite and > 0")
        return reasons.astype(str)

    def _newton(self, plan, x, case, max_iterations):
        """Batched damped Newton iteration; returns (x, converged, iterations, evaluation).

        The evaluation of the last accepted iterate is carried from one
        iteration to the next (and its waves that depend on no unknown are
        never recomputed); cases leave the active set as they converge.
        """
        n, k = x.shape[1], x.shape[0]
        ev = self._evaluate(plan, x, case)
        if k == 0:
            return x, np.ones(n, dtype=bool), 0, ev, np.zeros_like(x)
        r = self._residuals(ev[0], case)
        ev, r = self._pull_back_start(plan, x, r, case, ev)
        full_ev = ev
        converged = np.zeros(n, dtype=bool)
        last_step = np.full_like(x, np.nan)
        idx = np.flatnonzero(case["live"] & np.all(np.isfinite(x), axis=0))
        ev = _take(ev, idx)
        iterations = 0
        for iterations in range(1, max_iterations + 1):
            if idx.size == 0:
                break
            sub = {key: v[idx] for key, v in case.items()}
            xs, rs = x[:, idx], r[:, idx]
            J = self._jacobian(plan, xs, rs, sub, ev)
            dx = _solve_small(J, -rs)
            last_step[:, idx] = dx
            xs_new, rs_new, ev_new, halved = self._line_search(plan, xs, rs, dx, sub, ev)
            small = np.max(np.abs(xs_new - xs), axis=0) <= 1e-14 * np.maximum(
                1.0, np.max(np.abs(xs), axis=0))
            tiny = np.max(np.abs(rs_new), axis=0) <= 1e-15
            x[:, idx], r[:, idx] = xs_new, rs_new
            done = (small | tiny) & np.all(np.isfinite(rs_new), axis=0)
            converged[idx[done]] = True
            keep = ~(done | ~np.all(np.isfinite(dx), axis=0))
            idx = idx[keep]
            if halved:
                ev = self._evaluate(plan, x[:, idx], {key: v[idx] for key, v in case.items()},
                                    _take(full_ev, idx), frozenset(plan[2]))
            else:
                ev = _take(ev_new, np.flatnonzero(keep))
        close = np.all(np.abs(r) <= 1e-11, axis=0)
        final = self._evaluate(plan, x, case, full_ev, frozenset(plan[2]))
        return x, converged | close, iterations, final, last_step

    def _pull_back_start(self, plan, x, r, case, ev):
        """Halve the starting turns (in place) of cases whose start is detached or vacuous.

        A zero turn is a Mach wave, always defined in supersonic flow, so the
        halving ends at a start the iteration can work from.
        """
        for _ in range(_MAX_HALVINGS):
            bad = np.flatnonzero(~np.all(np.isfinite(r), axis=0) & case["live"])
            if bad.size == 0:
                break
            x[:, bad] *= 0.5
            ev = self._evaluate(plan, x, case, ev, frozenset(plan[2]))
            r = self._residuals(ev[0], case)
        return ev, r

    def _jacobian(self, plan, x, r, case, base):
        """Forward differences per unknown (backward where the forward step detaches)."""
        k, n = x.shape
        J = np.empty((n, k, k))
        for name, j in plan[2].items():
            step = np.zeros_like(x)
            step[j] = _FD_STEP
            changed = frozenset([name])
            forward = self._residuals(self._evaluate(plan, x + step, case, base, changed)[0],
                                      case)
            column = (forward - r) / _FD_STEP
            bad = np.flatnonzero(~np.all(np.isfinite(column), axis=0))
            if bad.size:
                sub = {key: v[bad] for key, v in case.items()}
                xb = x[:, bad] - step[:, bad]
                backward = self._residuals(
                    self._evaluate(plan, xb, sub, _take(base, bad), changed)[0], sub)
                column[:, bad] = (r[:, bad] - backward) / _FD_STEP
            J[:, :, j] = column.T
        return J

    def _line_search(self, plan, x, r, dx, case, base):
        """Full Newton step, halved per case while it detaches or does not reduce the residual."""
        unknown = frozenset(plan[2])
        norm0 = np.max(np.abs(r), axis=0)
        lam = np.ones(x.shape[1])
        x_new = np.where(np.isfinite(dx), x + dx, x)
        ev = self._evaluate(plan, x_new, case, base, unknown)
        r_new = self._residuals(ev[0], case)
        halved = False
        for _ in range(_MAX_HALVINGS):
            norm = np.max(np.abs(r_new), axis=0)
            bad = ~(norm <= np.maximum(norm0 * (1.0 - 1e-4 * lam), 1e-13)) & np.all(
                np.isfinite(dx), axis=0)
            if not np.any(bad):
                break
            halved = True
            idx = np.flatnonzero(bad)
            lam[idx] *= 0.5
            sub = {key: v[idx] for key, v in case.items()}
            xt = x[:, idx] + lam[idx] * dx[:, idx]
            x_new[:, idx] = xt
            r_new[:, idx] = self._residuals(
                self._evaluate(plan, xt, sub, _take(base, idx), unknown)[0], sub)
        return x_new, r_new, ev, halved

    def _diagnose(self, plan, x, step, case, ok, regions, waves):
        """Per-case reason of failure ('' where solved).

        Checked in order: a wave whose upstream region is subsonic, a given
        pressure out of reach, a detached shock or a fan to vacuum at the
        last iterate; for cases where the iteration stalled, the same checks
        at the full last Newton step (where the conditions were heading).
        """
        failure = np.full(x.shape[1], "", dtype=object)
        detached_given = np.zeros(x.shape[1], dtype=bool)
        bad = ~ok & case["live"]
        if not np.any(bad):
            return failure.astype(str), detached_given
        self._given_detached(plan, regions, waves, case, bad, failure, detached_given)
        self._wave_reasons(plan, regions, waves, bad, failure, "")
        rest = bad & (failure == "")
        if np.any(rest):
            idx = np.flatnonzero(rest)
            sub = {key: v[idx] for key, v in case.items()}
            xt = x[:, idx] + np.nan_to_num(step[:, idx])
            r_t, w_t = self._evaluate(plan, xt, sub)
            part = np.full(idx.size, "", dtype=object)
            self._wave_reasons(plan, r_t, w_t, np.ones(idx.size, dtype=bool), part,
                               " to meet the conditions")
            failure[idx] = part
        rest = bad & (failure == "")
        failure[rest] = ("the conditions cannot be met by attached waves: the Newton "
                         "iteration did not converge (for example, the pressure-deflection "
                         "polars do not intersect).")
        return failure.astype(str), detached_given

    def _given_detached(self, plan, regions, waves, case, bad, failure, detached_given):
        """Waves given by turn or direction from a region that depends on no unknown, and
        detached there: the input itself is beyond θmax (a DetachedShockError)."""
        order, deps, _ = plan
        for w in order:
            if w.spec not in ("turn", "direction") or deps[w.upstream]:
                continue
            turn, s = waves[w.name]
            hit = bad & (failure == "") & s.detached
            if not hit.any():
                continue
            M_up = regions[w.upstream][0]
            theta_max = detachment_angles(M_up[hit], case["g"][hit])[0]
            for j, i in enumerate(np.flatnonzero(hit)):
                failure[i] = (f"wave {w.name!r} detached: its turn {_show(abs(turn[i]), 'rad')} "
                              f"exceeds the detachment deflection θmax = "
                              f"{_show(theta_max[j], 'rad')} of its upstream region "
                              f"{w.upstream!r} (M = {_show(M_up[i])}), so no attached "
                              "straight shock exists there.")
                detached_given[i] = True

    def _wave_reasons(self, plan, regions, waves, bad, failure, context):
        for w in plan[0]:
            turn, s = waves[w.name]
            open_ = bad & (failure == "")
            with np.errstate(invalid="ignore"):
                subsonic = open_ & (regions[w.upstream][0] < 1.0)
            failure[subsonic] = (f"region {w.upstream!r}, upstream of wave {w.name!r}, is "
                                 f"subsonic{context}, so no oblique shock or fan can stand "
                                 "there.")
            if w.spec == "pressure":
                lost = open_ & np.isnan(turn) & ~subsonic
                failure[lost] = (f"the pressure given for wave {w.name!r} cannot be reached: it "
                                 "is above the normal-shock pressure of its upstream stream.")
            open_ = bad & (failure == "")
            failure[open_ & s.detached] = (
                f"wave {w.name!r} detached: the compression it needs{context} exceeds the "
                "maximum deflection of its upstream Mach number, so no attached straight "
                "shock exists there.")
            failure[open_ & s.vacuum & ~s.detached] = (
                f"wave {w.name!r} would expand its stream beyond the maximum Prandtl–Meyer "
                f"angle (to vacuum){context}.")

    def _package(self, regions, waves, ok, failure, iterations, shape, gamma):
        out = lambda v: _result_value(np.where(ok, v, np.nan).reshape(shape))  # noqa: E731
        unit = next((u for u in self._angle_units if u is not None), None)
        unit = nx.output_angle_unit(unit)
        angle = lambda v: _result_value(nx.angle_out(out(v), unit))  # noqa: E731
        region_results = {}
        for name, (M, lnp, d, lnT, lnp0) in regions.items():
            region_results[name] = RegionSolution(out(M), out(np.exp(lnp)), out(np.exp(lnT)),
                                                  out(np.exp(lnp0)), angle(d))
        wave_results = {}
        order = self._order()[0]
        for w in order:
            turn, s = waves[w.name]
            M_up, _, d_up = regions[w.upstream][:3]
            M_dn, _, d_dn = regions[w.downstream][:3]
            mu_up, mu_dn = mach_angle_of(M_up), mach_angle_of(M_dn)
            shock = s.is_shock & ok
            kind = np.where(ok, np.where(shock, "shock", "fan"), "none").reshape(shape)
            head = d_up + w.sign * np.where(shock, s.wave_angle, mu_up)
            tail = np.where(shock, head, d_dn + w.sign * mu_dn)
            wave_results[w.name] = WaveSolution(
                str(kind) if not shape else _result_value(kind),
                "left" if w.sign > 0 else "right",
                angle(turn + 0 * M_up), out(s.p2_p1), angle(s.wave_angle), angle(mu_up),
                angle(mu_dn), angle(head), angle(tail))
        gamma = np.broadcast_to(gamma, ok.shape).reshape(shape)
        return PatternSolution(
            inflow_name=self.inflow_name, inflow_state=self._inflow_state, links=order,
            conditions=tuple(self._conditions), regions=region_results, waves=wave_results,
            ok=ok, failure=failure, iterations=iterations, shape=shape,
            gamma=float(gamma) if not shape else gamma)


def _result_value(value):
    """A result field: a float for one case, else a read-only array (also inside a Quantity)."""
    magnitude = getattr(value, "magnitude", value)
    if np.ndim(magnitude) == 0:
        return value if nx.is_quantity(value) else (
            str(value) if np.asarray(value).dtype.kind == "U" else float(value))
    if isinstance(magnitude, np.ndarray):
        magnitude.flags.writeable = False
    return value


def _frozen(value):
    """A read-only float copy: the pattern keeps what it was given, whatever the caller
    does with their own array afterwards."""
    value = np.array(value, dtype=float, copy=True)
    value.flags.writeable = False
    return value


def _show(value, unit_text=""):
    return format_value(value, unit_text)


def _point(point, name):
    """An (x, y) point [m] (floats, arrays or length Quantities), or None."""
    if point is None:
        return None
    try:
        x, y = point
    except (TypeError, ValueError):
        raise nx.InvalidInputError(f"{name} must be a point (x, y) [m]; got {point!r}.") from None
    return (_frozen(nx.to_si(x, f"{name}[0]", "length")[0]),
            _frozen(nx.to_si(y, f"{name}[1]", "length")[0]))


def _regions_lnp(regions):
    """Sum of log pressures over regions (finite only if every region is)."""
    return np.sum([r[1] for r in regions.values()], axis=0)


def _take(evaluation, idx):
    """The evaluation (regions, waves) restricted to the cases ``idx``."""
    regions, waves = evaluation
    return ({name: tuple(a[idx] for a in r) for name, r in regions.items()},
            {name: (turn[idx], type(s)(*(a[idx] for a in s))) for name, (turn, s)
             in waves.items()})


def _solve_small(J, b):
    """Solve J x = b for a stack of small systems (n, k, k) @ (k, n), NaN where singular."""
    n, k, _ = J.shape
    with np.errstate(all="ignore"):
        if k == 1:
            return b / J[:, 0, 0][None, :]
        if k == 2:
            det = J[:, 0, 0] * J[:, 1, 1] - J[:, 0, 1] * J[:, 1, 0]
            x0 = (b[0] * J[:, 1, 1] - b[1] * J[:, 0, 1]) / det
            x1 = (J[:, 0, 0] * b[1] - J[:, 1, 0] * b[0]) / det
            return np.array([x0, x1])
        good = np.all(np.isfinite(J), axis=(1, 2))
        good[good] = np.abs(np.linalg.det(J[good])) > 0
        out = np.full((k, n), np.nan)
        if np.any(good):
            out[:, good] = np.linalg.solve(J[good], b.T[good][..., None])[..., 0].T
        return out
