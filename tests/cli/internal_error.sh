#!/usr/bin/env bash
# A failed internal check reaches the user as one line on stderr,
# "murk: internal error at FILE:LINE: CONDITION (WHY)", and exit status 1, and no
# result file appears. murk fails its check at start-up when MURK_TEST_INTERNAL_ERROR
# is set (tools/murk/main.cpp): a correct murk has no other failure to show.
# Usage: internal_error.sh MURK SOURCE_DIR
set -uo pipefail
murk="$1"; src="$2"
dir="$(mktemp -d)"; trap 'rm -rf "$dir"' EXIT

MURK_TEST_INTERNAL_ERROR=1 "$murk" solve "$src/cases/examples/fish_prey.toml" -o "$dir/out.h5" --quiet \
  > "$dir/stdout" 2> "$dir/stderr"
status=$?
failures=0
fail() { echo "FAIL: $1"; failures=$((failures + 1)); }

[ "$status" -eq 1 ] || fail "exit status $status, expected 1"
[ "$(wc -l < "$dir/stderr")" -eq 1 ] || fail "stderr has $(wc -l < "$dir/stderr") lines, expected 1"
pattern='^murk: internal error at tools/murk/main\.cpp:[0-9]+: std::getenv\("MURK_TEST_INTERNAL_ERROR"\) == nullptr \(set only by the test of internal errors\)$'
grep -Eq "$pattern" "$dir/stderr" || fail "stderr is not the internal-error line"
[ ! -e "$dir/out.h5" ] && [ ! -e "$dir/out.h5.partial" ] || fail "a result file was written"
[ ! -s "$dir/stdout" ] || fail "stdout is not empty"
cat "$dir/stderr"

exit $((failures > 0))
