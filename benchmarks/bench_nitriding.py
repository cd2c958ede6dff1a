"""Speed of the inverse nitriding solve, side by side with an independent peer (a measurement, not a test).

What it measures: the soak for a nitrided hardness depth of 0.4 mm (core + 50 HV) on 4140 at 520 °C,
K_N 3, with the compound layer and the K_N for a 5–10 µm layer, from a fresh ``NitridingSetup`` each run
(the setup caches its diffusion zone, so the zone's similarity solution is shot every run); then the
two-stage schedule (K_N 8, then just above α/γ′) that brings the layer into 2–5 µm; then the same soak
from the peer (:mod:`peer_nitriding`: the diffusion–precipitation zone by the method of lines in real
depth and time, ``solve_ivp`` BDF with a tridiagonal ``jac_sparsity``). The peer uses self-similarity:
one run to a reference time (30 h) gives the zone's depth/√t and its nitrogen uptake, the compound layer's
√t constant comes from the setup's layer model at that uptake, and the soak is (target / (k_layer +
rate))², as ``nitriding_time`` does with its own zone. The peer's setup has its zone built beforehand
(the peer only reads the grade's hardness relation from it), so the peer's time is its own work.

Peer grid: 25 uniform cells down to 1.2 × the no-precipitation depth of the hardness limit, then cells
growing by 8 % to eight diffusion lengths (58 cells in all), rtol 1e-3: the coarsest of a
ladder (8, 12, 16, 25, 50 cells; rtol 1e-3 and 1e-4) whose depth stays within 0.5 % of the converged peer with margin
(when written: 25 cells −0.02 %, 16 cells −0.3 %, 12 cells −0.5 %, 8 cells −1.7 %; the error of a front
crossing the cells is not monotone, so the margin matters). The run prints the check: the same
peer at 50 cells, and a fine peer (200 cells, rtol 1e-6).

Medians of 25 runs (the peer: 11) after a warm-up, with the cache of compound-layer constants emptied
before each run. It takes about 5 s.

How to run, from the repository root::

    python benchmarks/bench_nitriding.py
"""

from __future__ import annotations

import math
import os
import statistics
import sys
import time

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))

from casedepth.nitriding.layer import parabolic_constants  # noqa: E402
from casedepth.nitriding import (NitridingSetup, nitriding_time, potential_for_compound_layer,  # noqa: E402
                                 two_stage_schedule)
from casedepth.models.steels import find  # noqa: E402
from peer_nitriding import peer_depth_rate, peer_nitriding_time  # noqa: E402

TEMPERATURE = 520 + 273.15  # K
TARGET = 0.4e-3  # m, nitrided hardness depth
REFERENCE_HOURS = 30.0  # h, the peer's one run (any time serves: the zone is self-similar)
PEER_CELLS, PEER_RTOL = 25, 1e-3
CHECK_CELLS, CHECK_RTOL = 200, 1e-6  # the fine peer, for the accuracy check only
TOLERANCE = 0.5  # %, depth accuracy both must meet
GOAL_MS, GOAL_RATIO = 30.0, 5.0  # the goal: inverse ≤ 30 ms and ≥ 5× faster than the peer


def median_ms(run, repeats: int = 25) -> tuple[float, object]:
    run()
    times = []
    for _ in range(repeats):
        parabolic_constants.cache_clear()
        start = time.perf_counter()
        out = run()
        times.append(time.perf_counter() - start)
    return statistics.median(times) * 1e3, out


def main() -> None:
    def inverse():
        setup = NitridingSetup(find("4140"), TEMPERATURE, 3.0)  # fresh: the zone is solved every run
        result = nitriding_time(setup, TARGET)
        return setup, result, potential_for_compound_layer(setup, result.time, (5e-6, 10e-6))

    ms, (setup, result, kn) = median_ms(inverse)
    print(f"inverse nitriding solve: median {ms:.2f} ms  (time {result.time / 3600:.2f} h, "
          f"compound layer {result.compound_layer * 1e6:.1f} µm, K_N for 5–10 µm {kn:.2f})")

    high = NitridingSetup(find("4140"), TEMPERATURE, 8.0)
    total = nitriding_time(high, TARGET).time
    ms2, two = median_ms(lambda: two_stage_schedule(high, total, (2e-6, 5e-6)))
    print(f"two-stage schedule: median {ms2:.1f} ms  ({two.first_time / 3600:.1f} h at K_N {two.first_kn:g}, then "
          f"{two.second_time / 3600:.1f} h at K_N {two.second_kn:.2f}; layer {two.layer.describe()})")

    peer_setup = NitridingSetup(find("4140"), TEMPERATURE, 3.0)
    peer_setup.zone  # built here: the peer reads only the hardness relation from it
    peer_ms, (peer_time, run) = median_ms(
        lambda: peer_nitriding_time(peer_setup, TARGET, REFERENCE_HOURS, PEER_CELLS, PEER_RTOL), repeats=11)
    print(f"peer (method of lines, {PEER_CELLS} uniform cells, {run.cells} in all, rtol {PEER_RTOL:g}): median "
          f"{peer_ms:.1f} ms  (time {peer_time / 3600:.2f} h; {run.steps} BDF steps, {run.nfev} f-evals, "
          f"{run.njev} Jacobians)")

    # accuracy: zone depth/√t of the project, the peer as timed, the peer at twice the cells, a fine peer
    project_rate = setup.zone.depth_rate()
    halved = peer_depth_rate(peer_setup, REFERENCE_HOURS, 2 * PEER_CELLS, PEER_RTOL)
    fine = peer_depth_rate(peer_setup, REFERENCE_HOURS, CHECK_CELLS, CHECK_RTOL)

    def pct(a, b):
        return 100.0 * (a / b - 1.0)

    print(f"zone depth/√t [µm/√h]: project {project_rate * 6e7:.4f}, peer {run.rate * 6e7:.4f} "
          f"({pct(run.rate, project_rate):+.3f} %); peer at {2 * PEER_CELLS} cells "
          f"{pct(halved.rate, project_rate):+.3f} %, "
          f"fine peer ({CHECK_CELLS} cells, rtol {CHECK_RTOL:g}) {pct(fine.rate, project_rate):+.3f} %")
    k_peer = setup.layer.constants(float(setup.temperature), float(setup.nitriding_potential), run.uptake)[1]
    peer_depth = (k_peer + run.rate) * math.sqrt(result.time)
    depth_diff = pct(peer_depth, result.nitrided_depth)
    print(f"nitrided depth at the project's soak: project {result.nitrided_depth * 1e3:.4f} mm, peer "
          f"{peer_depth * 1e3:.4f} mm ({depth_diff:+.3f} %); soak difference {pct(peer_time, result.time):+.3f} %")
    ratio = peer_ms / ms
    accurate = abs(pct(run.rate, fine.rate)) <= TOLERANCE and abs(pct(project_rate, fine.rate)) <= TOLERANCE
    print(f"ratio peer/project: {ratio:.1f}; both within {TOLERANCE:g} % of the fine peer: "
          f"{'yes' if accurate else 'NO'}")
    met = ms <= GOAL_MS and ratio >= GOAL_RATIO and accurate
    print(f"goal, project inverse ≤ {GOAL_MS:g} ms and ≥ {GOAL_RATIO:g}x faster than the peer at {TOLERANCE:g} % "
          f"depth accuracy: {'met' if met else 'NOT met'}")


if __name__ == "__main__":
    main()
