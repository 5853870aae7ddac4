#!/usr/bin/env bash
# Files from strangers at the command line: a mesh that claims a billion nodes, case
# values with a line break or a megabyte of text. Each gets exit status 2 and one
# line on stderr of at most 220 characters, and no output file. Usage:
# hostile_input.sh MURK SOURCE_DIR
set -uo pipefail
murk="$1"; src="$2"
dir="$(mktemp -d)"; trap 'rm -rf "$dir"' EXIT
failures=0

# expect_short NAME EXPECTED_TEXT COMMAND...
expect_short() {
  local name="$1" text="$2"; shift 2
  "$@" > "$dir/stdout" 2> "$dir/stderr"
  local status=$?
  local lines; lines=$(wc -l < "$dir/stderr")
  local longest; longest=$(awk '{ if (length($0) > n) n = length($0) } END { print n + 0 }' "$dir/stderr")
  if [ "$status" -ne 2 ] || [ "$lines" -ne 1 ] || [ "$longest" -gt 220 ] || ! grep -qF -- "$text" "$dir/stderr" ||
     [ -e "$dir/out.h5" ]; then
    echo "FAIL $name: status $status, $lines stderr lines, longest $longest characters, expected text '$text':"
    head -c 2000 "$dir/stderr"; echo
    failures=$((failures + 1))
  else
    echo "ok   $name: $(cat "$dir/stderr")"
  fi
}

printf '$MeshFormat\n4.1 0 8\n$EndMeshFormat\n$Nodes\n1 1000000000 1 1000000000\n2 1 0 1000000000\n1\n0 0 0\n$EndNodes\n' \
  > "$dir/billion.msh"
expect_short "a billion nodes claimed" "billion.msh:5: the number of nodes is 1000000000" "$murk" mesh "$dir/billion.msh"

head -c 84 /dev/zero > "$dir/empty_binary.stl"
printf '\377\377\377\377' | dd of="$dir/empty_binary.stl" bs=1 seek=80 conv=notrunc status=none
expect_short "binary STL claiming 4 billion triangles" "byte 80" "$murk" mesh "$dir/empty_binary.stl"

base="$src/cases/examples/fish_prey.toml"
grep -q '^conductivity = "100 uS/cm"' "$base" || { echo "FAIL: $base changed; this test edits its water conductivity"; exit 1; }
sed 's|^conductivity = "100 uS/cm"|conductivity = "100 uS/cm\\nsecond line"|' "$base" > "$dir/newline.toml"
expect_short "value with a line break" "water.conductivity" "$murk" solve "$dir/newline.toml" -o "$dir/out.h5"

# The value is written piecewise: a megabyte does not fit in one command-line argument.
line=$(grep -n '^conductivity = "100 uS/cm"' "$base" | head -n 1 | cut -d: -f1)
{ head -n $((line - 1)) "$base"; printf 'conductivity = "1'; head -c 1048576 /dev/zero | tr '\0' 'x'; printf '"\n'
  tail -n +$((line + 1)) "$base"; } > "$dir/megabyte.toml"
expect_short "megabyte value" "(1048577 bytes)" "$murk" solve "$dir/megabyte.toml" -o "$dir/out.h5"

# Absurd quantities, at reading time and whichever command reads them: subnormal
# numbers, magnitudes beyond what murk computes with, an object placed so far away
# that its coordinates cannot hold its shape. Before this test, these gave NaN
# results summarised as "0 V" with exit 0, or an exit 2 naming no key.
falloff="$src/cases/examples/canonical_falloff.toml"
edit() {  # edit FROM TO > FILE: one literal replacement in the canonical falloff case
  /usr/bin/python3 -c 'import sys; s = open(sys.argv[1]).read(); assert sys.argv[2] in s, sys.argv[2]
sys.stdout.write(s.replace(sys.argv[2], sys.argv[3], 1))' "$falloff" "$1" "$2"
}
edit 'conductivity = "1 S/m"' 'conductivity = "4.9e-324 S/m"' > "$dir/subnormal.toml"
expect_short "subnormal conductivity, solve" "subnormal.toml:41: object[1].conductivity:" \
  "$murk" solve "$dir/subnormal.toml" -o "$dir/out.h5"
expect_short "subnormal conductivity, run with detection" "subnormal.toml:41: object[1].conductivity:" \
  "$murk" run "$dir/subnormal.toml" -o "$dir/out.h5"
edit 'conductivity = "100 uS/cm"' 'conductivity = "1e-308 uS/cm"' > "$dir/water.toml"
expect_short "subnormal water conductivity" "water.toml:21: water.conductivity:" \
  "$murk" run "$dir/water.toml" -o "$dir/out.h5"
edit 'current = "10 uA"' 'current = "1e308 A"' > "$dir/current.toml"
expect_short "current beyond the computing range" "current.toml:29: source[1].current:" \
  "$murk" solve "$dir/current.toml" -o "$dir/out.h5"
edit 'position = ["10 mm", "0 mm", "0 mm"]' 'position = ["1e15 m", "0 mm", "0 mm"]' > "$dir/far.toml"
expect_short "object 1e15 m away" "from the origin, over 1e+06 times its size" \
  "$murk" solve "$dir/far.toml" -o "$dir/out.h5"
edit 'distance = { from = "8 mm", to = "256 mm"' 'distance = { from = "8 mm", to = "1e15 m"' > "$dir/far_sweep.toml"
expect_short "sweep distance 1e15 m" "sweep.distance" "$murk" run "$dir/far_sweep.toml" -o "$dir/out.h5"

# Command-line arguments are echoed on one printable line too.
expect_short "argument with a line break" 'unexpected\nsecond' "$murk" run "$falloff" $'unexpected\nsecond' -o "$dir/out.h5"

[ "$failures" -eq 0 ] || { echo "$failures hostile inputs misbehaved"; exit 1; }
