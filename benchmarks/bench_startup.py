"""Start-up: what a command costs before it does its job, against the imports it cannot avoid.

Each command runs as a whole new process (as a person starts it), interleaved with its yardsticks so
that load from other processes hits them alike; the table gives the median CPU time (user + system)
of ``REPEATS`` runs, read from the children's resource usage.

Goals (issue "fast where the user waits"): ``casedepth --help`` at most 2x ``python -c "import numpy"``,
and a solving command (``casedepth carburize …``) at most 1.3x ``python -c "import scipy.linalg"``.
After the table it shows where the solving command's time over its yardstick goes, each from one run:
casedepth's own modules' import time (``python -X importtime``, the self times summed) and how much of it is
building dataclasses (their methods are compiled from source when a class is made), the command's work in a
process that has already imported everything, and the user and system time of the command and of its
yardstick.

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


#: run in a child: the command once with the dataclass builder timed, then again with everything imported
_PROBE = """
import contextlib, dataclasses, io, sys, time
build = dataclasses._process_class
spent = [0.0, 0]
def timed(*args, **kwargs):
    start = time.perf_counter()
    try:
        return build(*args, **kwargs)
    finally:
        spent[0] += time.perf_counter() - start
        spent[1] += 1
dataclasses._process_class = timed
from casedepth import cli
with contextlib.redirect_stdout(io.StringIO()):
    cli.main(sys.argv[1:])
start = time.process_time()
with contextlib.redirect_stdout(io.StringIO()):
    cli.main(sys.argv[1:])
print(spent[0], spent[1], time.process_time() - start)
"""


def breakdown(command: list[str], yardstick: list[str]) -> None:
    """Print where ``command`` (``python -m casedepth …``) spends its time over ``yardstick``."""
    trace = subprocess.run([PY, "-X", "importtime", *command[1:]], capture_output=True, text=True, env=ENV).stderr
    own = [int(line.split("|")[0].split(":")[1]) for line in trace.splitlines()
           if line.startswith("import time:") and line.split("|")[-1].strip().startswith("casedepth")]
    building, classes, work = (float(x) for x in
                               subprocess.run([PY, "-c", _PROBE, *command[3:]], capture_output=True, text=True,
                                              env=ENV, check=True).stdout.split())
    print(f"\nwhere casedepth carburize's time goes (one run each): casedepth's {len(own)} modules import in "
          f"{sum(own) / 1e3:.0f} ms, {building * 1e3:.0f} ms of it building {classes:.0f} dataclasses; the command's "
          f"work, everything imported: {work * 1e3:.0f} ms")
    for name, cmd in (("casedepth carburize", command), ("import scipy.linalg", yardstick)):
        usage = [], []
        for _ in range(REPEATS):
            before = resource.getrusage(resource.RUSAGE_CHILDREN)
            subprocess.run(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, check=True, env=ENV)
            after = resource.getrusage(resource.RUSAGE_CHILDREN)
            usage[0].append(after.ru_utime - before.ru_utime)
            usage[1].append(after.ru_stime - before.ru_stime)
        print(f"  {name:22s} user {statistics.median(usage[0]):.3f} s, system {statistics.median(usage[1]):.3f} s "
              f"(medians of {REPEATS})")


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
    breakdown(COMMANDS["casedepth carburize"], COMMANDS["python -c 'import scipy.linalg'"])


if __name__ == "__main__":
    main()
