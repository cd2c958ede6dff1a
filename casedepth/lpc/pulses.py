"""Boost and diffuse pulses of low-pressure carburizing: the saturation–diffusion model on the project's solver.

During a boost the hydrocarbon (acetylene by default) cracks on the hot steel and delivers carbon at a rate the
gas and the furnace set, the carbon flux J. The surface takes all of it while it is below the limit — the carbon
saturation of the steel's austenite, or a lower limit the planner sets — and once it reaches the limit it stays
there for the rest of the boost: what arrives beyond what diffusion carries inward is not taken up (it would
form carbides and soot). During a diffuse (nitrogen or vacuum) no carbon crosses the surface and the surface
carbon falls as the case spreads. This is the model of the published low-pressure carburizing simulations
(Gorockiewicz, R. "The kinetics of low-pressure carburizing of low alloy steels", Vacuum 86 (2011) 448–451;
Kula, P., R. Pietrasik, K. Dybowski, "Vacuum carburizing — process optimization", J. Mater. Process. Technol.
164–165 (2005) 876–881; both cited from memory), on the project's own solver
(:class:`casedepth.numerics.solver.CarbonSolver`: D(C, T), every geometry).

A flux of ``math.inf`` holds the surface at the limit from the first instant of every boost (the limit of a
gas that delivers more than diffusion can ever take).

Valid where the solver's carbon models are (austenite, 880–1050 °C for low-pressure work here, carbon up to the
saturation of austenite) and where the boost's carbon flux is a property of the gas and furnace that does not
depend on the surface carbon below the limit — the model's main assumption; calibrate the flux on the shop's
sections. Checked against Crank's (1975) held-surface erfc solution and the constant-flux solution (Carslaw &
Jaeger 1959) at constant D, and against an independent method-of-lines solve (tests/test_lpc.py).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import InputError
from ..numerics.batch import Program, Segment, run_program
from ..numerics.roots import illinois
from ..numerics.solver import CarbonSolver, History, Profile, Ramp, SurfaceCondition

#: steel density used to turn a carbon mass flux into the solver's wt % · m/s and the case's carbon back into mass,
#: kg/m³ (common practice: 7.85 g/cm³ at room temperature)
STEEL_DENSITY = 7850.0
#: a ramp (the drop to hardening temperature) is crossed in at least this many steps
RAMP_STEPS = 10


def influx_of(mass_flux: float) -> float:
    """The solver's carbon influx [wt % · m/s] for a carbon mass flux [kg/(m²·s)] into steel of :data:`STEEL_DENSITY`."""
    return mass_flux * 100.0 / STEEL_DENSITY


def carbon_mass(uptake: float, area: float) -> float:
    """Carbon [kg] in ``area`` [m²] of surface whose case holds ``uptake`` [wt % · m] per unit area."""
    return uptake / 100.0 * STEEL_DENSITY * area


@dataclass(frozen=True)
class Pulse:
    """One boost [s] and the diffuse [s] after it."""

    boost: float
    diffuse: float

    def to_dict(self) -> dict:
        return {"boost_s": self.boost, "diffuse_s": self.diffuse}


def held_time(pulses: list[Pulse]) -> float:
    """A table's boosts and diffuses together [s] (the time at carburizing temperature)."""
    return sum(p.boost + p.diffuse for p in pulses)


def check_pulses(pulses: list[Pulse], field: str = "schedule") -> None:
    """Refuse a pulse table that cannot be run: no pulse, or a length that is not a time of 0–10 h."""
    if not pulses:
        raise InputError(field, "a pulse table needs at least one boost")
    for number, pulse in enumerate(pulses, 1):
        for name, length in (("boost", pulse.boost), ("diffuse", pulse.diffuse)):
            if not (isinstance(length, (int, float)) and math.isfinite(length) and 0.0 <= length <= 36000.0):
                raise InputError(field, f"pulse {number}: {name} {length!r} s is not a time of 0–10 h")
        if pulse.boost <= 0.0:
            raise InputError(field, f"pulse {number}: a boost of no time puts no carbon in; leave the pulse out")


def cool_program(temperature: float, limit: float, to: float, drop: float, equalize: float) -> Program:
    """The march of the drop from ``temperature`` to the hardening temperature ``to`` [K] in ``drop`` [s] (stage 0) and
    the equalize there [s] (stage 1), in nitrogen: no carbon through the surface (``limit`` [wt %] only bounds the
    solver's range check). A drop of no time or to no lower temperature is left out, as is an equalize of none."""
    segments = []
    if to < temperature - 1e-9 and drop > 0.0:
        segments.append(Segment(0, drop, Ramp(temperature, to, limit, limit, 1.0, 0.0, drop), drop / RAMP_STEPS))
    if equalize > 0.0:
        segments.append(Segment(1, equalize, SurfaceCondition(min(to, temperature), limit, 0.0)))
    return Program(2, tuple(segments))


class PulseMarch:
    """A solver marched through boosts and diffuses at ``temperature`` [K]: the limit ``limit`` [wt %], the carbon
    influx of a boost ``influx`` [wt % · m/s] (``math.inf``: at the limit at once). Keeps when each boost reached the
    limit (:attr:`saturation`, s into the boost) and the segments run (:attr:`segments`: kind, start, end [s])."""

    def __init__(self, solver: CarbonSolver, temperature: float, limit: float, influx: float):
        self.solver = solver
        self.temperature = float(temperature)
        self.limit = float(limit)
        self.influx = float(influx)
        self.saturation: list[float] = []
        self.segments: list[tuple[str, float, float]] = []

    # -- conditions ----------------------------------------------------------------------------------------------
    def _flux_condition(self) -> SurfaceCondition:
        # the influx phase stops at the limit; its equilibrium carbon only bounds the plausibility check
        core = self.solver.core_carbon
        return SurfaceCondition(self.temperature, self.limit + (self.limit - core), 0.0, self.influx)

    def _held(self) -> SurfaceCondition:
        return SurfaceCondition(self.temperature, self.limit, math.inf)

    def _closed(self, temperature: float | None = None) -> SurfaceCondition:
        """No carbon through the surface (nitrogen or vacuum)."""
        return SurfaceCondition(self.temperature if temperature is None else temperature, self.limit, 0.0)

    def _land(self, value_after: callable, goal: float) -> None:
        """The last step crossed ``goal`` in ``value_after(profile carbon)``: take it again as long as lands on it."""
        s = self.solver
        k = len(s.history_time) - 1
        t0 = s.history_time[k - 1]
        h = s.time - t0
        before = value_after(s.history_carbon[k - 1]) - goal
        after = value_after(s.carbon) - goal
        if after == 0.0 or h <= 0.0:
            return
        tau = illinois(lambda t: value_after(s.retake(k, t).carbon) - goal, 0.0, before, h, after, 1e-6 * h, 1e-6)
        s.shorten_last_step(tau)

    # -- segments ------------------------------------------------------------------------------------------------
    def boost(self, duration: float | None = None, hold: float | None = None) -> float:
        """A boost of ``duration`` [s], or one that lasts until the surface reaches the limit and then ``hold`` [s]
        more; returns its length."""
        s = self.solver
        start = s.time
        limit = self.limit
        end = math.inf if duration is None else start + duration
        if s.carbon[0] < limit * (1.0 - 1e-12) and math.isfinite(self.influx):
            s.advance(min(end, start + 36000.0) - start, self._flux_condition(), on_step=lambda sv: sv.carbon[0] >= limit)
            if s.carbon[0] >= limit:
                self._land(lambda c: c[0], limit)
            elif duration is None:
                raise InputError("carbon_flux", "the surface does not reach the limit within 10 h of boost: the carbon flux "
                                                "is too low for this steel and temperature")
        if not math.isfinite(self.influx):
            self.saturation.append(0.0)  # at the limit from the first instant
        else:
            self.saturation.append(float(s.time - start) if s.carbon[0] >= limit * (1.0 - 1e-9) else math.inf)
        if duration is None:
            end = s.time + (hold or 0.0)
        if end - s.time > 1e-9 * max(end, 1.0):
            s.advance(end - s.time, self._held())
        self.segments.append(("boost", start, s.time))
        return s.time - start

    def diffuse(self, duration: float | None = None, until_surface: float | None = None) -> float:
        """A diffuse of ``duration`` [s], or until the surface carbon falls to ``until_surface`` [wt %]; returns its
        length."""
        s = self.solver
        start = s.time
        if duration is None:
            if s.carbon[0] > until_surface:
                s.advance(36000.0, self._closed(), on_step=lambda sv: sv.carbon[0] <= until_surface)
                if s.carbon[0] > until_surface:
                    raise InputError("surface_min", "the surface does not fall to the carbon it is boosted again from "
                                                    "within 10 h of diffuse")
                self._land(lambda c: c[0], until_surface)
        elif duration > 0.0:
            s.advance(duration, self._closed())
        self.segments.append(("diffuse", start, s.time))
        return s.time - start

    def cool(self, to: float, drop: float, equalize: float) -> None:
        """The drop to the hardening temperature ``to`` [K] in ``drop`` [s] and the equalize there [s], in nitrogen
        (:func:`cool_program`)."""
        s = self.solver
        program = cool_program(self.temperature, self.limit, to, drop, equalize)
        marched = run_program(s, program)
        ends = [*marched.stage_start[1:], s.time]
        present = {segment.stage for segment in program.segments}
        for stage, name in enumerate(("drop", "equalize")):
            if stage in present:
                self.segments.append((name, marched.stage_start[stage], ends[stage]))

    # -- what it gives ---------------------------------------------------------------------------------------------
    def surface_history(self) -> tuple[np.ndarray, np.ndarray]:
        """The surface carbon [wt %] after every step, against time [s]."""
        s = self.solver
        return np.array(s.history_time), np.array([float(c[0]) for c in s.history_carbon])


@dataclass
class PulseRun:
    """What a pulse table gave: the pulses [s], the profile at the end, the case depth [m] at the threshold, the
    carbon taken up [wt % · m per unit surface], when each boost reached the limit (s into it; ``inf`` if it did
    not), the surface carbon through the cycle, the history of profiles and the segments run."""

    pulses: list[Pulse]
    profile: Profile
    case_depth: float
    uptake: float
    saturation: list[float]
    surface_times: np.ndarray
    surface_carbon_history: np.ndarray
    history: History
    segments: list[tuple[str, float, float]]
    limit: float

    @property
    def surface_carbon(self) -> float:
        return self.profile.surface_carbon

    @property
    def max_surface_carbon(self) -> float:
        """The highest surface carbon of the run [wt %]; at the limit where it rose to it (a boost lands on the limit
        to 1e-6 of it: the round-off above it is not a reading above the limit)."""
        highest = float(self.surface_carbon_history.max())
        return min(highest, self.limit) if highest <= self.limit * (1 + 1e-6) else highest

    @property
    def time_at_limit(self) -> list[float]:
        """Time [s] each boost held the surface at the limit."""
        return [max(p.boost - sat, 0.0) if math.isfinite(sat) else 0.0 for p, sat in zip(self.pulses, self.saturation)]

    @property
    def held_time(self) -> float:
        """Boosts and diffuses together [s] (the time at carburizing temperature)."""
        return held_time(self.pulses)


def finish(march: PulseMarch, pulses: list[Pulse], threshold: float) -> PulseRun:
    """The run of ``march`` so far as a :class:`PulseRun` of ``pulses``."""
    s = march.solver
    profile = s.profile()
    times, surface = march.surface_history()
    return PulseRun(list(pulses), profile, profile.depth_at(threshold), s.carbon_uptake(), list(march.saturation),
                    times, surface, s.history(), list(march.segments), march.limit)
