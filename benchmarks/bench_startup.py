"""Start-up: what a command costs before it does its job, against the imports it cannot avoid.

Each command runs as a whole new process (as a person starts it), interleaved with its yardsticks so
that load from other processes hits them alike; the table gives the median CPU time (user + system)
of ``REPEATS`` runs, read from the children's resource usage.

Goals (issue "fast where the user waits"): ``casedepth --help`` at most 2x ``python -c "import numpy"``,
and a solving command (``casedepth carburize …``) at most 1.3x ``python -c "import scipy.linalg"``.
``python -X importtime -m casedepth …`` shows where the rest goes.

How to run, from the repository root::

    python benchmarks/bench_startup.py
"""

from __future__ import annotations

import os
import resource
import statistics
import subprocess
import sys

REPEATS = 9
PY = sys.executable
#: an installed program runs from its byte-code cache; a shell that forbids writing it would time the compiler
ENV = {key: value for key, value in os.environ.items() if key != "PYTHONDONTWRITEBYTECODE"}
COMMANDS = {
    "python -c 'import numpy'": [PY, "-c", "import numpy"],
    "python -c 'import scipy.linalg'": [PY, "-c", "import scipy.linalg"],
    "casedepth --help": [PY, "-m", "casedepth", "--help"],
    "casedepth steels": [PY, "-m", "casedepth", "steels"],
    "casedepth probe": [PY, "-m", "casedepth", "probe", "--temperature", "925C", "--mv", "1150"],
    "casedepth carburize": [PY, "-m", "casedepth", "carburize", "--steel", "8620", "--temperature", "925C",
                            "--potential", "1.0", "--target", "1.0mm"],
}


def cpu_seconds(command: list[str]) -> float:
    """CPU time (user + system) [s] of one run of ``command`` to its end."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    subprocess.run(command, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, check=True, env=ENV)
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    return (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)


def main() -> None:
    for command in COMMANDS.values():  # warm the file cache and write the byte-code, as an installed program has it
        subprocess.run(command, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, check=True, env=ENV)
    times: dict[str, list[float]] = {name: [] for name in COMMANDS}
    for _ in range(REPEATS):
        for name, command in COMMANDS.items():
            times[name].append(cpu_seconds(command))
    median = {name: statistics.median(ts) for name, ts in times.items()}
    print(f"{'command':34s} {'CPU s (median of ' + str(REPEATS) + ')':>24s}")
    for name, value in median.items():
        print(f"{name:34s} {value:24.3f}")
    numpy_s, linalg_s = median["python -c 'import numpy'"], median["python -c 'import scipy.linalg'"]
    help_ratio = median["casedepth --help"] / numpy_s
    solve_ratio = median["casedepth carburize"] / linalg_s
    print(f"\ncasedepth --help: {help_ratio:.2f}x import numpy; goal at most 2x: {'met' if help_ratio <= 2 else 'NOT met'}")
    print(f"casedepth carburize: {solve_ratio:.2f}x import scipy.linalg; goal at most 1.3x: "
          f"{'met' if solve_ratio <= 1.3 else 'NOT met'}")


if __name__ == "__main__":
    main()
