"""Speed of boost/diffuse planning (a measurement, not a test).

What it measures: planning the boost and diffuse times for 8620 at 925 °C, boost potential 1.15,
diffuse potential 0.80, effective case depth 1.2 mm at 0.40 %C and final surface carbon 0.80 %C
(meaning 0.75–0.85, aimed at the middle of what the two potentials can reach), isothermal, no
ramps; then the same with the demo shop's heat-up, drop and equalize counted. Median of 15 runs
after one warm-up. Goal (issue: whole furnace cycles): ≤ 150 ms on a 2-core machine.

How to run, from the repository root::

    python benchmarks/bench_cycle.py
"""

from __future__ import annotations

import statistics
import time

import casedepth
from casedepth.quote import ShopDefaults
from casedepth.recipe import plan_boost_diffuse


def timed(run, repeats: int = 15) -> tuple[float, object]:
    result = run()
    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        run()
        times.append(time.perf_counter() - start)
    return statistics.median(times), result


def main() -> None:
    setup = casedepth.setup("8620", "925C", 0.80)
    shop = ShopDefaults()
    T = setup.temperature
    cases = {
        "isothermal boost/diffuse": lambda: plan_boost_diffuse(setup, 1.2e-3, 0.80, 1.15, 0.80),
        "with heat-up, drop, equalize": lambda: plan_boost_diffuse(
            setup, 1.2e-3, 0.80, 1.15, 0.80, before=tuple(shop.before(T, 1.15)), after=tuple(shop.after(T))),
    }
    for name, run in cases.items():
        seconds, plan = timed(run)
        print(f"{name:30s} median {seconds * 1e3:6.1f} ms   boost {plan.boost_time / 3600:.3f} h, diffuse "
              f"{plan.diffuse_time / 3600:.3f} h, ECD {plan.cycle.case_depth * 1e3:.4f} mm, surface "
              f"{plan.cycle.surface_carbon:.3f} %C (aim {plan.surface_aim:.3f})   goal ≤ 150 ms")


if __name__ == "__main__":
    main()
