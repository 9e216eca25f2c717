"""Coupled planar wave patterns as a graph of uniform regions: stating the pattern.

A steady planar wave pattern is a graph: uniform flow regions are its nodes,
simple waves (oblique shocks, centred Prandtl–Meyer fans and isentropic
compressions) are its edges, and conditions tie regions to walls (fixed
direction), to free boundaries (fixed pressure) and to each other across slip
lines (equal pressure and direction). :class:`WavePattern` states such a pattern
and checks that it is well posed; :meth:`WavePattern.solve` hands it to the
solver (:mod:`gasdyn2d.patterns.solver`), which finds every unknown wave turn for
one case or many at once, and returns a :class:`~gasdyn2d.patterns.solution.PatternSolution`.

Conventions
-----------
- Flow direction is counterclockwise from the x axis [rad].
- A ``"left"``-running wave leans to the left of the flow seen from upstream
  (from a lower wall, a compression turns the flow counterclockwise); a
  ``"right"``-running wave leans to the right (from an upper wall, a
  compression turns the flow clockwise).
- A wave's ``turn`` is the signed change of flow direction across it
  (counterclockwise positive). Its sign and the family decide the wave type:
  left-running with turn > 0, or right-running with turn < 0, is a compression
  (an oblique shock, or an isentropic compression if the wave was added with
  ``compression="isentropic"``); the other signs give an expansion fan.

The solution is exact for the relations of each wave: fans are centred
simple waves and shocks are straight, so states reached after two fans cross
or after a fan reflects from a wall are exact (Riemann invariants are carried
unchanged across the other family), while states after a shock meets a fan
are the usual wave-by-wave approximation of the curved interaction. An
isentropic compression is exact while its characteristics, which converge, do
not meet within the pattern.
"""

from __future__ import annotations

import copy
import dataclasses
import html
import math
from typing import NamedTuple

import numpy as np

from ..boundary import Call, choice, errors_mode
from ..boundary.checks import Check, format_value
from ..boundary.units import is_quantity
from ..boundary.types import ArrayInput
from ..errors import DetachedShockError, IllPosedProblemError, InvalidInputError, NoSolutionError
from ..relations.flow_state import FlowState
from .solution import PatternSolution, region_name
from .solver import solve_cases

__all__ = ["WavePattern", "WaveLink", "ConditionLink", "SolvePlan", "plan_pattern"]

_FAMILIES = {"left": "left", "right": "right"}
_BRANCHES = {"weak": "weak", "strong": "strong"}
_COMPRESSIONS = {"shock": "shock", "isentropic": "isentropic"}


# --------------------------------------------------------------------- the graph


@dataclasses.dataclass(frozen=True)
class WaveLink:
    """One wave of a pattern's graph, without values.

    ``given`` is what fixes the wave: ``"turn"``, ``"direction"``,
    ``"pressure"`` or ``"unknown"`` (its turn is an unknown of the pattern).
    """

    name: str
    upstream: str
    downstream: str
    family: str  #: "left" or "right"
    given: str = "unknown"
    branch: str = "weak"  #: "weak" or "strong" (where the wave is a shock)
    compression: str = "shock"  #: "shock" or "isentropic"

    @property
    def sign(self) -> float:
        """+1 for a left-running wave, -1 for a right-running one."""
        return 1.0 if self.family == "left" else -1.0

    @property
    def strong(self) -> bool:
        return self.branch == "strong"


@dataclasses.dataclass(frozen=True)
class ConditionLink:
    """One condition of a pattern's graph: ``"wall"``, ``"free boundary"`` or
    ``"slip line"``, on one region (two for a slip line)."""

    kind: str
    regions: tuple

    def label(self) -> str:
        if self.kind == "slip line":
            return f"slip line between {self.regions[0]!r} and {self.regions[1]!r}"
        return f"{self.kind} on {self.regions[0]!r}"


class SolvePlan(NamedTuple):
    """A checked pattern graph, in the form the solver takes.

    ``order`` lists the waves so that each upstream region is known before it is
    used; ``deps`` maps each region to the unknown waves it depends on;
    ``unknowns`` names the unknown waves and ``index`` gives their positions.
    """

    inflow: str
    order: tuple
    deps: dict
    unknowns: tuple
    index: dict  # type: ignore[assignment]  # a field named like tuple.index, on purpose
    conditions: tuple
    gas: object = None  #: a thermally perfect Gas (regions then carry T), None for a perfect gas


def plan_pattern(inflow: str, waves, conditions) -> SolvePlan:
    """Check a pattern graph and order it for the solver.

    Raises :class:`~gasdyn2d.errors.IllPosedProblemError` saying what is missing
    or extra: a region reached by two waves or by none, a condition on a region
    no wave reaches, unknowns and conditions unequal in number, or a condition
    that no unknown of its own can meet (checked by bipartite matching).
    """
    order, known = _order(inflow, waves)
    for c in conditions:
        for r in c.regions:
            if r not in known:
                raise IllPosedProblemError(
                    f"the {c.label()} names region {r!r}, which no wave reaches; the "
                    f"regions are {sorted(known)}.")
    unknowns = tuple(w.name for w in order if w.given == "unknown")
    n_eq = sum(2 if c.kind == "slip line" else 1 for c in conditions)
    if len(unknowns) != n_eq:
        listed = ", ".join(repr(u) for u in unknowns) or "none"
        conds = "; ".join(c.label() + (" (2 conditions)" if c.kind == "slip line" else "")
                          for c in conditions) or "none"
        diff = len(unknowns) - n_eq
        advice = (f"add {diff} condition(s) (wall, free boundary or slip line) or give "
                  f"{diff} of these waves a turn, direction or pressure" if diff > 0 else
                  f"remove {-diff} condition(s) or leave {-diff} more wave turn(s) unknown")
        raise IllPosedProblemError(
            f"the pattern has {len(unknowns)} unknown wave turn(s) ({listed}) but {n_eq} "
            f"condition(s) ({conds}): {advice}.")
    deps: dict = {inflow: frozenset()}
    for w in order:
        own = {w.name} if w.given == "unknown" else set()
        deps[w.downstream] = deps[w.upstream] | own
    _check_matching(conditions, deps)
    return SolvePlan(inflow, tuple(order), deps, unknowns,
                     {name: i for i, name in enumerate(unknowns)}, tuple(conditions))


def _order(inflow, waves):
    """Waves in an order where each upstream region is known before use."""
    known = {inflow}
    reached_by = {}
    for w in waves:
        if w.downstream == inflow:
            raise IllPosedProblemError(
                f"wave {w.name!r} ends in the inflow region {inflow!r}; the inflow state is "
                "given and cannot be downstream of a wave.")
        if w.downstream in reached_by:
            raise IllPosedProblemError(
                f"region {w.downstream!r} is downstream of two waves, "
                f"{reached_by[w.downstream]!r} and {w.name!r}; each region is reached "
                "through exactly one wave: give the second wave its own downstream region "
                "and join the two regions with add_slip_line.")
        reached_by[w.downstream] = w.name
    order, pending = [], list(waves)
    while pending:
        ready = [w for w in pending if w.upstream in known]
        if not ready:
            names = ", ".join(f"{w.name!r} (from {w.upstream!r})" for w in pending)
            raise IllPosedProblemError(
                f"waves {names} cannot be reached from the inflow region {inflow!r}: their "
                "upstream regions are not downstream of any wave. Add the missing waves or "
                "correct the region names.")
        for w in ready:
            order.append(w)
            known.add(w.downstream)
            pending.remove(w)
    return order, known


def _check_matching(conditions, deps):
    """Every condition must be matched to its own unknown (bipartite matching)."""
    rows = []
    for c in conditions:
        touched = set().union(*(deps[r] for r in c.regions))
        if c.kind == "slip line":
            touched = deps[c.regions[0]] ^ deps[c.regions[1]]
            rows += [(c.label() + " (pressure)", touched),
                     (c.label() + " (direction)", touched)]
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


# --------------------------------------------------------------------- the pattern


class _Input(NamedTuple):
    """A value given to the pattern: its case key, argument name, SI unit text, a copy."""

    key: str
    name: str
    value: object
    unit_text: str
    keep_scalar: bool


class WavePattern:
    """A planar wave pattern to be solved: regions, waves and conditions.

    Parameters
    ----------
    inflow : FlowState or float or array_like
        The given upstream region: a :class:`~gasdyn2d.FlowState` (then
        pressures in conditions are absolute [Pa], the gas and the inflow
        direction are the state's, and :meth:`PatternSolution.state` gives full
        states), or a Mach number (array, Series or DataArray for a batch;
        pressures in conditions are then ratios to the inflow pressure). A
        FlowState of a thermally perfect gas makes every wave that gas's at its
        upstream region's temperature (the inflow's T times the ratios).
    direction : float or Quantity, optional
        Inflow direction [rad] when ``inflow`` is a Mach number (default 0).
    gamma : float or array_like, optional
        Ratio of specific heats when ``inflow`` is a Mach number (default 1.4;
        may be an array). Both are refused with a FlowState inflow, which
        carries its own.
    name : str, optional
        Name of the inflow region (default ``"1"``). Names are text; an integer
        is taken as its text everywhere (``region(2)`` is ``region("2")``).

    Notes
    -----
    Every value (the inflow, turns, directions, pressures, guesses, points)
    may be a number, an array, a pint Quantity of any registry, an xarray
    DataArray or a pandas Series; they broadcast together into the cases of the
    pattern (DataArrays by dimension name). The pattern keeps a copy of each
    value when it is added. The solution comes back in the same containers:
    angles in the unit of the first angle given as a Quantity, lengths in that
    of the first length, labels of the DataArrays or the Series kept. dask
    arrays are refused: a pattern holds every region of every case, so it
    cannot stay lazy; the ready functions
    (:func:`~gasdyn2d.patterns.reflections.wall_reflection`, ...) can.

    Each wave adds one region (its ``downstream``) reached from an existing
    one; each wave of unknown turn adds one unknown; a wall or a free
    boundary adds one condition and a slip line two (equal pressure, equal
    direction). :meth:`check` reports precisely what is missing or extra.

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

    def __init__(self, inflow, *, direction: ArrayInput = None, gamma: ArrayInput = None,
                 name="1"):
        self._inputs: list[_Input] = []
        self._waves: dict[str, WaveLink] = {}
        self._conditions: list[ConditionLink] = []
        self._inflow_name = region_name(name, "name")
        if isinstance(inflow, FlowState):
            if direction is not None or gamma is not None:
                given = " and ".join(k for k, v in (("direction", direction), ("gamma", gamma))
                                     if v is not None)
                raise InvalidInputError(
                    f"{given} cannot be given with a FlowState inflow, which carries its own "
                    "direction and gas; set them on the FlowState instead, e.g. "
                    "FlowState(M, p, T, direction=..., gas=Gas(gamma=...)).")
            self._inflow_state = inflow
            self._take("M", "inflow.M", inflow.M)
            self._take("d", "inflow.direction", inflow.direction, "rad")
            self._take("p_in", "inflow.p", inflow.p, "Pa")
            self._take("T_in", "inflow.T", inflow.T, "K")
            self._take("g", "gamma", float(inflow.gas.gamma), keep_scalar=True)
        else:
            self._inflow_state = None  # type: ignore[assignment]  # a Mach-number inflow
            self._take("M", "inflow", inflow)
            self._take("d", "direction", 0.0 if direction is None else direction, "rad")
            self._take("g", "gamma", 1.4 if gamma is None else gamma, keep_scalar=True)

    def _take(self, key, name, value, unit_text="", keep_scalar=False):
        """Check one value now (type and unit: a clear error at the line that gave it) and
        keep a copy of it, so that later changes to the caller's array do not reach the
        pattern."""
        call = Call()
        call.take(name, value, unit_text, keep_scalar=keep_scalar)
        if call.lazy:
            raise InvalidInputError(
                f"{name} is a dask array: a WavePattern holds every region of every case "
                "and cannot stay lazy; compute it first, or use the ready functions "
                "(wall_reflection, shock_crossing, ...), which map over dask blocks.")
        if type(value) not in (float, int):
            value = copy.deepcopy(value)
        self._inputs.append(_Input(key, name, value, unit_text, keep_scalar))

    # -- what the pattern holds
    @property
    def inflow_name(self) -> str:
        """Name of the inflow region."""
        return self._inflow_name

    @property
    def inflow_state(self):
        """The inflow :class:`~gasdyn2d.FlowState`, or None if the inflow was a Mach number."""
        return self._inflow_state

    @property
    def _hot_gas(self):
        """The inflow's gas when it is thermally perfect, else None."""
        state = self._inflow_state
        return state.gas if state is not None and state.gas.is_thermally_perfect else None

    @property
    def waves(self) -> tuple:
        """The waves, as :class:`WaveLink` records, in the order added."""
        return tuple(self._waves.values())

    @property
    def conditions(self) -> tuple:
        """The conditions, as :class:`ConditionLink` records, in the order added."""
        return tuple(self._conditions)

    # -- building the pattern
    def add_wave(self, name, *, upstream, downstream, family: str, turn: ArrayInput = None,
                 direction: ArrayInput = None, pressure: ArrayInput = None,
                 branch: str = "weak", compression: str = "shock", guess: ArrayInput = None,
                 start=None) -> "WavePattern":
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
            Branch of the shock when the wave is a shock compression.
        compression : {"shock", "isentropic"}
            What the wave is where it compresses: an oblique shock (default), or
            an isentropic (Prandtl–Meyer) compression, ν2 = ν1 - |turn|, exact
            while its converging characteristics do not meet within the pattern
            (they coalesce into a shock further out). Expansions are fans either
            way.
        guess : float or array_like, optional
            Starting turn [rad] for an unknown wave (default 0).
        start : (x, y), optional
            Point [m] where the wave starts (floats, batch arrays or length
            Quantities). Without it the solution may place the wave itself:
            at the point where the wave that made ``upstream`` meets a wall
            or free boundary placed with ``through=``, or at the crossing of
            two placed waves ahead of a slip line (see
            :class:`~gasdyn2d.patterns.solution.PatternSolution`, Notes).

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
        family = choice("family", family, _FAMILIES)
        branch = choice("branch", branch, _BRANCHES)
        compression = choice("compression", compression, _COMPRESSIONS)
        given = {k: v for k, v in (("turn", turn), ("direction", direction),
                                   ("pressure", pressure)) if v is not None}
        if len(given) > 1:
            raise IllPosedProblemError(
                f"wave {name!r}: give at most one of turn, direction and pressure; got "
                f"{', '.join(given)}.")
        if downstream == upstream:
            raise IllPosedProblemError(f"wave {name!r} has the same region {upstream!r} on "
                                       "both sides.")
        spec, value = next(iter(given.items())) if given else ("unknown", None)
        if spec == "pressure":
            self._take("w:" + name, f"pressure (of wave {name!r})", value, self._pressure_unit)
        elif spec != "unknown":
            self._take("w:" + name, f"{spec} (of wave {name!r})", value, "rad")
        if guess is not None:
            self._take("guess:" + name, f"guess (of wave {name!r})", guess, "rad")
        self._take_point("start:" + name, "start", start)
        self._waves[name] = WaveLink(name, upstream, downstream, family, spec, branch,
                                     compression)
        return self

    @property
    def _pressure_unit(self):
        return "Pa" if self._inflow_state is not None else ""

    def _take_point(self, key, name, point):
        if point is None:
            return
        try:
            x, y = point
        except (TypeError, ValueError):
            raise InvalidInputError(f"{name} must be a point (x, y) [m]; got {point!r}.") from None
        self._take(key + ":x", f"{name}[0]", x, "m")
        self._take(key + ":y", f"{name}[1]", y, "m")

    def add_wall(self, region, direction: ArrayInput, *, through=None) -> "WavePattern":
        """Require region ``region`` to flow along a wall of direction ``direction`` [rad].

        ``through=(x, y)`` [m], a point of the (straight) wall, places it in
        the plane: the wave that made ``region``'s upstream region then
        meets the wall at a point the solution reports, and the wave leaving
        into ``region`` starts there unless it was given a ``start``.
        """
        condition = ConditionLink("wall", (region_name(region, "region"),))
        i = len(self._conditions)
        self._take(f"c:{i}", f"direction (of the {condition.label()})", direction, "rad")
        self._take_point(f"through:{i}", "through", through)
        self._conditions.append(condition)
        return self

    def add_free_boundary(self, region, pressure: ArrayInput, *, through=None) -> "WavePattern":
        """Require region ``region`` to be at ``pressure`` (a free boundary of fixed pressure).

        ``pressure`` is absolute [Pa] when the inflow was a ``FlowState``,
        a ratio to the inflow pressure otherwise. ``through=(x, y)`` [m] is a
        point of the boundary upstream of where a wave meets it (that
        stretch runs along the flow of the meeting wave's upstream region);
        as for :meth:`add_wall`, it places the meeting point and the start
        of the wave leaving into ``region``.
        """
        condition = ConditionLink("free boundary", (region_name(region, "region"),))
        i = len(self._conditions)
        self._take(f"c:{i}", f"pressure (of the {condition.label()})", pressure,
                   self._pressure_unit)
        self._take_point(f"through:{i}", "through", through)
        self._conditions.append(condition)
        return self

    def add_slip_line(self, region_a, region_b) -> "WavePattern":
        """Join two regions by a slip line: equal pressure and equal direction."""
        self._conditions.append(ConditionLink("slip line", (region_name(region_a, "region_a"),
                                                            region_name(region_b, "region_b"))))
        return self

    # -- well-posedness
    def check(self) -> None:
        """Check the pattern is well posed; raise :class:`IllPosedProblemError` if not.

        Every region must be reached from the inflow through exactly one wave,
        the unknowns and the conditions must be equal in number, and each
        condition must be met by an unknown of its own.
        """
        self._plan()

    def _plan(self) -> SolvePlan:
        return plan_pattern(self._inflow_name, tuple(self._waves.values()),
                            tuple(self._conditions))

    # -- solving
    def solve(self, *, errors: str = "raise", max_iterations: int = 40) -> PatternSolution:
        """Find every unknown turn so that all conditions hold, for all cases.

        Parameters
        ----------
        errors : {"raise", "nan"}
            On an invalid input or a case without solution, raise (an
            :class:`~gasdyn2d.errors.InvalidInputError` naming the argument; a
            :class:`~gasdyn2d.errors.DetachedShockError` for a given turn beyond
            detachment; a :class:`~gasdyn2d.errors.NoSolutionError` naming the case
            and the reason), or return NaN for that case with the reason in
            ``solution.failure``. A case with a NaN input is NaN, and no failure.
        max_iterations : int
            Newton iterations before a case is declared not converged.

        Returns
        -------
        PatternSolution
            A snapshot: later changes to the pattern do not reach it.

        Notes
        -----
        The unknowns are the turns of the unknown waves; the residuals are the
        direction and log-pressure mismatches of the conditions. One pass
        through the waves gives the residuals and their exact Jacobian (each
        wave's partial derivatives in closed form); a damped Newton iteration
        runs on all cases at once, halving a case's step while it detaches a
        wave or fails to reduce the residual. A single case (plain floats) runs
        the same iteration on Python floats.

        With a thermally perfect inflow gas each region also carries its
        temperature, every wave is that gas's at its upstream (M, T), and the
        Jacobian comes from forward differences of the residuals (steps of 1e-8
        of the turns, one evaluation per unknown): Newton then converges to
        rounding in one or two more iterations than with the exact Jacobian.
        """
        check = Check(errors_mode(errors))
        plan = self._plan()
        hot = self._hot_gas
        if hot is not None:
            plan = plan._replace(gas=hot)
        call = Call(errors)
        for item in self._inputs:
            call.take(item.name, item.value, item.unit_text, keep_scalar=item.keep_scalar,
                      degrees_above=math.inf)  # warned when the value was added
        values = dict(zip((item.key for item in self._inputs), call.prepare()))
        shape = np.shape(values["M"])
        flat = (lambda v: v) if type(values["M"]) is float else (
            lambda v: v if type(v) is float else np.ascontiguousarray(v).reshape(-1))
        case = {key: flat(v) for key, v in values.items()
                if not key.startswith(("start:", "through:", "p_in", "T_in"))}
        if hot is not None:  # the region temperatures fix a thermally perfect gas's waves
            case["T_in"] = flat(values["T_in"])
        if self._inflow_state is not None:  # absolute pressures become ratios to the inflow
            p_in = flat(values["p_in"])
            for key in case:
                if key.startswith("c:") or key.startswith("w:"):
                    if self._is_pressure(key):
                        case[key] = case[key] / p_in
        raw = solve_cases(plan, case, shape, check, max_iterations=max_iterations)
        failed = np.asarray(raw.failure) != ""
        if not check.nan and failed.any():
            first = int(np.flatnonzero(failed.reshape(-1))[0])
            failure = np.asarray(raw.failure).reshape(-1)[first]
            where = ""
            if shape:
                count = int(np.count_nonzero(failed))
                index = tuple(int(i) for i in np.unravel_index(first, shape))
                where = f" at index {index} ({count} of {failed.size} cases fail)"
            error = (DetachedShockError if np.asarray(raw.detached_given).reshape(-1)[first]
                     else NoSolutionError)
            raise error(f"no solution{where}: {failure} Pass errors='nan' to get NaN for "
                        "these cases, with the reason in solution.failure.")
        points = {key: flat(v) for key, v in values.items()
                  if key.startswith(("start:", "through:"))}
        return PatternSolution.from_solver(
            raw, plan, call, shape, case=case, points=points, inflow_state=self._inflow_state,
            inflow_si={key: flat(values[key]) for key in ("p_in", "T_in") if key in values})

    def _is_pressure(self, key):
        if key.startswith("w:"):
            return self._waves[key[2:]].given == "pressure"
        return self._conditions[int(key[2:])].kind == "free boundary"

    # -- display
    def _value_text(self, key):
        item = next((i for i in self._inputs if i.key == key), None)
        return "" if item is None else _describe(item.value, item.unit_text)

    def _rows(self):
        waves = []
        for w in self._waves.values():
            if w.given == "unknown":
                given = "unknown"
                guess = self._value_text("guess:" + w.name)
                if guess:
                    given += f" (guess {guess})"
            else:
                given = f"{w.given} {self._value_text('w:' + w.name)}"
            kind = "isentropic" if w.compression == "isentropic" else (
                "strong shock" if w.strong else "shock")
            waves.append((w.name, f"{w.upstream} → {w.downstream}", w.family, kind, given))
        conditions = []
        for i, c in enumerate(self._conditions):
            value = {"wall": "direction", "free boundary": "pressure"}.get(c.kind)
            text = f"{value} {self._value_text(f'c:{i}')}" if value else "equal p and direction"
            conditions.append((c.label(), text))
        return waves, conditions

    def _region_names(self):
        """The inflow, then each wave's downstream region, in the order added."""
        return [self._inflow_name] + [w.downstream for w in self._waves.values()]

    def _status(self):
        n_unknown = sum(w.given == "unknown" for w in self._waves.values())
        n_eq = sum(2 if c.kind == "slip line" else 1 for c in self._conditions)
        try:
            self._plan()
            posed = "well posed"
        except IllPosedProblemError as exc:
            posed = f"not well posed: {exc}"
        regions = 1 + len(self._waves)
        return (f"{regions} region(s), {len(self._waves)} wave(s), {n_unknown} unknown "
                f"turn(s), {n_eq} condition(s): {posed}")

    def _inflow_text(self):
        hot = self._hot_gas
        gas = (f"thermally perfect gas (θv = {hot.vibrational_temperature:g} K, γ(T))"
               if hot is not None else f"γ = {self._value_text('g')}")
        parts = [f"M = {self._value_text('M')}", f"direction {self._value_text('d')}", gas]
        if self._inflow_state is not None:
            parts += [f"p = {self._value_text('p_in')}", f"T = {self._value_text('T_in')}"]
        return f"inflow {self._inflow_name!r}: " + ", ".join(parts)

    def __repr__(self) -> str:
        waves, conditions = self._rows()
        lines = [f"WavePattern: {self._status()}", f"  {self._inflow_text()}",
                 f"  regions: {', '.join(self._region_names())}"]
        if waves:
            widths = [max(len(row[i]) for row in waves) for i in range(4)]
            lines.append("  waves:")
            for row in waves:
                cells = "  ".join(f"{cell:<{w}}" for cell, w in zip(row[:4], widths))
                lines.append(f"    {cells}  {row[4]}")
        if conditions:
            lines.append("  conditions:")
            lines += [f"    {label}: {text}" for label, text in conditions]
        return "\n".join(lines)

    def _repr_html_(self) -> str:
        waves, conditions = self._rows()
        esc = html.escape
        wave_rows = "".join("<tr>" + "".join(f"<td>{esc(c)}</td>" for c in row) + "</tr>"
                            for row in waves)
        condition_rows = "".join(f"<tr><td>{esc(a)}</td><td>{esc(b)}</td></tr>"
                                 for a, b in conditions)
        return (f"<div><p><b>WavePattern</b>: {esc(self._status())}<br>"
                f"{esc(self._inflow_text())}<br>"
                f"regions: {esc(', '.join(self._region_names()))}</p>"
                "<table><caption>waves</caption><thead><tr><th>wave</th><th>regions</th>"
                "<th>family</th><th>kind</th><th>given</th></tr></thead>"
                f"<tbody>{wave_rows}</tbody></table>"
                "<table><caption>conditions</caption><thead><tr><th>condition</th>"
                f"<th>value</th></tr></thead><tbody>{condition_rows}</tbody></table></div>")


def _describe(value, unit_text):
    """A short text for a value given to the pattern, in the unit it was given in."""
    data = value
    library = type(value).__module__.split(".")[0]
    if library == "xarray":
        data = value.data
    elif library == "pandas":
        data = value.to_numpy()
    units = None
    if is_quantity(data):
        units, data = data.units, data.magnitude
    elif isinstance(data, (list, tuple)) and data and is_quantity(data[0]):
        units = data[0].units
        data = [v.m_as(units) for v in data]
    try:
        array = np.asarray(data, dtype=float)
    except (TypeError, ValueError):
        return repr(value)
    suffix = f" {units:~P}" if units is not None else (f" {unit_text}" if unit_text else "")
    if array.ndim == 0:
        if units is None and unit_text == "rad":
            return format_value(float(array), "rad")  # radians, with degrees beside
        return f"{float(array):.6g}{suffix}"
    with np.errstate(all="ignore"):
        finite = array[np.isfinite(array)]
    span = f"{finite.min():.6g} … {finite.max():.6g}" if finite.size else "all NaN"
    return f"shape {array.shape}, {span}{suffix}"
