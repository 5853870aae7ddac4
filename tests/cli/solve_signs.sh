#!/usr/bin/env bash
# murk solve's summary keeps the sign of what it prints where the sign means something (an
# electrode driven with -1 mA sits at a negative potential; the sign of an electric image tells
# a conductor from an insulator): real cases print the signed value, complex cases the magnitude
# and the phase. Every number printed is compared with the result file as h5py reads it.
# Usage: solve_signs.sh MURK SOURCE_DIR
set -uo pipefail
murk="$1"; src="$2"
py=/usr/bin/python3   # Debian's Python: the one that sees h5py
dir="$(mktemp -d)"; trap 'rm -rf "$dir"' EXIT
failures=0
for case in robot_capsule membrane_sphere fish_prey; do
  "$murk" solve "$src/cases/examples/$case.toml" -o "$dir/$case.h5" > "$dir/$case.txt" 2> "$dir/err.txt" \
    || { cat "$dir/err.txt"; echo "murk solve $case failed"; exit 1; }
done

"$py" - "$dir" <<'PY' || failures=$((failures + 1))
import cmath, math, os, re, sys
import h5py
import numpy as np

d = sys.argv[1]
bad = []
NUMBER = r"(-?[0-9.]+(?:e[-+]?[0-9]+)?)"

def close(printed, exact, digits):
    """printed came from exact by printf with `digits` significant digits."""
    return math.isclose(float(printed), exact, rel_tol=10.0 ** (1 - digits), abs_tol=1e-300)

# Real: robot_capsule drives its front emitter with +1 mA and its rear one with -1 mA (the case
# file); the rear one must print a negative potential and current, as the file holds them.
with h5py.File(os.path.join(d, "robot_capsule.h5"), "r") as f:
    names = [n.decode() for n in f["baseline/electrodes/electrode"][()]]
    v, i = f["baseline/electrodes/potential"][()], f["baseline/electrodes/current"][()]
text = open(os.path.join(d, "robot_capsule.txt")).read()
for k, name in enumerate(names):
    m = re.search(rf"^electrode {re.escape(name)} +baseline {NUMBER} V, {NUMBER} A;", text, re.M)
    if not m:
        bad.append(f"robot_capsule: no signed baseline line for electrode {name}")
        continue
    if not (close(m[1], v[k], 6) and close(m[2], i[k], 6)):
        bad.append(f"robot_capsule {name}: printed {m[1]} V, {m[2]} A; the file holds {v[k]} V, {i[k]} A")
if not re.search(r"^electrode rear emitter +baseline -[0-9.]+ V, -0\.001 A;", text, re.M):
    bad.append("robot_capsule: the rear emitter (-1 mA) is not printed with its minus signs")

# Complex: membrane_sphere at 100 Hz, magnitude and phase (degrees) of each baseline potential.
with h5py.File(os.path.join(d, "membrane_sphere.h5"), "r") as f:
    names = [n.decode() for n in f["baseline/electrodes/electrode"][()]]
    v = f["baseline/electrodes/potential"][()]
text = open(os.path.join(d, "membrane_sphere.txt")).read()
for k, name in enumerate(names):
    m = re.search(rf"^electrode {re.escape(name)} +baseline \|{NUMBER} V\| at phase ([-+][0-9.]+) deg,", text, re.M)
    if not m:
        bad.append(f"membrane_sphere: no magnitude-and-phase line for electrode {name}")
        continue
    phase = math.degrees(cmath.phase(v[k])) if abs(v[k]) > 0 else 0.0
    off = abs((float(m[2]) - phase + 180) % 360 - 180)   # the same angle either side of +-180
    if not close(m[1], abs(v[k]), 6) or off > 0.051:
        bad.append(f"membrane_sphere {name}: printed |{m[1]}| at {m[2]} deg; the file holds {v[k]}")

# Real fish: the skin's baseline range and the peak of the image, with their signs.
with h5py.File(os.path.join(d, "fish_prey.h5"), "r") as f:
    base = f["baseline/fish/transdermal_voltage"][()]
    image = f["difference/fish/transdermal_voltage"][()]
text = open(os.path.join(d, "fish_prey.txt")).read()
m = re.search(rf"^baseline transdermal voltage: {NUMBER} \.\. {NUMBER} V over the skin$", text, re.M)
if not m or not (close(m[1], base.min(), 4) and close(m[2], base.max(), 4)):
    bad.append(f"fish_prey: baseline range line {m and m[0]!r}, the file spans {base.min()} .. {base.max()}")
m = re.search(rf"^electric image: peak change {NUMBER} V at panel ([0-9]+) ", text, re.M)
k = int(np.argmax(np.abs(image)))
if not m or int(m[2]) != k or not close(m[1], image[k], 4):
    bad.append(f"fish_prey: image line {m and m[0]!r}, the file's peak is {image[k]} at panel {k}")

if bad:
    print("\n".join("FAIL " + b for b in bad))
    sys.exit(1)
print("murk solve prints signed values (magnitude and phase when complex), as the files hold them")
PY
[ "$failures" -eq 0 ] || exit 1
echo "solve signs: ok"
