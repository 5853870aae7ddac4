#!/usr/bin/env bash
# Fuzzes the file readers: builds the libFuzzer targets fuzz_stl, fuzz_msh and
# fuzz_case (tests/fuzz/) with clang, AddressSanitizer and UndefinedBehaviorSanitizer
# in build-fuzz/, then runs each for SECONDS seconds, starting from the seed files in
# tests/fuzz/corpus/<target>/. Prints the executions per target. An input that
# crashes a reader, trips a sanitizer, lets an exception other than InputError
# escape, runs longer than 10 s or needs more than 2 GB is a finding: it is saved
# as build-fuzz/findings/<target>-* and the script exits 1.
#
#   bash tools/fuzz.sh          # about 20 s per target, a minute in all (CI)
#   bash tools/fuzz.sh 600      # ten minutes per target, for a deeper search
#
# Installs clang and libFuzzer from Debian when they are missing; the project's
# other packages come from tools/setup.sh. Inputs the fuzzer finds interesting
# accumulate in build-fuzz/corpus/<target>/ and are reused by the next run.
set -euo pipefail
root="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
seconds="${1:-20}"
[[ "$seconds" =~ ^[0-9]+$ ]] && [ "$seconds" -gt 0 ] || { echo "usage: bash tools/fuzz.sh [SECONDS per target]" >&2; exit 2; }
build="$root/build-fuzz"
targets=(stl msh case)

missing=()
for p in clang libfuzzer-14-dev; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
if [ ${#missing[@]} -gt 0 ]; then
  echo "fuzz: installing ${missing[*]}"
  sudo_cmd=""
  [ "$(id -u)" -ne 0 ] && sudo_cmd="sudo"
  $sudo_cmd apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $sudo_cmd apt-get install -y -qq --no-install-recommends "${missing[@]}"
fi

mkdir -p "$build"
# Debug: no -DNDEBUG, so assertions stay on; the fuzzed libraries add -O1.
if ! CC=clang CXX=clang++ cmake -S "$root" -B "$build" -DMURK_FUZZ=ON -DMURK_TESTS=OFF -DCMAKE_BUILD_TYPE=Debug \
     > "$build/configure.log" 2>&1; then
  cat "$build/configure.log"
  echo "fuzz: configuring failed; tools/setup.sh installs the libraries murk needs" >&2
  exit 1
fi
cmake --build "$build" -j 2 --target "${targets[@]/#/fuzz_}" > "$build/build.log" 2>&1 || { tail -40 "$build/build.log"; exit 1; }

# Mesh files named in fuzzed case files are looked for in this empty folder.
work="$build/run"
mkdir -p "$work" "$build/findings"
failed=0
echo "fuzz: $seconds s per target"
for t in "${targets[@]}"; do
  mkdir -p "$build/corpus/$t"
  log="$build/fuzz_$t.log"
  # The first corpus folder receives new inputs; the seeds in the repository stay as they are.
  if (cd "$work" && "$build/tests/fuzz/fuzz_$t" "$build/corpus/$t" "$root/tests/fuzz/corpus/$t" \
        -dict="$root/tests/fuzz/$t.dict" -max_total_time="$seconds" -timeout=10 -rss_limit_mb=2048 \
        -max_len=16384 -print_final_stats=1 -artifact_prefix="$build/findings/$t-") > "$log" 2>&1; then
    status=ok
  else
    status=FINDING
    failed=1
  fi
  runs=$(sed -n 's/^stat::number_of_executed_units: *//p' "$log" | tail -n 1)
  echo "fuzz_$t: ${runs:-?} executions in $seconds s, $(ls "$build/corpus/$t" | wc -l) inputs in the corpus: $status"
  if [ "$status" != ok ]; then
    grep -E "^(==[0-9]+==ERROR|SUMMARY|fuzz: |.*runtime error|artifact_prefix|Test unit written)" "$log" | head -n 10
    echo "  (log: $log)"
  fi
done
[ "$failed" -eq 0 ] || { echo "fuzz: findings in build-fuzz/findings/; add each to tests/fuzz/corpus and fix the reader"; exit 1; }
