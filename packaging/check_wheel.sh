#!/usr/bin/env bash
# The install a user gets: build the wheel (python -m build), install it into a fresh virtual environment and run
# the command line and the window from there, away from the source tree, so that a package, data file or entry point
# missing from the wheel fails here. Run by .ci/run after the tests; takes about a minute with a warm pip cache.
set -euo pipefail
repo=$(cd "$(dirname "$0")/.." && pwd)
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT

python3 -m venv "$work/build-env"
"$work/build-env/bin/python" -m pip install --quiet build
"$work/build-env/bin/python" -m build --wheel --outdir "$work/dist" "$repo" > "$work/build.log" 2>&1 \
    || { cat "$work/build.log"; exit 1; }
wheel=$(ls "$work"/dist/casedepth-*.whl)

python3 -m venv "$work/venv"
"$work/venv/bin/python" -m pip install --quiet "$wheel"
cd "$work"  # not the source tree: what runs is what the wheel installed
bin="$work/venv/bin"
"$bin/casedepth" --version
examples=$("$bin/python" -c "from casedepth.gui.places import shipped_examples; print(shipped_examples()[0].parent)")
count=$(ls "$examples"/*.cdplan.json | wc -l)
[ "$count" -ge 4 ] || { echo "the wheel ships $count example plans, not 4"; exit 1; }
# every example gives the numbers the source tree gives (REFERENCE: a Python with the project installed from the
# source, by default the one on the PATH, as in .ci/run)
reference=${REFERENCE:-$(command -v python)}
for plan in "$examples"/*.cdplan.json; do
    "$bin/casedepth" run "$plan" --json > "$work/wheel.json"
    "$reference" -m casedepth run "$repo/resources/examples/$(basename "$plan")" --json > "$work/source.json"
    "$bin/python" - "$work/wheel.json" "$work/source.json" <<'PY'
import json, sys
wheel, source = (json.load(open(path)) for path in sys.argv[1:])
for key in ("soak_time_h", "case_depth_mm"):
    assert wheel[key] == source[key], f"{key}: {wheel[key]} from the wheel, {source[key]} from the source"
PY
    echo "ran $(basename "$plan"): the source's numbers"
done
"$bin/casedepth" steels > /dev/null
test -s "$("$bin/python" -c "from casedepth.gui.places import icon_path; print(icon_path())")"
QT_QPA_PLATFORM=offscreen "$bin/casedepth" gui "$examples/pinion-shaft.cdplan.json" --screenshot "$work/shot.png"
"$bin/python" - "$work/shot.png" <<'PY'
import sys
data = open(sys.argv[1], "rb").read()
assert data[:8] == b"\x89PNG\r\n\x1a\n" and len(data) > 20000, f"not a window's picture ({len(data)} bytes)"
print(f"window picture: {len(data)} bytes")
PY
echo "wheel install check passed: $(basename "$wheel")"
