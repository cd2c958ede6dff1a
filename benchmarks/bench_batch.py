"""Many cases in one march: the batch against one inverse, and a load's capability against its plan.

What it measures, in one run, each the median of ``REPEATS`` interleaved repeats:

1. **Inverse, 1000 cases.** 1000 different setups (8620 plate, 880–1050 °C, potential 0.8–1.1 %C, β
   5e-6–5e-5 cm/s, target 0.3–2.5 mm at 0.40 %C, all drawn with a fixed seed) solved by
   ``soak_times_many`` in one batch, against one inverse (925 °C, potential 1.0, 1.0 mm) and against
   the same 1000 solved one by one. Goal (issue "fast where the user waits"): at most ``GOAL_MANY``
   times one inverse. Before timing, the batch's soaks are checked against the one-by-one ones
   (identical to round-off; the largest relative difference is printed).
2. **Capability.** ``capability`` of the pinion-shaft example and of the ring gear's boost and diffuse
   (256 parts, the shop's ramped heat-up and drop counted) and with ``optimize``, against the plan's nominal ``evaluate``. Goals (issue
   "process capability"): at most ``GOAL_CAPABILITY`` and ``GOAL_OPTIMIZE`` times the nominal.
3. **Temperatures compared.** ``compare_temperatures`` of the same two plans and the low-pressure pinion at six
   temperatures (the soaks worked out together), against evaluating the plan at each temperature one by one.

How to run
----------
From the repository root::

    python benchmarks/bench_batch.py
"""

from __future__ import annotations

import os
import statistics
import sys
import time

import numpy as np

sys.path.insert(0, os.path.dirname(os.path.dirname(os.path.abspath(__file__))))

import casedepth  # noqa: E402
from casedepth.carburizing.soak import soak_time_for_case_depth, soak_times_many  # noqa: E402
from casedepth.errors import InputError  # noqa: E402
from casedepth.plan.evaluate import compare_temperatures, evaluate  # noqa: E402
from casedepth.plan.fileformat import load  # noqa: E402
from casedepth.shop.capability import Spread, capability  # noqa: E402

CASES = 1000
REPEATS = 5
GOAL_MANY = 40.0
GOAL_CAPABILITY = 30.0
GOAL_OPTIMIZE = 100.0
#: the temperatures compared [K] (the window's Temperatures page: the carburizing row's six and the plans' own 925 °C)
COMPARED = [T + 273.15 for T in (880.0, 900.0, 925.0, 950.0, 980.0, 1000.0)]
EXAMPLES = os.path.join(os.path.dirname(os.path.dirname(os.path.abspath(__file__))), "resources", "examples")
#: the plans whose capability is timed: a soak with the shop's stages, and a boost and diffuse in the plan's split
PLANS = {"pinion shaft": "pinion-shaft.cdplan.json", "ring gear (boost, diffuse)": "ring-gear-boost-diffuse.cdplan.json"}


def drawn(count: int):
    rng = np.random.default_rng(20261204)
    setups = [casedepth.setup("8620", f"{rng.uniform(880, 1050):.2f}C", f"{rng.uniform(0.8, 1.1):.3f}",
                              beta=f"{np.exp(rng.uniform(np.log(5e-6), np.log(5e-5))):.3e}cm/s") for _ in range(count)]
    targets = list(np.exp(rng.uniform(np.log(0.3e-3), np.log(2.5e-3), count)))
    return setups, targets


def evaluated(values, temperature: float):
    """The plan evaluated at ``temperature`` [K], or the InputError it raises (a callout out of reach there)."""
    try:
        return evaluate({**values, "temperature": temperature})
    except InputError as error:
        return error


def lapack_per_step(rows: int = 64, nodes: int = 161) -> float:
    """Seconds per case that the LAPACK calls of one ROS2 step take (``dgttrf`` once, ``dgttrs`` twice) with
    ``rows`` cases of ``nodes`` nodes laid end to end: 64 rows was the cheapest per case of 1–1000 on this machine
    (a longer system leaves the cache, a shorter one pays the call). The median of 15, on a diffusion-like,
    diagonally dominant system. Nothing else of a step is counted: this is the floor of a step however lean the
    rest, set by the elimination's own arithmetic."""
    from scipy.linalg.lapack import dgttrf, dgttrs

    n = rows * nodes
    below, above, diagonal, rhs = np.full(n - 1, -0.5), np.full(n - 1, -0.5), np.full(n, 2.0), np.ones(n)
    factors = dgttrf(below.copy(), diagonal.copy(), above.copy(), 1, 1, 1)[:5]
    factor = statistics.median(timed(lambda: dgttrf(below.copy(), diagonal.copy(), above.copy(), 1, 1, 1))
                               for _ in range(15))
    solve = statistics.median(timed(lambda: dgttrs(*factors, rhs.copy(), "N", 1)) for _ in range(15))
    return (factor + 2.0 * solve) / rows


def timed(fn) -> float:
    start = time.perf_counter()
    fn()
    return time.perf_counter() - start


def main() -> None:
    setups, targets = drawn(CASES)
    one = casedepth.setup("8620", "925C", 1.0, beta="1.5e-5cm/s")
    together = soak_times_many(setups, targets)
    alone = [soak_time_for_case_depth(s, t) for s, t in zip(setups, targets)]
    worst = max(abs(a.soak_time / b.soak_time - 1) for a, b in zip(together, alone))
    print(f"{CASES} inverse cases: batch against one by one, largest difference {worst:.1e} (relative)")

    plans = {name: load(os.path.join(EXAMPLES, file)).values() for name, file in PLANS.items()}
    compared = {**plans, "pinion (low-pressure)": load(os.path.join(EXAMPLES, "pinion-lpc.cdplan.json")).values()}
    spread = Spread()  # the default: 256 parts, the shop's tolerance bands
    times: dict[str, list[float]] = {k: [] for k in ("one inverse", f"{CASES} in one batch", f"{CASES} one by one")}
    for _ in range(REPEATS):
        times["one inverse"].append(statistics.median(timed(lambda: soak_time_for_case_depth(one, 1e-3))
                                                      for _ in range(20)))
        times[f"{CASES} in one batch"].append(timed(lambda: soak_times_many(setups, targets)))
        times[f"{CASES} one by one"].append(timed(lambda: [soak_time_for_case_depth(s, t)
                                                           for s, t in zip(setups, targets)]))
        for name, values in plans.items():
            times.setdefault(f"{name}: nominal evaluate", []).append(
                statistics.median(timed(lambda: evaluate(values)) for _ in range(3)))
            times.setdefault(f"{name}: capability", []).append(timed(lambda: capability(values, spread)))
            times.setdefault(f"{name}: capability --optimize", []).append(
                timed(lambda: capability(values, spread, optimize=True)))
        for name, values in compared.items():
            times.setdefault(f"{name}: compare temperatures", []).append(
                timed(lambda: compare_temperatures(values, COMPARED)))
            times.setdefault(f"{name}: evaluate at each temperature", []).append(
                timed(lambda: [evaluated(values, T) for T in COMPARED]))
    median = {k: statistics.median(v) for k, v in times.items()}
    print(f"\n{'':42}{'median':>12}")
    for key, value in median.items():
        print(f"{key:42}{value * 1e3:10.1f} ms")
    many = median[f"{CASES} in one batch"] / median["one inverse"]
    print(f"\n{CASES} cases in one batch / one inverse        {many:6.0f}x   (goal <= {GOAL_MANY:g}x: "
          f"{'met' if many <= GOAL_MANY else 'NOT met'})")
    print(f"{CASES} one by one / in one batch              "
          f"{median[f'{CASES} one by one'] / median[f'{CASES} in one batch']:6.1f}x")
    steps = statistics.mean(len(r.history.times) - 1 for r in alone)  # each case's march, its landing not counted
    floor = CASES * steps * lapack_per_step()
    print(f"floor: the LAPACK calls alone of {CASES} marches ({steps:.1f} steps each on average) take {floor * 1e3:.0f} "
          f"ms at best, {floor / median['one inverse']:.0f}x one inverse: the {GOAL_MANY:g}x goal is below the "
          f"elimination's own arithmetic")
    for name in plans:
        cap = median[f"{name}: capability"] / median[f"{name}: nominal evaluate"]
        opt = median[f"{name}: capability --optimize"] / median[f"{name}: nominal evaluate"]
        print(f"{name}: capability (256 parts) / nominal evaluate   {cap:6.1f}x   (goal <= {GOAL_CAPABILITY:g}x: "
              f"{'met' if cap <= GOAL_CAPABILITY else 'NOT met'})")
        print(f"{name}: capability --optimize / nominal evaluate    {opt:6.1f}x   (goal <= {GOAL_OPTIMIZE:g}x: "
              f"{'met' if opt <= GOAL_OPTIMIZE else 'NOT met'})")

    for name in compared:
        each = median[f"{name}: evaluate at each temperature"] / median[f"{name}: compare temperatures"]
        print(f"{name}: {len(COMPARED)} temperatures compared, {each:.1f}x faster than evaluating the plan at each")


if __name__ == "__main__":
    main()
