"""The whole gas-nitriding cycle in a retort: load, nitrogen purge, heat-up, the nitriding stages,
cool-down under nitrogen and a last purge, from the shop's standard times.

The nitrogen taken up while heating and cooling is not counted in the case: ammonia goes in near
temperature and is shut off for the cool-down (common practice).
"""

from __future__ import annotations

import math

import numpy as np

from ..constants import ROOM_TEMPERATURE, ZERO_CELSIUS

#: where a nitriding retort is opened after cooling under nitrogen, about 150 °C (common practice; display only)
NITRIDING_UNLOAD = 150.0 + ZERO_CELSIUS


def nitriding_cycle(soaks: list[tuple[float, float]], temperature: float,
                    shop) -> list[tuple[str, float, float, float | None]]:
    """The segments of a gas-nitriding cycle: ``(label, hours, temperature at the end [K], K_N or None)``.

    ``soaks`` are the nitriding stages, ``(time [s], K_N)`` each, at ``temperature`` [K]; ``shop`` a
    :class:`~casedepth.shop.quote.ShopDefaults`. Segments of zero length are left out.
    """
    segments = [("Load and close", shop.load_h, ROOM_TEMPERATURE, None),
                ("Purge with nitrogen", shop.nitriding_purge_h, ROOM_TEMPERATURE, None),
                ("Heat-up", shop.nitriding_heat_up_h, temperature, None)]
    segments += [(f"Nitride at K_N {kn:.2f}", time / 3600.0, temperature, kn) for time, kn in soaks]
    segments += [("Cool down", shop.nitriding_cool_h, NITRIDING_UNLOAD, None),
                 ("Purge with nitrogen", shop.nitriding_purge_h, NITRIDING_UNLOAD, None)]
    return [segment for segment in segments if segment[1] > 0]


def segments_timeline(segments: list[tuple[str, float, float, float | None]]):
    """Temperature [K] and K_N against time [s] through the cycle, for plots (as
    :func:`casedepth.carburizing.cycle.timeline`): (times, temperatures, potentials, labels).

    K_N is NaN outside the nitriding stages. The labels hold the segments' (start, end, label) and the
    moments to mark, (time, time, what): each purge with nitrogen, and ammonia going in, which
    :class:`casedepth.outcome.Timeline` keeps as markers.
    """
    times, temps, pots, labels = [0.0], [ROOM_TEMPERATURE], [math.nan], []
    now, t_now = 0.0, ROOM_TEMPERATURE
    for label, hours, t_end, kn in segments:
        if label.lower().startswith("purge"):
            labels.append((now, now, "nitrogen purge"))
        elif kn is not None and not math.isfinite(pots[-1]):
            labels.append((now, now, "ammonia in"))
        labels.append((now, now + hours * 3600.0, label))
        times += [now, now + hours * 3600.0]
        temps += [t_now, t_end]
        pots += [math.nan if kn is None else kn] * 2
        now, t_now = now + hours * 3600.0, t_end
    return np.array(times), np.array(temps), np.array(pots, dtype=float), labels
