#!/usr/bin/env python3
"""A straightforward Python pipeline for the benchmark archive (layout L, made by
`telltale synth large`): read the zip with zipfile and json, match items to the
reference table by id, then by normalised name, and compute each attribute's
posterior with numpy, vectorised over the matched items. It is written the way a
competent analyst would write it for this one layout, independently of telltale's
code, and follows the model in docs/model-card.md: smoothed likelihood ratios
(c + a) / (n·mu + a) with a = alpha·mu + k, summed in log space, tempered by lambda,
added to the log base rates and normalised (softmax).

This is the reference table alone, for the benchmark (scripts/bench-large) and
tests/python/check_python_pipeline.py; scripts/python_sources.py recomputes every other
evidence source and their combination (tests/python/check_every_source.py).

Usage: python_pipeline.py ARCHIVE.zip PRIORS.json [OUT.json]
Prints (or writes) {"attributes": {id: {value id: probability}}, "matched": n}.
"""

import json
import re
import sys
import unicodedata
import zipfile

import numpy as np

SEPARATORS = re.compile(r"[^\w]+|_+")


def name_key(s):
    """Compatibility decomposition, combining marks (category M) dropped, lower case, apostrophes
    joined, every run of other non-alphanumerics one space."""
    s = unicodedata.normalize("NFKD", s)
    s = "".join(c for c in s if not unicodedata.category(c).startswith("M"))
    s = s.lower().replace("'", "").replace("\u2019", "").replace("\u02bc", "")
    s = SEPARATORS.sub(" ", s).strip()
    return unicodedata.normalize("NFC", s)


def load_priors(path):
    with open(path, encoding="utf-8") as f:
        doc = json.load(f)
    attrs = []
    for a in doc["attributes"]:
        base = np.array([v["base_rate"] for v in a["values"]], dtype=float)
        member = np.array(
            [v.get("member_rate", v["base_rate"]) for v in a["values"]], dtype=float
        )
        cal = a.get("calibration") or {"method": "temperature", "lambda": 1.0}
        if cal["method"] != "temperature":
            raise SystemExit("this pipeline handles temperature calibration only")
        attrs.append(
            {
                "id": a["id"],
                "values": [v["id"] for v in a["values"]],
                "log_base": np.log(base / base.sum()),
                "mu": member / member.sum(),
                "alpha": a.get("smoothing", 4.0),
                "k": a.get("pseudocount", 0.0),
                "lambda": cal["lambda"],
            }
        )
    items = doc["items"]
    by_id, by_name = {}, {}
    for i, it in enumerate(items):
        if it.get("id") is not None:
            by_id.setdefault(it["id"], i)
        by_name.setdefault(name_key(it["name"]), []).append(i)
    return attrs, items, by_id, by_name


def support(item):
    return max((sum(c) for c in item["members"].values()), default=0.0)


def read_archive(path):
    """The member's items as (kind, id or None, name), duplicates merged."""
    seen = {}
    with zipfile.ZipFile(path) as z:
        names = sorted(z.namelist())
        for n in names:
            if n.startswith("activity/liked/") and n.endswith(".json"):
                for p in json.loads(z.read(n))["pages"]:
                    item = ("like", p.get("page_ref"), p["title"].strip())
                    seen.setdefault(("like", "id", item[1]), item)
        for g in json.loads(z.read("communities/memberships.json"))["groups"]:
            name = g["group_name"].strip()
            seen.setdefault(("group", "name", name_key(name)), ("group", None, name))
    return list(seen.values())


def posteriors(archive, priors_path):
    attrs, items, by_id, by_name = load_priors(priors_path)
    matched = []
    for kind, ident, name in read_archive(archive):
        if ident is not None and ident in by_id:
            matched.append(by_id[ident])
            continue
        cands = by_name.get(name_key(name))
        if cands:
            # Same kind first, then the best supported, then the earliest listed.
            best = max(
                cands,
                key=lambda i: (items[i].get("kind") == kind, support(items[i]), -i),
            )
            matched.append(best)
    out = {}
    for a in attrs:
        rows = [items[i]["members"][a["id"]] for i in matched if a["id"] in items[i]["members"]]
        counts = np.clip(np.array(rows, dtype=float).reshape(-1, len(a["mu"])), 0.0, None)
        prior = a["alpha"] * a["mu"] + a["k"]
        n = counts.sum(axis=1, keepdims=True)
        denom = n + prior.sum()
        p = (counts + prior) / denom
        q = (n * a["mu"] + prior) / denom
        s = np.log(np.maximum(p, np.finfo(float).tiny) / q).sum(axis=0)
        logits = a["log_base"] + a["lambda"] * s
        z = np.logaddexp.reduce(logits)
        out[a["id"]] = dict(zip(a["values"], np.exp(logits - z).tolist()))
    return {"attributes": out, "matched": len(matched)}


def main(argv):
    if len(argv) < 3:
        raise SystemExit(__doc__)
    result = posteriors(argv[1], argv[2])
    text = json.dumps(result)
    if len(argv) > 3:
        with open(argv[3], "w", encoding="utf-8") as f:
            f.write(text)
    else:
        print(text)


if __name__ == "__main__":
    main(sys.argv)
