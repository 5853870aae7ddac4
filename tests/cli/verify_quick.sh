#!/usr/bin/env bash
# `murk verify --quick` passes every check and ends with the line "N passed, 0 failed".
set -euo pipefail
murk="$1"
out="$(mktemp)"; trap 'rm -f "$out"' EXIT
"$murk" verify --quick > "$out"
cat "$out"
last="$(tail -n 1 "$out")"
[[ "$last" =~ ^[0-9]+\ passed,\ 0\ failed$ ]] || { echo "unexpected last line: $last"; exit 1; }
