#!/usr/bin/env bash
# Install (or remove) the Tiltyard desktop entry and icons for the current user.
#
#   packaging/linux/install-desktop-entry.sh                 # install, Exec=tiltyard (on PATH)
#   packaging/linux/install-desktop-entry.sh --exec PATH     # install, Exec=PATH (e.g. a frozen
#                                                            #   bundle's dist/tiltyard/tiltyard)
#   packaging/linux/install-desktop-entry.sh --uninstall     # remove what install put there
#
# Files go under ${XDG_DATA_HOME:-~/.local/share}:
#   applications/tiltyard.desktop
#   icons/hicolor/<N>x<N>/apps/tiltyard.png   for N in 16 32 48 64 128 256 512
#   icons/hicolor/scalable/apps/tiltyard.svg
# Running it again overwrites the same files (idempotent); --uninstall removes only them.
# The desktop and icon caches are refreshed when their tools are installed.
set -euo pipefail

here="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
icons="$here/../icons"
# XDG Base Directory spec: an unset, empty or relative XDG_DATA_HOME means ~/.local/share
data_home="${XDG_DATA_HOME:-}"
case "$data_home" in /*) ;; *) data_home="$HOME/.local/share" ;; esac
apps_dir="$data_home/applications"
hicolor="$data_home/icons/hicolor"
sizes=(16 32 48 64 128 256 512)

usage() { awk 'NR > 1 && /^#/ { sub(/^# ?/, ""); print; next } NR > 1 { exit }' "${BASH_SOURCE[0]}"; }

mode=install
exec_cmd=""
while [ $# -gt 0 ]; do
    case "$1" in
        --uninstall) mode=uninstall ;;
        --exec)
            [ $# -ge 2 ] || { echo "install-desktop-entry: --exec needs a path" >&2; exit 2; }
            exec_cmd="$2"; shift ;;
        --exec=*) exec_cmd="${1#--exec=}" ;;
        -h|--help) usage; exit 0 ;;
        *) echo "install-desktop-entry: unknown option '$1' (see --help)" >&2; exit 2 ;;
    esac
    shift
done

refresh_caches() {
    if command -v update-desktop-database >/dev/null 2>&1; then
        update-desktop-database -q "$apps_dir" 2>/dev/null || true
    fi
    if command -v gtk-update-icon-cache >/dev/null 2>&1 && [ -f "$hicolor/index.theme" ]; then
        gtk-update-icon-cache -q -t "$hicolor" 2>/dev/null || true
    fi
}

if [ "$mode" = uninstall ]; then
    rm -f "$apps_dir/tiltyard.desktop"
    for n in "${sizes[@]}"; do
        rm -f "$hicolor/${n}x${n}/apps/tiltyard.png"
    done
    rm -f "$hicolor/scalable/apps/tiltyard.svg"
    refresh_caches
    echo "removed the Tiltyard desktop entry and icons from $data_home"
    exit 0
fi

if [ -n "$exec_cmd" ]; then
    case "$exec_cmd" in
        /*) ;;
        *) exec_cmd="$(cd "$(dirname "$exec_cmd")" && pwd)/$(basename "$exec_cmd")" ;;
    esac
    [ -x "$exec_cmd" ] || { echo "install-desktop-entry: --exec $exec_cmd: not an executable file" >&2; exit 2; }
    if [[ "$exec_cmd" =~ [^A-Za-z0-9._/+-] ]]; then
        echo "install-desktop-entry: --exec $exec_cmd: use a path of letters, digits and ._/+- only" >&2
        exit 2
    fi
elif ! command -v tiltyard >/dev/null 2>&1; then
    echo "install-desktop-entry: note: 'tiltyard' is not on PATH now; the entry runs 'tiltyard %f'" \
         "(use --exec PATH to name the program)" >&2
fi

for n in "${sizes[@]}"; do
    [ -f "$icons/tiltyard-$n.png" ] || { echo "install-desktop-entry: missing $icons/tiltyard-$n.png (run packaging/make_icons.py)" >&2; exit 1; }
done

mkdir -p "$apps_dir"
tmp="$(mktemp "$apps_dir/.tiltyard.desktop.XXXXXX")"
if [ -n "$exec_cmd" ]; then
    sed "s|^Exec=tiltyard |Exec=$exec_cmd |" "$here/tiltyard.desktop" >"$tmp"
else
    cp "$here/tiltyard.desktop" "$tmp"
fi
chmod 644 "$tmp"
mv -f "$tmp" "$apps_dir/tiltyard.desktop"

for n in "${sizes[@]}"; do
    install -D -m 644 "$icons/tiltyard-$n.png" "$hicolor/${n}x${n}/apps/tiltyard.png"
done
install -D -m 644 "$icons/tiltyard.svg" "$hicolor/scalable/apps/tiltyard.svg"
refresh_caches
echo "installed the Tiltyard desktop entry in $apps_dir and icons in $hicolor"
