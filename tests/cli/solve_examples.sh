#!/usr/bin/env bash
# Every shipped example case solves, and its result file reads with h5py as the
# layout contract says. Usage: solve_examples.sh MURK SOURCE_DIR
set -euo pipefail
murk="$1"; src="$2"
out="$(mktemp -d)"; trap 'rm -rf "$out"' EXIT
for case in "$src"/cases/examples/*.toml; do
  name="$(basename "$case" .toml)"
  "$murk" solve "$case" -o "$out/$name.h5" --quiet
  extra=""
  [ "$name" = fish_prey ] && extra="--fish"
  /usr/bin/python3 "$src/tests/cli/check_solve_output.py" "$out/$name.h5" $extra
done
# An existing result is not replaced without --force (exit 2, file untouched).
before="$(sha256sum "$out/fish_prey.h5")"
set +e
"$murk" solve "$src/cases/examples/fish_prey.toml" -o "$out/fish_prey.h5" 2> "$out/err.txt"
status=$?
set -e
[ "$status" -eq 2 ] || { echo "expected exit 2 for an existing output, got $status"; exit 1; }
grep -q -- "--force" "$out/err.txt" || { echo "message does not mention --force:"; cat "$out/err.txt"; exit 1; }
[ "$before" = "$(sha256sum "$out/fish_prey.h5")" ] || { echo "existing output was modified"; exit 1; }
echo "solve examples: ok"
