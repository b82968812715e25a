"""Compare a checked-in reference file with a freshly generated one.

Numbers must agree to 1e-12 (relative or absolute); everything else exactly. Prints
one line per file: 'N passed, N failed' counts the values compared.
"""
import json
import math
import sys


def walk(a, b, path, failures, counter):
    if isinstance(a, dict) and isinstance(b, dict):
        if set(a) != set(b):
            failures.append(f"{path}: keys differ: {sorted(set(a) ^ set(b))}")
            return
        for k in a:
            walk(a[k], b[k], f"{path}.{k}", failures, counter)
    elif isinstance(a, list) and isinstance(b, list):
        if len(a) != len(b):
            failures.append(f"{path}: lengths differ ({len(a)} vs {len(b)})")
            return
        for i, (x, y) in enumerate(zip(a, b)):
            walk(x, y, f"{path}[{i}]", failures, counter)
    elif isinstance(a, (int, float)) and isinstance(b, (int, float)) and not isinstance(a, bool):
        counter[0] += 1
        if not math.isclose(a, b, rel_tol=1e-12, abs_tol=1e-12):
            failures.append(f"{path}: {a} vs {b}")
    else:
        counter[0] += 1
        if a != b:
            failures.append(f"{path}: {a!r} vs {b!r}")


def main():
    checked_in, fresh = sys.argv[1], sys.argv[2]
    with open(checked_in) as f:
        a = json.load(f)
    with open(fresh) as f:
        b = json.load(f)
    failures, counter = [], [0]
    walk(a, b, "$", failures, counter)
    for line in failures[:20]:
        print(f"  {checked_in}: {line}")
    print(f"{checked_in}: {counter[0] - len(failures)} passed, {len(failures)} failed")
    sys.exit(1 if failures else 0)


if __name__ == "__main__":
    main()
