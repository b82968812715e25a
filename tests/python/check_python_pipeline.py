"""Check telltale's posteriors against an independent Python/numpy computation.

1. `telltale synth large` (small sizes) and `telltale synth priors-large` write a small
   archive in the benchmark layout and its reference table.
2. `telltale scan --sources table --format json` scores it.
3. scripts/python_pipeline.py reads the same zip with zipfile + json and computes the
   posteriors with numpy from the model as docs/model-card.md states it (smoothed
   likelihood ratios, tempered naive Bayes, softmax), without any of telltale's code.
4. Every posterior probability agrees to 1e-9, and both matched the same number of
   items. The benchmark figures for the full-size run are in docs/performance.md
   (scripts/bench-large).

The other evidence sources (place names, life stages, belief vocabulary, friends) and
their combination are checked by check_every_source.py.
"""
import importlib.util
import json
import os
import subprocess
import sys
import tempfile

ROOT = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
TOLERANCE = 1e-9

spec = importlib.util.spec_from_file_location(
    "python_pipeline", os.path.join(ROOT, "scripts", "python_pipeline.py")
)
pipeline = importlib.util.module_from_spec(spec)
spec.loader.exec_module(pipeline)


def run(*args):
    subprocess.run([os.environ["TELLTALE_BIN"], *args], check=True, stdout=subprocess.DEVNULL)


def main():
    with tempfile.TemporaryDirectory() as tmp:
        archive = os.path.join(tmp, "small.zip")
        priors = os.path.join(tmp, "small-priors.json")
        items = "3000"
        run("synth", "priors-large", priors, "--seed", "5", "--items", items)
        run(
            "synth", "large", archive, "--seed", "5", "--likes", "700", "--groups", "150",
            "--friends", "30", "--media-mb", "1", "--about-bytes", "200",
            "--table-items", items,
        )
        report = os.path.join(tmp, "report.json")
        run("scan", archive, "--priors", priors, "--sources", "table", "--format", "json",
            "-o", report)
        with open(report, encoding="utf-8") as f:
            rust = json.load(f)
        py = pipeline.posteriors(archive, priors)

    failures = 0
    rust_matched = rust["priors"]["items_matched"]
    if rust_matched != py["matched"] or py["matched"] < 100:
        print(f"FAIL matched items: telltale {rust_matched}, python {py['matched']}")
        failures += 1
    worst = 0.0
    for attr in rust["attributes"]:
        ours = {v["id"]: v["probability"] for v in attr["distribution"]}
        theirs = py["attributes"][attr["id"]]
        if sorted(ours) != sorted(theirs):
            print(f"FAIL {attr['id']}: {len(ours)} values vs {len(theirs)}")
            failures += 1
            continue
        diff = max(abs(ours[v] - theirs[v]) for v in ours)
        worst = max(worst, diff)
        if diff > TOLERANCE:
            print(f"FAIL {attr['id']}: largest difference {diff:.3g} > {TOLERANCE}")
            failures += 1
    # The posteriors must actually move away from the base rates (the check can fail).
    moved = max(
        abs(v["probability"] - v["base_rate"])
        for attr in rust["attributes"]
        for v in attr["distribution"]
    )
    if moved < 0.05:
        print(f"FAIL the posteriors barely move from the base rates ({moved:.3g})")
        failures += 1
    print(
        f"check_python_pipeline: {py['matched']} matched items, largest posterior "
        f"difference {worst:.2e} (tolerance {TOLERANCE}); {'FAILED' if failures else 'ok'}"
    )
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
