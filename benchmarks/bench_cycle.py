"""Speed of boost/diffuse planning (a measurement, not a test).

What it measures: planning the boost and diffuse times for 8620 at 925 °C, boost potential 1.15,
diffuse potential 0.80, effective case depth 1.2 mm at 0.40 %C and final surface carbon 0.80 %C
(meaning 0.75–0.85, aimed at the middle of what the two potentials can reach), isothermal, no
ramps; then the same with the demo shop's heat-up, drop and equalize counted; then a single soak at
potential 1.00 for 0.8, 1.0 and 1.2 mm with those shop stages counted (what the window solves in its
one-soak mode); then a new plan through the whole evaluation path (what every edit costs); then a
32 mm 8620 shaft at 50 HRC with surface and core windows evaluated with the hardness read from the
quench and with the first release's fixed relation, side by side (the quench through the section, the
threshold's carbon and the structure at every depth; issue: hardness from hardenability, goal: at
most 10 ms more). Median of 15 runs after one warm-up. Goal (issue: whole furnace cycles): ≤ 150 ms
on a 2-core machine.

How to run, from the repository root::

    python benchmarks/bench_cycle.py
"""

from __future__ import annotations

import statistics
import time

import casedepth
from casedepth.carburizing.cycle import shop_stages
from casedepth.carburizing.planners import plan_boost_diffuse, plan_single_soak
from casedepth.shop.quote import ShopDefaults


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
    boost_before, after = shop_stages(shop, T, 1.15)
    soak_before, _ = shop_stages(shop, T, 1.0)
    cases = {
        "isothermal boost/diffuse": lambda: plan_boost_diffuse(setup, 1.2e-3, 0.80, 1.15, 0.80),
        "with heat-up, drop, equalize": lambda: plan_boost_diffuse(
            setup, 1.2e-3, 0.80, 1.15, 0.80, before=boost_before, after=after),
    }
    for name, run in cases.items():
        seconds, plan = timed(run)
        print(f"{name:30s} median {seconds * 1e3:6.1f} ms   boost {plan.boost_time / 3600:.3f} h, diffuse "
              f"{plan.diffuse_time / 3600:.3f} h, ECD {plan.cycle.case_depth * 1e3:.4f} mm, surface "
              f"{plan.cycle.surface_carbon:.3f} %C (aim {plan.surface_aim:.3f})   goal ≤ 150 ms")
    soak_setup = casedepth.setup("8620", "925C", 1.00)
    seconds, plan = timed(lambda: plan_single_soak(soak_setup, [0.8e-3, 1.0e-3, 1.2e-3], soak_before, after))
    print(f"{'single soak, shop stages':30s} median {seconds * 1e3:6.1f} ms   soaks "
          f"{', '.join(f'{t / 3600:.3f}' for t in plan.soak_times)} h for 0.8, 1.0, 1.2 mm; ECD "
          f"{plan.cycle.case_depth * 1e3:.4f} mm")
    new_plan = casedepth.Plan()
    seconds, outcome = timed(lambda: casedepth.evaluate(new_plan))
    print(f"{'a new plan, evaluated':30s} median {seconds * 1e3:6.1f} ms   soak {outcome.soak_time / 3600:.3f} h "
          f"(the window's default: one soak, shop stages counted; the whole evaluation path)")
    shaft = dict(threshold_kind="HRC", threshold_value=50.0, shape="cylinder", size=32e-3, surface_hrc_min=58.0,
                 surface_hrc_max=62.0, core_hrc_min=30.0, core_hrc_max=40.0)
    timings = {}
    for relation in ("tempered", "structure-2026", "tempered", "structure-2026"):  # interleaved
        plan = casedepth.Plan()
        plan.update(hardness_relation=relation, **shaft)

        def run():
            outcome = casedepth.evaluate(plan)
            outcome.view()  # the hardness profile the window draws
            return outcome

        seconds, outcome = timed(run)
        timings.setdefault(relation, []).append(seconds)
    fixed, structure = min(timings["tempered"]), min(timings["structure-2026"])
    print(f"{'50 HRC shaft, fixed relation':30s} median {fixed * 1e3:6.1f} ms")
    print(f"{'50 HRC shaft, from the quench':30s} median {structure * 1e3:6.1f} ms   (+{(structure - fixed) * 1e3:.1f} ms; "
          f"goal ≤ +10 ms)")


if __name__ == "__main__":
    main()
