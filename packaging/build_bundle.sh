#!/usr/bin/env bash
# Build a self-contained one-folder bundle of casedepth (window and command line) with PyInstaller, into
# dist/casedepth/ beside the repository's root, then smoke-test it (packaging/smoke_test.sh).
#
#   ./packaging/build_bundle.sh            # uses a fresh build environment in a temporary folder
#
# PyInstaller (GPL with the bootloader exception: the bundle may be distributed under the project's own terms) is
# a build tool only; it is not a dependency of the program. The bundle carries Python, numpy, scipy, matplotlib,
# PySide6 and casedepth with its steel library, icon and example plans; the machine it runs on needs no Python.
set -euo pipefail
repo=$(cd "$(dirname "$0")/.." && pwd)
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
out="$repo/dist"

python3 -m venv "$work/env"
"$work/env/bin/python" -m pip install --quiet "$repo" "pyinstaller>=6.10"
start=$(date +%s)
"$work/env/bin/pyinstaller" --noconfirm --clean --log-level WARN \
    --name casedepth --onedir --console \
    --distpath "$out" --workpath "$work/build" --specpath "$work" \
    --collect-submodules casedepth \
    --collect-data casedepth.resources \
    --exclude-module tkinter --exclude-module pytest --exclude-module hypothesis \
    "$repo/packaging/bundle_entry.py"
# the window's launcher (what the desktop entry runs) and the desktop files with their icons
cat > "$out/casedepth/casedepth-gui" <<'SH'
#!/bin/sh
# casedepth's window: the bundle's program with "gui" (a plan file may follow); found beside this launcher, also
# through a symbolic link where readlink is at hand
self=$0
if command -v readlink >/dev/null 2>&1; then self=$(readlink -f "$0"); fi
exec "${self%/*}/casedepth" gui "$@"
SH
chmod +x "$out/casedepth/casedepth-gui"
mkdir -p "$out/casedepth/share"
cp "$repo"/packaging/linux/* "$out/casedepth/share/"
cp -r "$repo/resources/icons" "$out/casedepth/share/icons"
end=$(date +%s)
echo "built $out/casedepth in $((end - start)) s, $(du -sh "$out/casedepth" | cut -f1)"
"$repo/packaging/smoke_test.sh" "$out/casedepth"
