"""Every evidence source of a scan, recomputed in Python from the docs and the data files
alone (docs/evidence.md and docs/model-card.md are the spec; numpy does the arithmetic).
None of telltale's code is used (python_lexicons.py reads the word lists, and
python_archive.py the archive and friends file): the script reads the same data files
telltale compiles in (reference-priors/lexicons/*.toml, gazetteer.tsv,
common-words.txt), the priors JSON, the archive zip (layout L, as `telltale synth large`
writes it) and a friends CSV.

What it recomputes, each from the section of docs/evidence.md named:
- `table`: smoothed likelihood ratios (c + a)/(n·μ + a), a = α·μ + k ("`table`"), the
  counts of a noisy file first discounted (docs/priors.md, "Noisy counts");
- `places`: place names found on name keys in the gazetteer, candidates weighted by
  population, L(v) = c·(s·q(v)/π(v) + 1 − s + s·q_out) + (1 − c) ("`places`");
- `life-stages`: the rule's ages (narrowed by education-level words) plus the years
  since the year named (in the pattern's calendar) or the join date, spread uniformly
  and cut into the bands, D = c·P + (1 − c)·π ("`life-stages`"); each item on its own;
- `vocabulary`: stated ratios (`lean`) or members' shares (`members`), the strongest
  term per attribute ("`vocabulary`");
- `friends`: the weighted vote smoothed with one pseudo-friend per value ("`friends`");
- the combination: λ for table evidence only, weight 1 for the rest, pieces of one cause
  sharing f(n)/n = (1 + ln n)/n, the 85% rules-of-thumb ceiling (model card,
  "Combining evidence"; docs/evidence.md, "How sources are combined").

Not handled (the check's archives avoid them, and the script refuses them rather than
guess): logistic calibration, `--home-levels`.
"""

import json
import math
import re

from datetime import datetime, timezone

import numpy as np

from python_archive import merge_friends_file, read_archive
from python_lexicons import (Gazetteer, Phrases, find_patterns, load_life_stages,
                             load_vocabulary, name_key, split_digits, tokens)

# Constants as docs/evidence.md and docs/model-card.md state them.
LOCALITY_SHARE = 0.25  # s, "`places`" (common practice, no source)
CONF_PHRASE, CONF_WORD, CONF_COMMON = 0.9, 0.7, 0.1  # c of a place match
YEAR_SECONDS = 365.2425 * 86400.0  # the Gregorian year
OLDEST_AGE = 120.0  # end of an open band
MAX_YEARS_AHEAD = 8.0  # two-digit years and stages in the future
CEILING = 0.85  # rules-of-thumb ceiling
MIN_DATA_SUPPORT = 1.0  # table evidence worth fewer members counts as a rule of thumb
LEXICON_WEIGHT = FRIENDS_WEIGHT = 1.0
FRIEND_PSEUDO = 1.0  # pseudo-friends per value (add-one)


def saturation(n):
    """f(n) = 1 + ln n (model card, "Combining evidence")."""
    return 0.0 if n == 0 else 1.0 + math.log(n)


_LEXICONS = {}


def lexicons():
    if not _LEXICONS:
        _LEXICONS["vocabulary"] = load_vocabulary()
        _LEXICONS["life-stages"] = load_life_stages()
        _LEXICONS["gazetteer"] = Gazetteer()
    return _LEXICONS


# ── Priors ───────────────────────────────────────────────────────────────────────────

def load_priors(path):
    with open(path, encoding="utf-8") as f:
        doc = json.load(f)
    attrs = []
    for a in doc["attributes"]:
        base = np.array([v["base_rate"] for v in a["values"]], dtype=float)
        member = np.array([v.get("member_rate", v["base_rate"]) for v in a["values"]], float)
        cal = a.get("calibration") or {"method": "temperature", "lambda": 1.0}
        if cal["method"] != "temperature":
            raise ValueError("temperature calibration only")
        attrs.append({
            "id": a["id"], "label": a.get("label", a["id"]),
            "values": [v["id"] for v in a["values"]],
            "labels": [v.get("label", v["id"]) for v in a["values"]],
            "pi": base / base.sum(), "mu": member / member.sum(),
            "alpha": a.get("smoothing", 4.0), "k": a.get("pseudocount", 0.0),
            "lambda": cal["lambda"],
        })
    items = doc["items"]
    variance = noise_variance(doc.get("provenance", {}).get("privacy"))
    for a in attrs:
        a["noise_variance"] = variance
    return attrs, items


def noise_variance(privacy):
    """docs/priors.md, `provenance.privacy`: `item_noise_variance`, else 2b² from
    `item_noise_scale`, else 2(m/ε)² with m the sensitivity; 0 without privacy."""
    if not privacy:
        return 0.0
    if privacy.get("item_noise_variance") is not None:
        return float(privacy["item_noise_variance"])
    if privacy.get("item_noise_scale") is not None:
        return 2.0 * float(privacy["item_noise_scale"]) ** 2
    return 2.0 * (float(privacy["sensitivity"]) / float(privacy["epsilon"])) ** 2


def noise_discount(counts, variance):
    """docs/priors.md, "Noisy counts": c' = c·n'/n, n' = n̂²/(n̂ + |V|·σ²),
    n̂ = max(0, n − |V|·m), m = t/((1+t)(1−t)) where σ² = 2t/(1−t)² (discrete Laplace)."""
    n = counts.sum()
    if variance <= 0 or n <= 0:
        return counts
    k = len(counts)
    # σ²(1−t)² = 2t: the root of σ²t² − (2σ² + 2)t + σ² = 0 in (0, 1).
    b = 2 * variance + 2
    t = (b - math.sqrt(b * b - 4 * variance * variance)) / (2 * variance)
    m = t / ((1 + t) * (1 - t))
    size = max(0.0, n - k * m)
    return counts * (size * size / (size + k * variance)) / n


def value_index(attr, text):
    """A value by id or label, letter case ignored."""
    t = text.strip().lower()
    for i, (v, l) in enumerate(zip(attr["values"], attr["labels"])):
        if v.lower() == t or l.lower() == t:
            return i
    return None


def table_lr(attr, counts):
    """docs/evidence.md, "`table`": L = (c + a)/(n·μ + a), a = α·μ + k, after the noise
    discount of a noisy file; also the support n (members the counts are worth)."""
    c = noise_discount(np.clip(np.array(counts, dtype=float), 0.0, None),
                       attr["noise_variance"])
    a = attr["alpha"] * attr["mu"] + attr["k"]
    n = c.sum()
    return np.log((c + a) / (n * attr["mu"] + a)), n


# ── Word-list sources ────────────────────────────────────────────────────────────────

def location_attribute(attrs, gaz):
    """The first attribute at least half of whose values are ISO codes (XX-YYY region
    codes of a known country, or alpha-2 country codes); per value, its code."""
    countries = {r[2] for refs in gaz.index.values() for r in refs if r[0] == "C"}
    for ai, a in enumerate(attrs):
        codes = []
        for v in a["values"]:
            u = v.strip().upper()
            if re.fullmatch(r"[A-Z]{2}-[A-Z0-9]{1,3}", u) and u[:2] in countries:
                codes.append(("region", u))
            elif re.fullmatch(r"[A-Z]{2}", u) and u in countries:
                codes.append(("country", u))
            else:
                codes.append(None)
        known = sum(c is not None for c in codes)
        if known and 2 * known >= len(codes):
            return ai, codes
    return None, None


def land(codes, pi, country, region):
    """docs/evidence.md, "Where a place lands": the region's value, else the country's,
    else spread over the values inside the country by base rate; [] when outside."""
    for v, c in enumerate(codes):
        if c == ("region", region) and region is not None:
            return [(v, 1.0)]
    for v, c in enumerate(codes):
        if c == ("country", country):
            return [(v, 1.0)]
    inside = [v for v, c in enumerate(codes) if c is not None and c[1][:2] == country]
    total = sum(pi[v] for v in inside)
    return [(v, pi[v] / total) for v in inside] if total > 0 else []


def place_lr(mentions, codes, pi):
    q = np.zeros(len(codes))
    out, weight, conf = 0.0, 0.0, 0.0
    for text, refs, common in mentions:
        c = CONF_COMMON if common else CONF_PHRASE if " " in text else CONF_WORD
        qm = np.zeros(len(codes))
        pops = [max(r[4], 1) for r in refs]
        total = float(sum(pops))
        om = 0.0
        for r, p in zip(refs, pops):
            spread = land(codes, pi, r[2], r[3])
            if not spread:
                om += p / total
            for v, share in spread:
                qm[v] += p / total * share
        q += c * qm
        out += c * om
        weight += c
        conf = max(conf, c)
    q /= weight
    out /= weight
    if q.sum() <= 1e-12:
        return None
    s = LOCALITY_SHARE
    return np.log(conf * (s * q / pi + 1 - s + s * out) + (1 - conf))


def age_range(s):
    s = s.strip().lower().replace("\u2013", "-")
    m = re.fullmatch(r"(\d+)\s*-\s*(\d+)", s)
    if m:
        return float(m[1]), float(m[2]) + 1
    m = re.fullmatch(r"(\d+)\s*\+|(\d+) and over", s)
    if m:
        return float(m[1] or m[2]), OLDEST_AGE
    m = re.fullmatch(r"(?:under\s*|<\s*)(\d+)", s)
    if m:
        return 0.0, float(m[1])
    return None


def age_attribute(attrs):
    for ai, a in enumerate(attrs):
        ranges = [age_range(v) or age_range(l) for v, l in zip(a["values"], a["labels"])]
        if all(ranges):
            return ai, ranges
    return None, None


def calendar_year(year, calendar, now):
    """docs/evidence.md, "When": the Gregorian year a `{year}` slot means, or None."""
    value, digits = year
    ahead = datetime.fromtimestamp(now, timezone.utc).year + MAX_YEARS_AHEAD

    def gregorian(v):
        if calendar == "solar-hijri" and v < 1700:
            v = v + 621
        elif calendar == "buddhist" and v >= 2400:
            v = v - 543
        elif calendar == "hijri" and v < 1500:
            v = 622 + round(v * 32 / 33)
        return v if 1900 <= v <= 2100 else None

    if digits == 4:
        return gregorian(value)
    centuries = {"solar-hijri": [1400, 1300], "buddhist": [2500]}.get(calendar)
    if centuries is None:
        this = (ahead - MAX_YEARS_AHEAD) // 100 * 100
        return this + value if this + value <= ahead else this - 100 + value
    for c in centuries:
        g = gregorian(c + value)
        if g is not None and g <= ahead:
            return g
    return None


def mid_year(year):
    """1 July of a year (UTC), for a year named without a date."""
    return int(datetime(year, 7, 1, tzinfo=timezone.utc).timestamp())


def life_stage_lr(confidence, stages, since, ranges, pi):
    """Ages + years since, uniform over each stage's span [from, to + 1), cut into the
    bands (what falls outside every band is dropped, the rest renormalised); then
    D = c·P + (1 − c)·π, L = D/π."""
    wsum = sum(st.get("weight", 1.0) for st in stages)
    shares = np.zeros(len(ranges))
    for st in stages:
        lo, hi = st["ages"][0] + since, st["ages"][1] + 1 + since
        for b, (blo, bhi) in enumerate(ranges):
            shares[b] += st.get("weight", 1.0) / wsum * max(min(hi, bhi) - max(lo, blo), 0) / (hi - lo)
    if shares.sum() <= 1e-9:
        return None
    p = shares / shares.sum()
    c = confidence
    d = c * p + (1 - c) * pi
    d = d / d.sum()
    return np.log(d / pi)


def vocabulary_lr(term, attr):
    """(ratios as the strength is read from them, log L)."""
    pi = attr["pi"]
    if "members" in term:
        named = [(value_index(attr, v), s) for v, s in term["members"].items()]
        named = [(v, s) for v, s in named if v is not None]
        if not named:
            return None
        d = pi.copy()
        held = 0.0
        for v, s in named:
            d[v] = max(s, pi[v])
            held += d[v]
        rest = [u for u in range(len(pi)) if u not in dict(named)]
        d[rest] = (1 - held) * pi[rest] / pi[rest].sum()
        ratios = d / pi
    else:
        ratios = np.ones(len(pi))
        found = False
        for v, r in term.get("lean", {}).items():
            i = value_index(attr, v)
            if i is not None:
                ratios[i] = r
                found = True
        if not found:
            return None
    d = ratios * pi
    return ratios, np.log((d / d.sum()) / pi)


# ── Gathering and combining ──────────────────────────────────────────────────────────

ALL_SOURCES = ("table", "places", "life-stages", "vocabulary", "friends")


def gather(archive, priors_path, friends_csv=None, sources=ALL_SOURCES):
    """Every piece of evidence from the chosen sources (`--sources`): dicts with
    attribute, log_lr, source, cause (or None), weight and footing ('data' or 'rule')."""
    attrs, ref_items = load_priors(priors_path)
    lex = lexicons()
    gaz = lex["gazetteer"]
    items, friends = read_archive(archive)
    if friends_csv:
        friends = merge_friends_file(friends_csv, friends, attrs)
    dates = [it["date"] for it in items] + [f["date"] for f in friends if f["date"]]
    now = max(dates)
    by_id, by_name, by_alias = {}, {}, {}
    for i, it in enumerate(ref_items):
        if it.get("id") is not None:
            by_id.setdefault(it["id"], i)
        by_name.setdefault(name_key(it["name"]), []).append(i)
        for alias in it.get("aliases") or []:
            by_alias.setdefault(name_key(alias), []).append(i)

    def supported(i):
        return max((sum(c) for c in ref_items[i]["members"].values()), default=0.0)

    loc_ai, loc_codes = location_attribute(attrs, gaz)
    age_ai, age_ranges = age_attribute(attrs)
    attr_by = {a["id"].lower(): ai for ai, a in enumerate(attrs)}
    attr_by.update({a["label"].lower(): ai for ai, a in enumerate(attrs)})
    pieces = []

    def lexicon_piece(ai, log_lr, source, rule):
        pieces.append({"attribute": ai, "log_lr": log_lr, "source": source,
                       "cause": ("lexicon", rule, int(np.argmax(log_lr))),
                       "weight": LEXICON_WEIGHT, "footing": "rule"})

    for it in items:
        ref = by_id.get(it["id"]) if it["id"] is not None else None
        if ref is None:
            key = name_key(it["name"])
            cands = (by_name.get(key) or by_alias.get(key)) if key else None
            if cands:
                ref = max(cands, key=lambda i: (ref_items[i].get("kind") == it["kind"],
                                                supported(i), -i))
        covered = set()
        if ref is not None and "table" in sources:
            for aid, counts in ref_items[ref]["members"].items():
                ai = attr_by[aid.lower()]
                covered.add(ai)
                log_lr, n = table_lr(attrs[ai], counts)
                pieces.append({"attribute": ai, "log_lr": log_lr, "source": "table",
                               "cause": ("table", ref_items[ref]["name"], 0),
                               "weight": attrs[ai]["lambda"],
                               "footing": "data" if n >= MIN_DATA_SUPPORT else "rule"})
        toks = tokens(it["name"])
        if "places" in sources and loc_ai is not None and loc_ai not in covered:
            mentions = gaz.mentions(toks)
            if mentions:
                log_lr = place_lr(mentions, loc_codes, attrs[loc_ai]["pi"])
                if log_lr is not None:
                    lexicon_piece(loc_ai, log_lr, "places", "places")
        if "life-stages" in sources and age_ai is not None and age_ai not in covered:
            patterns, levels = lex["life-stages"]
            best = None
            words = split_digits(toks)
            for _s, _e, text, (rule, calendar), year in find_patterns(patterns, words):
                rank = (rule["confidence"], year is not None, len(text.encode()))
                if best is None or rank >= best[0]:
                    best = (rank, rule, calendar, year)
            if best is not None:
                _rank, rule, calendar, year = best
                named = calendar_year(year, calendar, now) if year else None
                when = mid_year(named) if named is not None else it["date"]
                since = (now - when) / YEAR_SECONDS
                found = {v for h in levels.find(words) for v in h[3]}
                stages = rule["stages"]
                if len(found) == 1:
                    narrowed = [st for st in stages if st.get("level") in found]
                    stages = narrowed or stages
                if since >= -MAX_YEARS_AHEAD:
                    log_lr = life_stage_lr(rule["confidence"], stages, since, age_ranges,
                                           attrs[age_ai]["pi"])
                    if log_lr is not None:
                        lexicon_piece(age_ai, log_lr, "life-stages",
                                      "life-stages: " + rule["id"])
        strongest = {}
        vocabulary = lex["vocabulary"] if "vocabulary" in sources else Phrases([])
        for _s, _e, _text, term, _year in find_patterns(vocabulary, toks):
            ai = attr_by.get(term.get("attribute", "").lower())
            if ai is None or ai in covered:
                continue
            found = vocabulary_lr(term, attrs[ai])
            if found is None:
                continue
            strength = float(np.max(np.abs(np.log(found[0]))))
            if ai not in strongest or strength > strongest[ai][0]:
                strongest[ai] = (strength, found[1], term)
        for ai, (_st, log_lr, term) in strongest.items():
            lexicon_piece(ai, log_lr, "vocabulary", term.get("cause", "vocabulary"))

    for ai, a in enumerate(attrs):
        if "friends" not in sources:
            break
        known = [value_index(a, f["values"][a["id"]]) for f in friends
                 if f["values"].get(a["id"])]
        known = [v for v in known if v is not None]
        if not known:
            continue
        n = len(known)
        vote = np.bincount(known, minlength=len(a["values"])) / n
        m = FRIEND_PSEUDO * len(a["values"])
        d = (n * vote + m * a["pi"]) / (n + m)
        pieces.append({"attribute": ai, "log_lr": np.log(d / a["pi"]), "source": "friends",
                       "cause": None, "weight": FRIENDS_WEIGHT, "footing": "data"})
    return attrs, pieces


def combine(attr, pieces):
    """log P(v) = log π(v) + Σ_groups w·f(n)/n·Σ log L − log Z; then the ceiling when
    every visible piece is a rule of thumb."""
    logits = np.log(attr["pi"]).copy()
    groups = {}
    for p in pieces:
        key = p["cause"] if p["cause"] is not None else ("alone", id(p))
        groups.setdefault(key, []).append(p)
    for members in groups.values():
        n = len(members)
        total = np.sum([p["weight"] * p["log_lr"] for p in members], axis=0)
        logits = logits + saturation(n) / n * total
    probs = np.exp(logits - np.logaddexp.reduce(logits))
    rules_only = bool(pieces) and all(p["footing"] == "rule" for p in pieces)
    if rules_only and len(probs) > 1:
        best = int(np.argmax(logits))
        others = np.delete(logits, best)
        rest = np.logaddexp.reduce(others)
        log_odds = logits[best] - rest
        log_new = -np.logaddexp(-log_odds, -math.log(CEILING / (1 - CEILING)))
        top = 1 / (1 + math.exp(-log_new))
        runner = math.exp(others.max() - rest)
        top = max(top, runner / (1 + runner))
        probs = np.exp(logits - rest) * (1 - top)
        probs[best] = top
    return probs, rules_only


def posteriors(archive, priors_path, friends_csv=None, sources=ALL_SOURCES):
    """{"attributes": {id: {value: P}}, "rules_only": {id: bool}, "pieces": {source: n},
    "evidence": [piece, …]}."""
    attrs, pieces = gather(archive, priors_path, friends_csv, sources)
    out, rules, count = {}, {}, {}
    for p in pieces:
        count[p["source"]] = count.get(p["source"], 0) + 1
    for ai, a in enumerate(attrs):
        probs, rules_only = combine(a, [p for p in pieces if p["attribute"] == ai])
        out[a["id"]] = dict(zip(a["values"], probs.tolist()))
        rules[a["id"]] = rules_only
    return {"attributes": out, "rules_only": rules, "pieces": count, "evidence": pieces}
