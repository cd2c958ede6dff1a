"""Speed of the inverse nitriding solve (a measurement, not a test).

What it measures: the soak for a nitrided hardness depth of 0.4 mm (core + 50 HV) on 4140 at 520 °C,
K_N 3, with the compound layer and the K_N for a 5–10 µm layer; median of 25 runs after a warm-up.

How to run, from the repository root::

    python benchmarks/bench_nitriding.py
"""

from __future__ import annotations

import statistics
import time

from casedepth.nitriding import NitridingSetup, nitriding_time, potential_for_compound_layer
from casedepth.steels import find


def main() -> None:
    setup = NitridingSetup(find("4140"), 520 + 273.15, 3.0)

    def run():
        result = nitriding_time(setup, 0.4e-3)
        return result, potential_for_compound_layer(setup, result.time, (5e-6, 10e-6))

    run()
    times = []
    for _ in range(25):
        start = time.perf_counter()
        result, kn = run()
        times.append(time.perf_counter() - start)
    print(f"inverse nitriding solve: median {statistics.median(times) * 1e3:.2f} ms  (time {result.time / 3600:.2f} h, "
          f"compound layer {result.compound_layer * 1e6:.1f} µm, K_N for 5–10 µm {kn:.2f})")


if __name__ == "__main__":
    main()
