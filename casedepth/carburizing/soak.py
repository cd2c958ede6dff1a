"""One carburizing step at constant temperature and carbon potential: forward and inverse.

* :func:`carburize` — what a soak of a given length gives (profile, effective case depth).
* :func:`soak_times_for_case_depths` — the soaks that give target effective case depths, from one
  :class:`~casedepth.numerics.march.March` that records the threshold depth after every step; the
  step that crosses each target is re-taken with the length that lands on it (the threshold depth
  grows monotonically during a single step, so the root is bracketed).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .. import formats, safety
from ..errors import InputError, NotReachableError
from ..numerics.batch import Program, Segment, run_programs, times_to
from ..numerics.march import March
from ..numerics.solver import History, Profile
from ..units import as_number, both_lengths, format_duration, length_range
from .cycle import describe_counted
from .setup import SOAK_RANGE, TARGET_RANGE, CarburizingSetup, case_warnings


@dataclass
class CarburizingResult:
    """The outcome of a soak: times in s, depths in m, carbon in wt %.

    ``history`` holds the profile after every solver step, ending with the final profile.
    """

    setup: CarburizingSetup
    soak_time: float
    profile: Profile
    case_depth: float
    history: History
    warnings: list[str]
    carbon_uptake: float  # wt % · m per unit surface
    target_depth: float | None = None
    carbon_at_depth: float | None = None
    probe_depth: float | None = None
    counted: tuple = ()  # the shop's stages run with the soak and counted in the case (none: the soak alone)

    def profile_at(self, time: float) -> Profile:
        """The profile at ``time`` [s] of the soak (linear in time between solver steps, for display)."""
        return self.history.profile_at(time)

    @property
    def surface_carbon(self) -> float:
        return self.profile.surface_carbon

    @property
    def window_depth(self) -> float:
        """The depth the drawing's window is about [m]: the effective (or total) case depth."""
        return self.case_depth

    @property
    def spread_figures(self) -> dict[str, float]:
        """The figures besides the depth that a load's spread is reported for (casedepth.shop.capability): see
        :meth:`figures_of`."""
        return {name: float(values[0]) for name, values in self.figures_of([self]).items()}

    @staticmethod
    def figures_of(results: list[CarburizingResult]) -> dict[str, np.ndarray]:
        """The figures besides the depth that a load's spread is reported for, of many results at once: the
        surface carbon [wt %] and, where the plan's hardness comes from the quench's structure, the surface and
        core hardness [HRC] as the plan's outcome reads them (:func:`casedepth.carburizing.hardening.hardness_at`:
        Maynier, Jungmann & Dollet 1978 on the cooling through the section, Carslaw & Jaeger 1959), one call
        of the structure relation for all parts that share a composition, a section and a quench."""
        out = {"surface_carbon_pct": np.array([r.surface_carbon for r in results])}
        if not all(r.setup.structure for r in results):
            return out
        from ..models.hardness import HV_RANGE, ASTM_E140_hv_to_hrc
        from .hardening import core_depth, hardness_at

        surface, core = np.empty(len(results)), np.empty(len(results))
        groups: dict[tuple, list[int]] = {}
        for k, r in enumerate(results):
            s = r.setup
            groups.setdefault((tuple(sorted(s.steel.composition.items())), s.geometry, s.hardening), []).append(k)
        for rows in groups.values():
            s = results[rows[0]].setup
            depths = np.concatenate((np.zeros(len(rows)), np.full(len(rows), core_depth(s.geometry))))
            carbon = np.concatenate(([results[k].surface_carbon for k in rows], np.full(len(rows), s.steel.carbon)))
            hv = hardness_at(s.steel.composition, s.geometry, s.hardening, depths, carbon)["hv"]
            surface[rows], core[rows] = hv[:len(rows)], hv[len(rows):]
        hrc = (lambda hv: np.asarray(ASTM_E140_hv_to_hrc(np.clip(hv, HV_RANGE[0], HV_RANGE[1])), dtype=float))
        out.update(surface_hardness_hrc=hrc(surface), core_hardness_hrc=hrc(core))
        return out

    @property
    def threshold_carbon(self) -> float:
        return self.setup.threshold_carbon

    @property
    def diffusion_length(self) -> float:
        """√(D t) with D at the threshold carbon, [m]: a length scale, not a depth where carbon stops."""
        return math.sqrt(float(self.setup.diffusivity(self.threshold_carbon, self.setup.temperature)) * self.soak_time)

    def to_dict(self) -> dict:
        """The JSON of ``casedepth carburize --time`` (units in the key names)."""
        out = self.setup.to_dict()
        out.update(soak_time_h=self.soak_time / 3600.0, case_depth_mm=self.case_depth * 1e3,
                   surface_carbon_pct=self.surface_carbon, shop_stages_counted=bool(self.counted),
                   diffusion_length_mm=self.diffusion_length * 1e3,
                   diffusion_length_note="sqrt(D t) with D at the threshold carbon: a length scale, not a depth at "
                                         "which all carbon stops",
                   warnings=list(self.warnings), profile=self.profile.to_dict())
        if self.target_depth is not None:
            out["target_depth_mm"] = self.target_depth * 1e3
        if self.carbon_at_depth is not None:
            out.update(carbon_at_mm=self.probe_depth * 1e3, carbon_at_pct=self.carbon_at_depth)
        return out

    def text(self, units) -> str:
        """What ``casedepth carburize --time`` prints (``units`` a :class:`~casedepth.units.DisplayUnits`)."""
        s = self.setup
        lines = [f"Soak of {format_duration(self.soak_time)} at {units.format_temperature(s.temperature)}, carbon "
                 f"potential {formats.carbon(s.carbon_potential)}",
                 f"  {s.threshold.depth_name:<21} {units.format_length(self.case_depth)} at {s.threshold}"
                 + s.threshold_meaning() + " at the end",
                 f"  shop stages           {describe_counted(self.counted)}",
                 *s.describe_lines(self.surface_carbon)]
        if self.carbon_at_depth is not None:
            lines.append(f"  carbon at {units.format_length(self.probe_depth):<11} {formats.carbon(self.carbon_at_depth)}")
        lines.append(f"  diffusion length √(Dt) {units.format_length(self.diffusion_length)} (D at the threshold "
                     f"carbon; a length scale, not a depth where the carbon stops)")
        lines += [f"Warning: {w}" for w in self.warnings]
        lines.append(safety.caution_line(safety.cautions(s.temperature, s.equilibrium_carbon, s.saturation_carbon)))
        return "\n".join(lines)


def check_soak(soak_time: float) -> None:
    """Refuse a soak [s] outside the range the models are used for (key ``time``)."""
    soak_time = as_number(soak_time, "time")
    if not (math.isfinite(soak_time) and SOAK_RANGE[0] <= soak_time <= SOAK_RANGE[1]):
        raise InputError("time", f"{soak_time / 3600:g} h is outside {SOAK_RANGE[0] / 60:g} min–{SOAK_RANGE[1] / 3600:g} h")


def check_probe_depth(setup: CarburizingSetup, probe_depth: float | None) -> None:
    """Refuse a depth [m] to report the carbon at that lies outside the part (key ``carbon_at``)."""
    if probe_depth is not None:
        probe_depth = as_number(probe_depth, "carbon_at")
        limit = min(setup.geometry.half_section, TARGET_RANGE[1] * 5)
        if not (math.isfinite(probe_depth) and 0.0 <= probe_depth <= limit):
            raise InputError("carbon_at", f"{both_lengths(probe_depth)} is outside {length_range(0.0, limit)}")


def carburize(setup: CarburizingSetup, soak_time: float, probe_depth: float | None = None) -> CarburizingResult:
    """Run a soak of ``soak_time`` [s]; the effective case depth it gives and the profile at its end.

    ``probe_depth`` [m], if given, is a depth at which the carbon is reported.
    """
    check_soak(soak_time)
    check_probe_depth(setup, probe_depth)
    solver = setup.solver(soak_time=soak_time)
    solver.advance(soak_time, setup.surface_condition)
    profile = solver.profile()
    depth = profile.depth_at(setup.threshold_carbon)
    warnings = case_warnings(setup, depth, profile.surface_carbon)
    return CarburizingResult(setup, soak_time, profile, depth, solver.history(), warnings, solver.carbon_uptake(),
                             carbon_at_depth=None if probe_depth is None else profile.carbon_at(probe_depth),
                             probe_depth=probe_depth)


def carburize_many(setups: list[CarburizingSetup], soak_times: list[float]) -> list[CarburizingResult]:
    """:func:`carburize` of each setup for its soak [s], marched together where they can be
    (:func:`casedepth.numerics.batch.run_programs`): the same depths, profiles and warnings to round-off,
    except that a batched result's history holds only the start and the end."""
    for soak in soak_times:
        check_soak(soak)
    solvers = [setup.solver(soak_time=soak) for setup, soak in zip(setups, soak_times)]
    programs = [Program(1, (Segment(0, soak, setup.surface_condition),)) for setup, soak in zip(setups, soak_times)]
    results = []
    for setup, soak, solver, marched in zip(setups, soak_times, solvers, run_programs(solvers, programs)):
        if marched is None:
            results.append(carburize(setup, soak))
            continue
        half = setup.geometry.half_section
        profile = Profile(solver.nodes.copy(), marched.carbon, marched.time, half)
        depth = profile.depth_at(setup.threshold_carbon)
        history = History(solver.nodes.copy(), np.array([solver.time, marched.time]), [solver.carbon, marched.carbon], half)
        results.append(CarburizingResult(setup, soak, profile, depth, history, case_warnings(setup, depth, profile.surface_carbon),
                                         float(np.sum(solver.volume * (marched.carbon - solver.core_carbon)))))
    return results


def depth_histories_many(setups: list[CarburizingSetup], soak_time: float) -> list[tuple[np.ndarray, np.ndarray]]:
    """The threshold depth [m] of each setup after every solver step of a soak of ``soak_time`` [s], as
    ``(times [s], depths [m])``: what :func:`carburize`'s history gives (``history.threshold_depths``), the cases
    marched together where they can be (:class:`casedepth.numerics.batch.BatchMarch`, recording as it goes)."""
    from ..numerics.batch import BatchMarch, batch_rows

    check_soak(soak_time)
    solvers = [setup.solver(soak_time=soak_time) for setup in setups]
    out: list[tuple[np.ndarray, np.ndarray] | None] = [None] * len(setups)
    for rows in batch_rows(solvers):
        batch = BatchMarch([solvers[k] for k in rows])
        batch.advance(soak_time, [setups[k].surface_condition for k in rows],
                      record=np.array([setups[k].threshold_carbon for k in rows]))
        times = np.array([t for t, _ in batch.recorded])
        depths = np.array([d for _, d in batch.recorded])
        for position, k in enumerate(rows):
            if not batch.failed[position]:
                out[k] = (times[:, position], depths[:, position])
    for k, setup in enumerate(setups):
        if out[k] is None:
            history = carburize(setup, soak_time).history
            out[k] = (history.times, history.threshold_depths(setup.threshold_carbon))
    return out


def check_target(setup: CarburizingSetup, target: float, field: str = "target") -> None:
    """Refuse a target depth [m] outside the range the models cover (or beyond the centre of the section)."""
    target = as_number(target, field)
    lo, hi = TARGET_RANGE
    limit = min(hi, setup.geometry.half_section)
    if not (math.isfinite(target) and lo <= target <= limit):
        what = " (half the section)" if limit < hi else ""
        raise InputError(field, f"{both_lengths(target)} is outside {length_range(lo, limit)}{what}")


def soak_times_for_case_depths(setup: CarburizingSetup, targets: list[float],
                               size_for: float | None = None) -> list[CarburizingResult]:
    """Soaks [s] for several effective case depths [m] (e.g. a drawing's minimum, aim and maximum) from one march.

    The march stops once the deepest target is passed; for each target the step that crossed it is
    re-taken with the length that lands on it. The grid and steps are sized for ``size_for`` [m]
    (default: the middle target), so the answer for that depth is exactly what
    :func:`soak_time_for_case_depth` gives for it alone.
    """
    for target in targets:
        check_target(setup, target)
    deepest = max(targets)
    march = March(setup.solver(case_depth=size_for if size_for is not None else sorted(targets)[len(targets) // 2]),
                  setup.threshold_carbon)
    if not march.advance(SOAK_RANGE[1], setup.surface_condition, until=deepest):
        raise NotReachableError("target", f"{both_lengths(deepest)} is not reached within {SOAK_RANGE[1] / 3600:g} h "
                                f"(reached {both_lengths(march.depth)}); raise the temperature or the carbon potential")
    results = []
    for target in targets:
        time = march.time_to(target)
        profile = march.profile_at(time)
        depth = profile.depth_at(setup.threshold_carbon)
        uptake = float(np.sum(march.solver.volume * (profile.carbon - setup.steel.carbon)))
        results.append(CarburizingResult(setup, time, profile, depth, march.history(time, profile),
                                         case_warnings(setup, depth, profile.surface_carbon), uptake,
                                         target_depth=target))
    return results


def soak_times_many(setups: list[CarburizingSetup], targets: list[float],
                    errors: str = "raise") -> list[CarburizingResult | Exception]:
    """:func:`soak_time_for_case_depth` for each setup and its target [m], the cases marched together where they
    can be (:func:`casedepth.numerics.batch.times_to`): the same soaks, profiles and warnings, to round-off,
    except that a batched result's history holds only the start and the end. With ``errors="return"``, a case
    the single path refuses gives its :class:`InputError` (or :class:`NotReachableError`) in its place instead
    of raising it."""
    if errors not in ("raise", "return"):
        raise ValueError("errors must be 'raise' or 'return'")
    results: list[CarburizingResult | Exception | None] = [None] * len(setups)
    rows = []
    for k, (setup, target) in enumerate(zip(setups, targets)):
        try:
            check_target(setup, target)
        except InputError as error:
            if errors == "raise":
                raise
            results[k] = error
            continue
        rows.append(k)
    solvers = [setups[k].solver(case_depth=targets[k]) for k in rows]
    landed = times_to(solvers, [setups[k].surface_condition for k in rows], [setups[k].threshold_carbon for k in rows],
                      [targets[k] for k in rows], SOAK_RANGE[1])
    for k, solver, found in zip(rows, solvers, landed):
        setup, target = setups[k], targets[k]
        if found is None:  # solved alone: the exact single march, or the error it raises
            try:
                results[k] = soak_time_for_case_depth(setup, target)
            except InputError as error:
                if errors == "raise":
                    raise
                results[k] = error
            continue
        time, carbon = found
        half = setup.geometry.half_section
        profile = Profile(solver.nodes, carbon, time, half)
        depth = profile.depth_at(setup.threshold_carbon)
        uptake = float(np.sum(solver.volume * (carbon - setup.steel.carbon)))
        history = History(solver.nodes.copy(), np.array([solver.time, time]), [solver.carbon, carbon], half)
        results[k] = CarburizingResult(setup, time, profile, depth, history,
                                       case_warnings(setup, depth, profile.surface_carbon), uptake, target_depth=target)
    return results


def soak_time_for_case_depth(setup: CarburizingSetup, target: float) -> CarburizingResult:
    """The soak [s] at the setup's temperature and potential that gives effective case depth ``target`` [m]."""
    return soak_times_for_case_depths(setup, [target])[0]
