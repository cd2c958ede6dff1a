"""Speed of the inverse nitriding solve (a measurement, not a test).

What it measures: the soak for a nitrided hardness depth of 0.4 mm (core + 50 HV) on 4140 at 520 °C,
K_N 3, with the compound layer and the K_N for a 5–10 µm layer; then the two-stage schedule (K_N 8, then
just above α/γ′) that brings the layer into 2–5 µm. Median of 25 runs after a warm-up, with the cache of
compound-layer constants emptied before each run.

How to run, from the repository root::

    python benchmarks/bench_nitriding.py
"""

from __future__ import annotations

import statistics
import time

from casedepth.nitriding.layer import parabolic_constants
from casedepth.nitriding import NitridingSetup, nitriding_time, potential_for_compound_layer, two_stage_schedule
from casedepth.models.steels import find


def median_ms(run) -> tuple[float, object]:
    run()
    times = []
    for _ in range(25):
        parabolic_constants.cache_clear()
        start = time.perf_counter()
        out = run()
        times.append(time.perf_counter() - start)
    return statistics.median(times) * 1e3, out


def main() -> None:
    setup = NitridingSetup(find("4140"), 520 + 273.15, 3.0)

    def inverse():
        result = nitriding_time(setup, 0.4e-3)
        return result, potential_for_compound_layer(setup, result.time, (5e-6, 10e-6))

    ms, (result, kn) = median_ms(inverse)
    print(f"inverse nitriding solve: median {ms:.2f} ms  (time {result.time / 3600:.2f} h, "
          f"compound layer {result.compound_layer * 1e6:.1f} µm, K_N for 5–10 µm {kn:.2f})")

    high = NitridingSetup(find("4140"), 520 + 273.15, 8.0)
    total = nitriding_time(high, 0.4e-3).time
    ms, two = median_ms(lambda: two_stage_schedule(high, total, (2e-6, 5e-6)))
    print(f"two-stage schedule: median {ms:.1f} ms  ({two.first_time / 3600:.1f} h at K_N {two.first_kn:g}, then "
          f"{two.second_time / 3600:.1f} h at K_N {two.second_kn:.2f}; layer {two.layer.describe()})")


if __name__ == "__main__":
    main()
