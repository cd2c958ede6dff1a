#!/usr/bin/env sh
# Install casedepth's desktop entry, its plan file type and its icon for the current user (or, with
# PREFIX=/usr/local as root, for everyone), so that a double-click on a *.cdplan.json opens it.
# The program itself must be installed first: `casedepth-gui` on the PATH (pip), or BIN pointing at a bundle's
# launcher (BIN=/opt/casedepth/casedepth-gui ./install-desktop-files.sh).
set -eu
here=$(cd "$(dirname "$0")" && pwd)
icons="$here/../../resources/icons"
[ -d "$icons" ] || icons="$here/icons"   # in a bundle the icons sit beside this script
prefix=${PREFIX:-${XDG_DATA_HOME:-$HOME/.local/share}}
[ "${PREFIX:-}" != "" ] && prefix="$PREFIX/share"

mkdir -p "$prefix/applications" "$prefix/mime/packages" "$prefix/metainfo"
if [ -n "${BIN:-}" ]; then
    sed "s|^Exec=casedepth-gui %f|Exec=\"$BIN\" %f|" "$here/org.casedepth.casedepth.desktop" \
        > "$prefix/applications/org.casedepth.casedepth.desktop"
else
    cp "$here/org.casedepth.casedepth.desktop" "$prefix/applications/"
fi
cp "$here/casedepth-plan.xml" "$prefix/mime/packages/"
cp "$here/org.casedepth.casedepth.metainfo.xml" "$prefix/metainfo/"
for size in 16 24 32 48 64 128 256 512; do
    mkdir -p "$prefix/icons/hicolor/${size}x${size}/apps" "$prefix/icons/hicolor/${size}x${size}/mimetypes"
    cp "$icons/casedepth-$size.png" "$prefix/icons/hicolor/${size}x${size}/apps/casedepth.png"
done
mkdir -p "$prefix/icons/hicolor/scalable/apps"
cp "$icons/casedepth.svg" "$prefix/icons/hicolor/scalable/apps/casedepth.svg"

# refresh the caches where the tools are installed (a desktop session also does it at next login)
command -v update-mime-database >/dev/null && update-mime-database "$prefix/mime" || true
command -v update-desktop-database >/dev/null && update-desktop-database "$prefix/applications" || true
command -v gtk-update-icon-cache >/dev/null && gtk-update-icon-cache -q -t "$prefix/icons/hicolor" || true
echo "installed into $prefix: double-click a *.cdplan.json to open it in casedepth"
