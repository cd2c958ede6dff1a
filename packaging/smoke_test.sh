#!/usr/bin/env bash
# Smoke test of a built bundle (packaging/build_bundle.sh): the window starts offscreen on an example plan and
# writes its picture (exit code 0, a PNG of a real window), and the bundled command line gives the same numbers as
# the installed package (REFERENCE: a Python with casedepth installed, by default the one on the PATH).
#
#   ./packaging/smoke_test.sh dist/casedepth
set -euo pipefail
bundle=$(cd "${1:?give the bundle folder, e.g. dist/casedepth}" && pwd)
repo=$(cd "$(dirname "$0")/.." && pwd)
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
plan="$repo/resources/examples/pinion-shaft.cdplan.json"
reference=${REFERENCE:-$(command -v python3)}

# run with no Python of the system's in reach: an empty PATH but the bundle's, no PYTHON* variables
clean=(env -i HOME="$work" PATH="$bundle" QT_QPA_PLATFORM=offscreen LANG=C.UTF-8)
"${clean[@]}" "$bundle/casedepth-gui" "$plan" --screenshot "$work/shot.png"
"$reference" - "$work/shot.png" <<'PY'
import sys
data = open(sys.argv[1], "rb").read()
assert data[:8] == b"\x89PNG\r\n\x1a\n" and len(data) > 20000, f"not a window's picture ({len(data)} bytes)"
print(f"bundle window picture: {len(data)} bytes")
PY
"${clean[@]}" "$bundle/casedepth" run "$plan" --json > "$work/bundle.json"
"$reference" -m casedepth run "$plan" --json > "$work/package.json"
"$reference" - "$work/bundle.json" "$work/package.json" <<'PY'
import json, sys
bundle, package = (json.load(open(path)) for path in sys.argv[1:])
for key in ("soak_time_h", "case_depth_mm", "surface_carbon_pct"):
    assert bundle[key] == package[key], f"{key}: {bundle[key]} in the bundle, {package[key]} installed"
print(f"bundle command line: soak {bundle['soak_time_h']:.4f} h, as installed")
PY
echo "smoke test passed: $bundle"
