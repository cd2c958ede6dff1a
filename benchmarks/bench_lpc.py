"""Low-pressure carburizing: how long planning a pulse table takes, against one run of an independent solver.

What it measures, in one run, each the median of ``REPEATS`` interleaved repeats (8620, 950 °C, acetylene at
150 g/(m²·h), 1.0 mm at 0.40 %C, surface 0.70–0.80 %C, the shop's drop to 845 °C and equalize counted):

* planning the table with 6 pulses (``--pulses 6``), and with the fewest pulses whose boosts hold the limit
  3 min at most (the default), through ``casedepth.evaluate`` (the whole plan: table, the one-pulse-fewer
  alternative, hardness, quote);
* one forward run of the planned 6-pulse table (``run_pulses``);
* the same table run once by the independent method-of-lines peer of the tests (``tests/lpc_peer.py``: scipy
  ``solve_ivp`` BDF, 400 graded cells), as the peer in the same run.

Goal (issue "low-pressure carburizing"): planning a 1.0 mm schedule in at most ``GOAL_MS``.

How to run, from the repository root::

    python benchmarks/bench_lpc.py
"""

from __future__ import annotations

import os
import statistics
import sys
import time
from dataclasses import replace

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.join(os.path.dirname(HERE), "tests"))

import casedepth  # noqa: E402
from casedepth.lpc.planner import run_pulses  # noqa: E402
from casedepth.plan import evaluate  # noqa: E402
from lpc_peer import run_pulses as peer_run  # noqa: E402

REPEATS = 5
GOAL_MS = 300.0


def timed(fn) -> float:
    start = time.perf_counter()
    fn()
    return time.perf_counter() - start


def main() -> None:
    options = dict(steel="8620", temperature="950C", target="1.0mm", surface_target="0.70-0.80")
    six = casedepth.plan("lpc", pulses=6, **options)
    fewest = casedepth.plan("lpc", **options)
    planned = evaluate(six)
    lpc, pulses = planned.setup, planned.run.pulses
    bare = replace(lpc, drop_time=0.0, equalize_time=0.0, hardening_temperature=lpc.temperature)
    table = [(p.boost, p.diffuse) for p in pulses]
    ours = run_pulses(bare, pulses)
    peer = peer_run(bare.carbon.diffusivity, bare.temperature, bare.steel.carbon, bare.limit, bare.influx, table)
    print(f"6-pulse table: depth {ours.case_depth * 1e3:.4f} mm (peer {peer.depth_at(bare.threshold_carbon) * 1e3:.4f}), "
          f"surface {ours.surface_carbon:.4f} %C (peer {peer.surface_carbon:.4f}), pulses alone")
    times: dict[str, list[float]] = {"plan, 6 pulses": [], "plan, fewest that fit": [], "one run of the table": [],
                                     "peer: one run of the table": []}
    for _ in range(REPEATS):
        times["plan, 6 pulses"].append(timed(lambda: evaluate(six)))
        times["plan, fewest that fit"].append(timed(lambda: evaluate(fewest)))
        times["one run of the table"].append(timed(lambda: run_pulses(bare, pulses)))
        times["peer: one run of the table"].append(timed(lambda: peer_run(bare.carbon.diffusivity, bare.temperature,
                                                                          bare.steel.carbon, bare.limit, bare.influx,
                                                                          table)))
    median = {k: statistics.median(v) for k, v in times.items()}
    print(f"\n{'':32}{'median':>10}")
    for key, value in median.items():
        print(f"{key:32}{value * 1e3:8.1f} ms")
    print(f"\nthe peer takes {median['peer: one run of the table'] / median['one run of the table']:.0f}x casedepth's "
          f"time for one run of the table")
    for key in ("plan, 6 pulses", "plan, fewest that fit"):
        ms = median[key] * 1e3
        print(f"{key}: {ms:.0f} ms (goal <= {GOAL_MS:g} ms: {'met' if ms <= GOAL_MS else 'NOT met'})")


if __name__ == "__main__":
    main()
