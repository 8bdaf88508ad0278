#!/usr/bin/env bash
# Runs the workbench under a virtual X server and saves a screenshot.
# usage: scripts/screenshot.sh BINARY OUT.png [SECONDS] [ARGS...]
set -euo pipefail
bin=$1 out=$2 wait=${3:-6}
shift 3 2>/dev/null || shift $#
# A state directory of its own: the window is killed, not closed, and its
# autosave would otherwise offer itself for recovery on the next start.
XDG_STATE_HOME=$(mktemp -d)
export XDG_STATE_HOME
trap 'rm -rf "$XDG_STATE_HOME"' EXIT
xvfb-run -a -s '-screen 0 1280x800x24' bash -c "
  '$bin' $* &
  pid=\$!
  sleep $wait
  /usr/bin/import -window root '$out'
  kill \$pid
"
echo "wrote $out"
