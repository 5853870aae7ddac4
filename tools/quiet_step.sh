# Sourced by the set-up scripts: runs one long step (a build, a test run) with its
# whole output in a log file, and shows only how far it has got, so that a first
# build prints a few lines instead of tens of thousands of compiler messages.

# quiet_step LOG COMMAND...
# Appends COMMAND's output (stdout and stderr) to LOG and prints " 10% 20% ..." on
# the current line as the percentage found in that output passes each tenth: make's
# "[ 42%]" prefix while building, CTest's " 17/250 Test" while testing. Returns
# COMMAND's exit status.
quiet_step() {
  local log="$1"
  shift
  local status
  set +e
  "$@" 2>&1 | {
    local shown=0 line pct
    while IFS= read -r line; do
      printf '%s\n' "$line" >> "$log"
      pct=""
      if [[ $line =~ ^\[\ *([0-9]+)%\] ]]; then
        pct=${BASH_REMATCH[1]}
      elif [[ $line =~ ^\ *([0-9]+)/([0-9]+)\ Test ]]; then
        pct=$(( 100 * BASH_REMATCH[1] / BASH_REMATCH[2] ))
      fi
      if [ -n "$pct" ] && (( pct >= shown + 10 )); then
        shown=$(( pct / 10 * 10 ))
        printf ' %d%%' "$shown"
      fi
    done
  }
  status=${PIPESTATUS[0]}
  set -e
  return "$status"
}

# show_log_tail LOG WHAT
# Ends the progress line and shows the last 40 lines of LOG after a failure of WHAT.
show_log_tail() {
  echo
  echo "$2 failed; the last 40 lines of $1:" >&2
  tail -n 40 "$1" >&2
}

# elapsed SECONDS_AT_START: " (1 min 05 s)", the time since then.
elapsed() {
  local s=$(( SECONDS - $1 ))
  if (( s >= 60 )); then printf ' (%d min %02d s)' $(( s / 60 )) $(( s % 60 )); else printf ' (%d s)' "$s"; fi
}
