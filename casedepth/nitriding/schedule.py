"""Keeping the compound layer in its window: the K_N that centres it, and two-stage schedules.

* :func:`potential_for_compound_layer` — the one K_N that puts the layer in the middle of a window;
* :func:`two_stage_schedule` — a first stage at the set K_N, then a low-K_N stage that holds or thins
  the layer, split so that the layer ends in the window (aimed at the middle of the part of the window
  the two potentials can reach, as boost and diffuse are for the surface carbon);
* :func:`two_stage_for_depth` — that schedule at the total time that gives a nitrided hardness depth;
* :func:`compound_layer_advice` — what to change when a one-stage layer misses its window.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .. import formats
from ..errors import InputError, NotReachableError
from ..models.iron_nitrogen import Lehrer_boundaries
from ..numerics.roots import illinois
from .layer import CompoundLayer
from .nitride import SOAK_RANGE, NitridingResult, front_rate, nitride, nitriding_time
from .setup import KN_RANGE, NitridingSetup

#: the second stage's K_N when none is set: this many times the α/γ′ boundary (just above it)
SECOND_STAGE_ABOVE_BOUNDARY = 1.05


def _check_window(window: tuple[float, float]) -> tuple[float, float]:
    low, high = window
    if not (0.0 <= low <= high <= 100e-6):
        raise InputError("compound_min", f"{formats.typed_range(low * 1e6, high * 1e6, 'µm')} is not a window within "
                         "0–100 µm")
    return low, high


def potential_for_compound_layer(setup: NitridingSetup, time: float, window: tuple[float, float]) -> float:
    """The K_N [atm^-1/2] that gives a compound layer in the middle of ``window`` [m] after ``time`` [s].

    Searches K_N between the α/γ′ boundary and the top of the model's range (the layer thickens
    monotonically with K_N); refuses windows that need a K_N outside that range.
    """
    low, high = _check_window(window)
    T = setup.temperature
    alpha_gamma, _ = Lehrer_boundaries(T)
    aim = 0.5 * (low + high)
    if aim == 0.0:
        return max(KN_RANGE[0], 0.8 * alpha_gamma)
    uptake, model = setup.uptake, setup.layer

    def miss(log_kn):
        return model.layer(T, math.exp(log_kn), time, uptake).thickness - aim

    lo, hi = math.log(max(alpha_gamma, KN_RANGE[0])), math.log(KN_RANGE[1])
    f_lo, f_hi = miss(lo), miss(hi)
    if f_hi < 0 or f_lo > 0:
        raise NotReachableError("compound_max", f"a {formats.thin_length(aim)} layer in {time / 3600:.1f} h "
                                f"needs a K_N outside {formats.typed_range(*KN_RANGE, formats.KN_UNIT)}; change the time "
                                "or the temperature")
    return math.exp(illinois(miss, lo, f_lo, hi, f_hi, 1e-12, 1e-6 * aim))


@dataclass
class TwoStageSchedule:
    """A first stage at the set K_N that builds the compound layer, then a low-K_N stage that holds
    or thins it. Times in s, K_N in atm^-1/2, layer in m."""

    first_time: float
    first_kn: float
    second_time: float
    second_kn: float
    layer: CompoundLayer

    @property
    def compound_layer(self) -> float:
        return self.layer.thickness

    @property
    def stages(self) -> list[tuple[float, float]]:
        """``[(duration [s], K_N), …]`` of the schedule."""
        return [(self.first_time, self.first_kn), (self.second_time, self.second_kn)]


def second_stage_potential(setup: NitridingSetup, second_kn: float | None) -> float:
    """The second stage's K_N: as set, or just above the α/γ′ boundary; refused outside [α/γ′, first K_N)."""
    alpha_gamma, _ = Lehrer_boundaries(setup.temperature)
    k1 = setup.nitriding_potential
    k2 = SECOND_STAGE_ABOVE_BOUNDARY * alpha_gamma if second_kn is None else second_kn
    if not (alpha_gamma <= k2 < k1):
        raise InputError("kn_second", f"{formats.typed(k2, formats.KN_UNIT)} must lie between the α/γ′ boundary "
                         f"({formats.kn(alpha_gamma)}) and the first stage's K_N "
                         f"({formats.typed(k1, formats.KN_UNIT)})")
    return k2


def two_stage_schedule(setup: NitridingSetup, total_time: float, window: tuple[float, float],
                       second_kn: float | None = None, guess: float | None = None) -> TwoStageSchedule:
    """Split ``total_time`` [s] into a stage at the setup's K_N and one at ``second_kn`` so that the
    compound layer ends in ``window`` [m].

    The second K_N defaults to just above the α/γ′ boundary (1.05 ×): there the layer gets almost no
    nitrogen from the gas while the diffusion zone keeps drawing on it, so it holds or thins, and the
    ferrite under it stays saturated, so the diffusion zone — and the nitrided depth — grow as in one
    stage. The layer a split leaves runs from that of the shortest first stage to that of one stage
    alone; the schedule aims at the middle of the window, or, where only part of the window lies in
    that range, at the middle of that part. The layer follows the setup's layer model; the first
    stage's length is found to 1e-4 of the layer (Illinois regula falsi), starting near ``guess`` [s].
    """
    low, high = _check_window(window)
    T = setup.temperature
    k1 = setup.nitriding_potential
    k2 = second_stage_potential(setup, second_kn)
    uptake, model = setup.uptake, setup.layer
    shortest = SOAK_RANGE[0]

    def layer_after(first: float) -> CompoundLayer:
        first = min(max(first, shortest), total_time)
        stages = [(first, k1)] + ([(total_time - first, k2)] if total_time - first > 1.0 else [])
        return model.staged(T, stages, uptake)

    def split(aim: float, a: float, fa: float, b: float, fb: float) -> TwoStageSchedule:
        first = min(max(illinois(lambda t: layer_after(t).thickness - aim, a, fa, b, fb, 1.0, 1e-4 * aim),
                        shortest), total_time)
        return TwoStageSchedule(first, k1, total_time - first, k2, layer_after(first))

    aim = 0.5 * (low + high)
    if guess is not None and shortest < guess < total_time:  # a bracket around the guess saves most of the trials
        below, above = max(shortest, 0.9 * guess), min(total_time, 1.1 * guess)
        f_below, f_above = layer_after(below).thickness - aim, layer_after(above).thickness - aim
        if f_below <= 0.0 <= f_above:
            return split(aim, below, f_below, above, f_above)
    thinnest, thickest = layer_after(shortest).thickness, layer_after(total_time).thickness
    reach_low, reach_high = max(low, thinnest), min(high, thickest)
    if reach_low > reach_high:
        if thickest < low:
            raise NotReachableError("compound_min", f"even {total_time / 3600:.1f} h at K_N "
                                    f"{formats.typed(k1, formats.KN_UNIT)} gives only {formats.thin_length(thickest)}, "
                                    f"under the window's {formats.typed(low * 1e6, 'µm')}; raise K_N")
        raise NotReachableError("kn_second" if second_kn is not None else "compound_max",
                                f"the second stage at K_N {formats.typed(k2, formats.KN_UNIT)} leaves at least "
                                f"{formats.thin_length(thinnest)}, over the window's {formats.typed(high * 1e6, 'µm')}; "
                                f"lower the second K_N or widen the window")
    aim = 0.5 * (reach_low + reach_high)
    return split(aim, shortest, thinnest - aim, total_time, thickest - aim)


@dataclass
class LayerAdvice:
    """What to change when the compound layer misses its window: the one K_N that centres it
    [atm^-1/2], a two-stage schedule that does (or None), and the sentence saying so (None if the
    layer is inside the window)."""

    kn_for_window: float
    two_stage: TwoStageSchedule | None
    message: str | None


def compound_layer_advice(setup: NitridingSetup, result: NitridingResult, window: tuple[float, float],
                          second_kn: float | None = None, with_schedule: bool = True) -> LayerAdvice:
    """Advice on the compound layer of ``result`` against ``window`` [m] (a two-stage schedule only if
    ``with_schedule``: it costs a search); raises :class:`InputError` (field ``compound_max``) if no
    K_N in range centres the layer in that time."""
    kn = potential_for_compound_layer(setup, result.time, window)
    layer = result.compound_layer
    if window[0] <= layer <= window[1]:
        return LayerAdvice(kn, None, None)
    try:
        two = two_stage_schedule(setup, result.time, window, second_kn) if with_schedule else None
    except InputError:
        two = None
    message = (f"The compound layer ({formats.thin_length(layer)}) is outside {formats.thin_range(*window)} at "
               f"K_N {formats.kn(setup.nitriding_potential)}; K_N {formats.kn(kn)} would put it in the middle")
    if two is not None:
        message += (f"; or nitride {two.first_time / 3600:.1f} h at K_N {formats.kn(two.first_kn)}, then "
                    f"{two.second_time / 3600:.1f} h at K_N {formats.kn(two.second_kn)} (layer {two.layer.describe()})")
    return LayerAdvice(kn, two, message + ".")


def _front_time(setup: NitridingSetup, front_depth: float) -> float:
    """Soak [s] after which the diffusion zone's nitrided depth (below the compound layer) is ``front_depth`` [m]."""
    rate = front_rate(setup)
    if rate <= 0.0:
        raise NotReachableError("target", "dissolved nitrogen alone cannot raise the hardness by 50 HV in this steel")
    return (front_depth / rate) ** 2


def two_stage_for_depth(setup: NitridingSetup, target_depth: float, window: tuple[float, float],
                        second_kn: float | None = None) -> tuple[TwoStageSchedule, NitridingResult]:
    """A two-stage schedule (see :func:`two_stage_schedule`) whose total time gives the nitrided hardness
    depth ``target_depth`` [m] with the layer the schedule leaves, and what it gives.

    The front below the layer does not depend on K_N once the ferrite is saturated (every stage at or
    above α/γ′), so the total time follows from the one-stage time with the depth taken up by the
    staged layer instead of the one-stage layer (one correction: the layer hardly changes with the total).
    """
    total = nitriding_time(setup, target_depth).time
    schedule = two_stage_schedule(setup, total, window, second_kn)
    total = _front_time(setup, target_depth - schedule.compound_layer)
    schedule = two_stage_schedule(setup, total, window, second_kn, guess=schedule.first_time)
    return schedule, nitride(setup, total, layer=schedule.layer)


def staged_layer_at(setup: NitridingSetup, schedule: TwoStageSchedule, time: float) -> CompoundLayer:
    """The compound layer [m] ``time`` [s] into a two-stage schedule."""
    return staged_layer(setup, schedule.first_time, schedule.first_kn, schedule.second_kn, time)


def staged_layer(setup: NitridingSetup, first_time: float, first_kn: float, second_kn: float,
                 time: float) -> CompoundLayer:
    """The compound layer [m] ``time`` [s] into a first stage of ``first_time`` [s] at ``first_kn`` and a second at
    ``second_kn`` [atm^-1/2]."""
    first = min(time, first_time)
    stages = [(max(first, 1.0), first_kn)]
    if time > first_time + 1.0:
        stages.append((time - first_time, second_kn))
    return setup.layer.staged(setup.temperature, stages, setup.uptake)
