# Sourced by command-line tests that check murk's refusals (not a test itself: CTest runs
# tests/cli/*.sh only). The caller sets `dir` (a scratch folder) and `failures` (a count).
#
# expect_bad NAME TEXT COMMAND...: COMMAND must exit with status 2 and write exactly one line
# to stderr, containing TEXT. Prints "ok" with the line, or "FAIL" with what came instead
# (and counts the failure).
expect_bad() {
  local name="$1" text="$2"; shift 2
  "$@" > /dev/null 2> "$dir/err"
  local status=$? lines; lines=$(wc -l < "$dir/err")
  if [ "$status" -ne 2 ] || [ "$lines" -ne 1 ] || ! grep -qF -- "$text" "$dir/err"; then
    echo "FAIL $name: status $status, $lines lines:"; cat "$dir/err"; failures=$((failures + 1))
  else
    echo "ok   $name: $(cat "$dir/err")"
  fi
}
