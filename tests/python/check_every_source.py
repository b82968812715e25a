"""Check every evidence source of a scan against an independent Python/numpy recomputation.

Spec: docs/evidence.md (each source's formula and constants, "How sources are
combined") and docs/model-card.md ("Method", "Combining evidence"). Reference
arithmetic: numpy. scripts/python_sources.py recomputes the posteriors from those docs
and the data files alone (reference-priors/lexicons/*.toml, gazetteer.tsv,
common-words.txt, the priors JSON, the archive zip, the friends CSV): it finds place
names, life-stage words and belief words itself, by the documented matching rules, and
uses none of telltale's code.

For five invented people (Oregon in English, Izmir in Turkish, Guadalajara in Spanish
with a friends file, Porto Alegre in Portuguese, Kisumu in Swahili with a priors file
released with noise; real places, invented names), this
writes a priors file with invented reference items and an archive in layout L, runs
`telltale scan --format json` with each source alone and with all of them; and for the
invented people of tests/personas/world.toml (26 countries, their own languages and
scripts) it does the same with the word-list sources. It asserts:

1. every posterior probability, per attribute and value, agrees to 1e-9;
2. each source gave the same number of pieces of evidence in both, and both say alike
   which attributes rest on rules of thumb alone;
3. the cases the issue names are exercised: word-list items the table does not know,
   a friends file, several items of one cause (a group of 2+ pieces), a footprint
   resting only on rules of thumb whose best guess the 85% ceiling actually lowers,
   table evidence with λ ≠ 1, a noisy priors file with a table piece worth under one
   member (so counted with the rules of thumb);
4. the check can fail: with any one documented constant moved (the place share s, each
   of the three place confidences, the ceiling, the pseudo-friends, the length of a
   year, f(n)) or one lexicon entry moved (the 'retired' life-stage rule's confidence,
   the 'church' term's members' share, the 'socialis*' term's ratio), the
   recomputation moves by more than 1000 × the tolerance on some case.
"""
import json
import os
import subprocess
import sys
import tempfile
import tomllib
import zipfile

import numpy as np

ROOT = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
sys.path.insert(0, os.path.join(ROOT, "scripts"))
import python_sources as ps  # noqa: E402

TOLERANCE = 1e-9

MAPPING = """format = 1
label = "invented layout L"

[[source]]
kind = "like"
files = ["activity/liked/*.json"]
records = "$.pages[*]"
name = "$.title"
id = "$.page_ref"
category = "$.topic"
date = "$.at"

[[source]]
kind = "group"
files = ["communities/memberships.json"]
records = "$.groups[*]"
name = "$.group_name"
category = "$.kind"
date = "$.since"

[[source]]
kind = "friend"
files = ["people/friends.json"]
records = "$.friends[*]"
name = "$.name"
id = "$.uid"
date = "$.since"
[source.attributes]
age_band = "$.public.age_range"
location = "$.public.lives_in"
politics = "$.public.leaning"
religion = "$.public.faith"
"""

AGE = ["18-24", "25-34", "35-44", "45-54", "55-64", "65+"]
POLITICS = ["left", "centre-left", "centre", "centre-right", "right"]
RELIGION = ["none", "christian", "muslim", "jewish", "hindu", "buddhist", "other"]
US_STATES = ["US-OR", "US-WA", "US-CA", "US-TX", "US-NY", "US-ME", "US-FL", "US-IL",
             "US-PA", "US-MN", "US-CO", "US-GA"]
COUNTRIES = ["TR", "DE", "NL", "US", "GB", "FR", "BR", "MX", "NG", "JP", "IN", "ES", "PT"]


def make_priors(path, locations, seed, lambdas, names):
    """A priors file of invented reference items, one per name (id `ref-N`), with
    member counts drawn from a Dirichlet-multinomial (numpy, seeded)."""
    rng = np.random.default_rng(seed)
    attrs = []
    for aid, label, values in [("age_band", "Age band", AGE), ("location", "Home location",
                               locations), ("politics", "Political leaning", POLITICS),
                               ("religion", "Religion", RELIGION)]:
        base = rng.dirichlet(np.full(len(values), 3.0))
        member = base * rng.uniform(0.8, 1.2, len(values))
        attrs.append({
            "id": aid, "label": label, "threshold": 0.5, "smoothing": 8.0, "pseudocount": 1.0,
            "calibration": {"method": "temperature", "lambda": lambdas[aid]},
            "values": [{"id": v, "label": v, "base_rate": float(b), "member_rate": float(m)}
                       for v, b, m in zip(values, base, member)],
        })
    items = []
    for i, (kind, name) in enumerate(names):
        members = {}
        for a in attrs:
            if a["id"] == "location" and i % 3 == 2:
                continue  # some reference items know nothing of location
            k = len(a["values"])
            members[a["id"]] = rng.multinomial(int(rng.integers(15, 400)),
                                               rng.dirichlet(np.full(k, 0.7))).tolist()
        items.append({"id": f"ref-{i}", "kind": kind, "name": name, "members": members})
    doc = {"format": 1,
           "provenance": {"source": "check_every_source.py: invented items", "licence":
                          "CC0-1.0", "created": "2026-12-05", "synthetic": True,
                          "method": "invented counts; describes no real people"},
           "attributes": attrs, "items": items}
    with open(path, "w", encoding="utf-8") as f:
        json.dump(doc, f)


def make_archive(path, likes, groups, friends):
    """likes: (ref id, title, unix time); groups: (name, RFC 3339 date); friends:
    (uid, name, unix time, public fields)."""
    with zipfile.ZipFile(path, "w") as z:
        z.writestr("telltale-mapping.toml", MAPPING)
        z.writestr("activity/liked/pages_001.json", json.dumps({"pages": [
            {"title": t, "page_ref": r, "topic": "Interests", "at": at} for r, t, at in likes]}))
        z.writestr("communities/memberships.json", json.dumps({"groups": [
            {"group_name": g, "kind": "Interests", "since": d} for g, d in groups]}))
        z.writestr("people/friends.json", json.dumps({"friends": [
            {"name": n, "uid": u, "since": at, "public": pub} for u, n, at, pub in friends]}))
        z.writestr("account/about_me.json", "{}")


NEUTRAL = ["Sourdough Starters", "Weekend Knitting Circle", "Board Game Nights",
           "Houseplant Swap", "Crossword Solvers", "Origami Folders"]


def personas(tmp):
    """(label, archive, priors, friends file or None, what it must exercise)."""
    out = []
    # 1. Oregon, English: word lists only, no table item, no friends, so every
    #    attribute rests on rules of thumb; five groups named for Eugene share a cause.
    pri = os.path.join(tmp, "us.json")
    make_priors(pri, US_STATES, 11, {"age_band": 1.3, "location": 1.2, "politics": 0.9,
                                     "religion": 1.1}, [("like", "Lanternwick Tea Lovers")])
    arc = os.path.join(tmp, "oregon.zip")
    groups = [(n, "2019-03-0%dT10:00:00Z" % (i + 1)) for i, n in enumerate(NEUTRAL)]
    groups += [(f"Eugene {t}", f"2020-0{i + 1}-15T12:00:00Z") for i, t in enumerate(
        ["Runners", "Book Club", "Foodies", "Gardeners", "Cyclists"])]
    groups += [("Portland Farmers Market", "2021-05-01T08:00:00Z"),
               ("Retirees Walking Club", "2018-06-01T08:00:00Z"),
               ("Young Socialists Reading Group", "2016-09-01T08:00:00Z"),
               ("Riverside Church Choir", "2022-11-20T08:00:00Z"),
               ("Parish Bible Study", "2023-01-08T08:00:00Z")]
    make_archive(arc, [], groups, [])
    out.append(("Oregon (English)", arc, pri, None, {"rules_only", "group"}))

    # 2. Izmir, Turkish: reference items liked by id and one joined again as a group
    #    of the same name (one reference item, two archive items: a table group);
    #    friends with public attributes in the archive.
    pri = os.path.join(tmp, "tr.json")
    table = [("like", "Kordon Akşam Yürüyüşü"), ("like", "Ege Zeytinyağı Tadımı"),
             ("group", "Bostanlı Kitap Kulübü"), ("like", "Anadolu Müzik Arşivi"),
             ("like", "Hafta Sonu Balıkçıları")]
    make_priors(pri, COUNTRIES, 12, {"age_band": 1.25, "location": 0.8, "politics": 1.4,
                                     "religion": 1.05}, table)
    arc = os.path.join(tmp, "izmir.zip")
    likes = [("ref-0", "Kordon Akşam Yürüyüşü", 1700000000),
             ("ref-1", "Ege Zeytinyağı Tadımı", 1710000000),
             ("ref-3", "Anadolu Müzik Arşivi", 1712000000)]
    groups = [("Bostanlı Kitap Kulübü", "2022-02-02T10:00:00Z"),
              ("Anadolu Müzik Arşivi", "2023-04-04T10:00:00Z"),
              ("İzmir Koşucuları", "2021-01-10T10:00:00Z"),
              ("Karşıyaka Semt Pazarı", "2020-07-07T10:00:00Z"),
              ("Bornova Cami Gönüllüleri", "2019-03-03T10:00:00Z"),
              ("Emekliler Derneği", "2017-05-05T10:00:00Z"),
              ("Muhafazakar Düşünce Platformu", "2024-01-01T10:00:00Z")]
    friends = [("tr-1", "Deniz Örnekoğlu", 1600000000, {"lives_in": "TR", "faith": "muslim"}),
               ("tr-2", "Ece Yapraklı", 1650000000, {"lives_in": "TR", "age_range": "55-64"}),
               ("tr-3", "Mert Kavaklı", 1660000000, {"lives_in": "DE", "leaning": "right"}),
               ("tr-4", "Selin Ardıç", 1670000000, {})]
    make_archive(arc, likes, groups, friends)
    out.append(("Izmir (Turkish)", arc, pri, None, {"table_group", "friends"}))

    # 3. Guadalajara, Spanish: a friends file (semicolon-separated, values by label and
    #    by id, one row replacing an archive friend's value, one new friend).
    pri = os.path.join(tmp, "mx.json")
    make_priors(pri, COUNTRIES, 13, {"age_band": 0.9, "location": 1.3, "politics": 1.15,
                                     "religion": 1.2},
                [("like", "Tacos al Pastor Fans"), ("group", "Cine Club Tapatío")])
    arc = os.path.join(tmp, "guadalajara.zip")
    groups = [("Cine Club Tapatío", "2021-08-08T10:00:00Z"),
              ("Jubilados de Guadalajara", "2016-02-02T10:00:00Z"),
              ("Mercado de Zapopan Vecinos", "2022-03-03T10:00:00Z"),
              ("Iglesia del Barrio Coro", "2020-10-10T10:00:00Z"),
              ("Padres Primerizos Tlaquepaque", "2023-06-06T10:00:00Z")]
    friends = [("mx-1", "Lucía Ejemplo", 1500000000, {"lives_in": "US"}),
               ("mx-2", "Mateo Inventado", 1550000000, {"lives_in": "MX"})]
    make_archive(arc, [("ref-0", "Tacos al Pastor Fans", 1720000000)], groups, friends)
    fcsv = os.path.join(tmp, "amigos.csv")
    with open(fcsv, "w", encoding="utf-8") as f:
        f.write("name;id;Home location;Religion;politics\n"
                ";mx-1;MX;christian;\n"
                "Valentina Ficticia;;mx;Christian;centre-left\n"
                "Diego Imaginario;;MX;;centre\n")
    out.append(("Guadalajara (Spanish, friends file)", arc, pri, fcsv, {"friends"}))

    # 4. Porto Alegre, Portuguese: word lists beside table items for other attributes.
    pri = os.path.join(tmp, "br.json")
    make_priors(pri, COUNTRIES, 14, {"age_band": 1.1, "location": 1.0, "politics": 0.85,
                                     "religion": 1.3},
                [("like", "Churrasco de Domingo"), ("like", "Samba no Quintal")])
    arc = os.path.join(tmp, "portoalegre.zip")
    groups = [("Aposentados de Porto Alegre", "2015-04-04T10:00:00Z"),
              ("Igreja Comunidade Canoas", "2021-09-09T10:00:00Z"),
              ("Corrida de Rua Gravataí", "2022-12-12T10:00:00Z"),
              ("Pais de Primeira Viagem Novo Hamburgo", "2024-02-20T10:00:00Z")]
    make_archive(arc, [("ref-0", "Churrasco de Domingo", 1730000000),
                       ("ref-1", "Samba no Quintal", 1731000000)], groups, [])
    out.append(("Porto Alegre (Portuguese)", arc, pri, None, {"group"}))

    # 5. Kisumu, Swahili and English: a priors file released with noise (its counts
    #    discounted to the members they are worth, docs/priors.md); one reference item
    #    so small it is worth under one member, so age band and location rest on rules
    #    of thumb though the table matched it; two reference items of one name (a page
    #    and a group), which form one cause group (docs/evidence.md, item 6); a like
    #    matched by one of a reference item's aliases.
    pri = os.path.join(tmp, "ke.json")
    make_priors(pri, COUNTRIES + ["KE", "UG", "TZ"], 15,
                {"age_band": 1.2, "location": 1.1, "politics": 0.95, "religion": 1.25},
                [("like", "Kilimo Bora Wakulima"), ("like", "Matatu Culture Fans"),
                 ("like", "Jazz ya Jumapili"), ("group", "Jazz ya Jumapili")])
    with open(pri, encoding="utf-8") as f:
        doc = json.load(f)
    doc["provenance"]["privacy"] = {
        "mechanism": "discrete_laplace", "epsilon": 4.0, "sensitivity": 10.0,
        "min_members": 10, "budget_split": "invented for the check",
        "item_noise_variance": 150.0}
    doc["items"][0]["aliases"] = ["Wakulima wa Kilimo Bora", "Kilimo Bora Farmers"]
    rng = np.random.default_rng(15)
    for i, item in enumerate(doc["items"]):
        keep = {0: ["politics"], 1: ["age_band", "location", "religion", "politics"],
                2: ["politics", "religion"], 3: ["politics", "religion"]}[i]
        size = {0: 600, 1: 25, 2: 220, 3: 180}[i]
        item["members"] = {
            a["id"]: rng.multinomial(size, rng.dirichlet(np.full(len(a["values"]), 0.7))).tolist()
            for a in doc["attributes"] if a["id"] in keep}
    with open(pri, "w", encoding="utf-8") as f:
        json.dump(doc, f)
    arc = os.path.join(tmp, "kisumu.zip")
    groups = [("Jazz ya Jumapili", "2023-03-03T10:00:00Z"),
              ("Wastaafu wa Kisumu", "2018-08-08T10:00:00Z"),
              ("Kisumu Church Choir", "2021-06-06T10:00:00Z"),
              ("Kisumu Lakeside Runners", "2022-01-01T10:00:00Z")]
    make_archive(arc, [("ref-9", "Kilimo Bora Farmers", 1735000000),
                       ("ref-1", "Matatu Culture Fans", 1736000000),
                       ("ref-2", "Jazz ya Jumapili", 1737000000)], groups, [])
    out.append(("Kisumu (Swahili, noisy priors)", arc, pri, None, {"rules_only", "noisy"}))
    return out


def world_personas(tmp):
    """The invented people of tests/personas/world.toml (28 people in 26 countries, in
    their own languages and scripts), each written as a layout-L archive of their
    items (all of them groups), scanned against invented priors whose
    location values are those countries (ISO 3166-1 alpha-2)."""
    with open(os.path.join(ROOT, "tests", "personas", "world.toml"), "rb") as f:
        people = tomllib.load(f)["person"]
    pri = os.path.join(tmp, "world.json")
    countries = sorted({p["country"] for p in people} | set(COUNTRIES))
    make_priors(pri, countries, 21, {"age_band": 1.2, "location": 1.1, "politics": 1.0,
                                     "religion": 1.3}, [("like", "Lanternwick Tea Lovers")])
    out, kept = [], 0
    for p in people:
        groups = [(name, date + "T12:00:00Z") for _kind, name, date in p["items"]]
        kept += len(groups)
        arc = os.path.join(tmp, p["slug"] + ".zip")
        make_archive(arc, [], groups, [])
        out.append((f"{p['slug']} ({', '.join(p['languages'])})", arc, pri))
    return out, kept


def scan(archive, priors, friends, sources, out):
    cmd = [os.environ["TELLTALE_BIN"], "scan", archive, "--priors", priors, "--sources",
           ",".join(sources), "--format", "json", "-o", out]
    if friends:
        cmd += ["--friends", friends]
    done = subprocess.run(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
    if done.returncode != 0:
        raise SystemExit(f"telltale scan failed ({' '.join(cmd[1:])}):\n{done.stderr}")
    with open(out, encoding="utf-8") as f:
        return json.load(f)


def largest_difference(rust, py):
    worst = 0.0
    for attr in rust["attributes"]:
        ours = {v["id"]: v["probability"] for v in attr["distribution"]}
        theirs = py["attributes"][attr["id"]]
        if sorted(ours) != sorted(theirs):
            return float("inf")
        worst = max(worst, max(abs(ours[v] - theirs[v]) for v in ours))
    return worst


def compare(where, run, sources, rust, py, worst, failures):
    """Every probability to the tolerance, the pieces per source, the footing."""
    d = largest_difference(rust, py)
    worst[run] = max(worst.get(run, 0.0), d)
    if d > TOLERANCE:
        failures.append(f"{where}: largest difference {d:.3g}")
    counts = {s["id"]: s["pieces"] for s in rust["sources"]}
    for s in sources:
        if counts.get(s, 0) != py["pieces"].get(s, 0):
            failures.append(f"{where}: {s} gave {counts.get(s, 0)} pieces, python "
                            f"{py['pieces'].get(s, 0)}")
    for a in rust["attributes"]:
        said = bool(a.get("rests_on_rules_of_thumb"))
        if said != py["rules_only"][a["id"]]:
            failures.append(f"{where}, {a['id']}: rests on rules of thumb {said}, python "
                            f"{py['rules_only'][a['id']]}")


def main():
    failures = []
    worst = {}
    exercised = set()
    with tempfile.TemporaryDirectory() as tmp:
        cases = personas(tmp)
        runs = [(s,) for s in ps.ALL_SOURCES] + [ps.ALL_SOURCES]
        for label, arc, pri, fcsv, needs in cases:
            for sources in runs:
                name = "all" if len(sources) > 1 else sources[0]
                rust = scan(arc, pri, fcsv, sources, os.path.join(tmp, "r.json"))
                py = ps.posteriors(arc, pri, fcsv, sources)
                compare(f"{label}, --sources {name}", name, sources, rust, py, worst, failures)
                if name == "all":
                    exercised |= what_it_exercises(py, arc, pri, fcsv)
                    print(f"  {label}: pieces {py['pieces']}, resting on rules of thumb: "
                          f"{sorted(a for a, r in py['rules_only'].items() if r)}")
                    if "rules_only" in needs and not ceiling_binds(arc, pri):
                        failures.append(f"{label}: the ceiling does not lower any guess")
        world, kept = world_personas(tmp)
        for label, arc, pri in world:
            for sources in [("places",), ("life-stages",), ("vocabulary",), ps.ALL_SOURCES]:
                name = "all" if len(sources) > 1 else sources[0]
                rust = scan(arc, pri, None, sources, os.path.join(tmp, "r.json"))
                py = ps.posteriors(arc, pri, None, sources)
                compare(f"{label}, --sources {name}", "world " + name, sources, rust, py,
                        worst, failures)
        print(f"  world personas: {len(world)} people, {kept} items compared")
        if len(world) < 28 or kept < 190:
            failures.append(f"too few world personas compared ({len(world)}, {kept} items)")
        for need in ["places", "life-stages", "vocabulary", "table", "friends", "group",
                     "table_group", "rules_only", "friends_file", "lambda", "thin_table"]:
            if need not in exercised:
                failures.append(f"nothing exercised {need}")
        failures += mutations(cases)
    for f in failures:
        print("FAIL", f)
    print("check_every_source: largest posterior difference per --sources run: " + ", ".join(
        f"{k} {v:.1e}" for k, v in worst.items()) + f" (tolerance {TOLERANCE}); "
        + ("FAILED" if failures else "ok"))
    return 1 if failures else 0


def what_it_exercises(py, arc, pri, fcsv):
    seen = set(s for s, n in py["pieces"].items() if n)
    causes = {}
    for p in py["evidence"]:
        if p["cause"] is not None:
            key = (p["attribute"], p["cause"])
            causes[key] = causes.get(key, 0) + 1
            if p["source"] == "table" and p["weight"] != 1.0:
                seen.add("lambda")
    if any(n >= 2 for (a, c), n in causes.items() if c[0] == "lexicon"):
        seen.add("group")
    if any(n >= 2 for (a, c), n in causes.items() if c[0] == "table"):
        seen.add("table_group")
    if any(py["rules_only"].values()):
        seen.add("rules_only")
    if any(p["source"] == "table" and p["footing"] == "rule" for p in py["evidence"]):
        seen.add("thin_table")
    if fcsv and py["pieces"].get("friends"):
        seen.add("friends_file")
    return seen


def ceiling_binds(arc, pri):
    """With the ceiling removed, some guess resting on rules of thumb reads at least
    0.01 higher: the ceiling changed the figures the check compared."""
    saved = ps.CEILING
    try:
        ps.CEILING = 1 - 1e-15
        loose = ps.posteriors(arc, pri)
    finally:
        ps.CEILING = saved
    held = ps.posteriors(arc, pri)
    return any(max(loose["attributes"][a].values()) - max(held["attributes"][a].values())
               > 0.01 for a in held["attributes"] if held["rules_only"][a])


def mutations(cases):
    """Move one documented constant at a time: the recomputation must then disagree
    with itself (and so with telltale) by far more than the tolerance on some case."""
    failures = []
    moves = [("LOCALITY_SHARE", 0.26), ("CONF_WORD", 0.72), ("CONF_PHRASE", 0.88),
             ("CONF_COMMON", 0.12), ("CEILING", 0.86), ("FRIEND_PSEUDO", 1.1),
             ("YEAR_SECONDS", 365.0 * 86400.0)]
    base = [ps.posteriors(arc, pri, fcsv) for _l, arc, pri, fcsv, _n in cases]
    for name, value in moves:
        saved = getattr(ps, name)
        setattr(ps, name, value)
        try:
            moved = [ps.posteriors(arc, pri, fcsv) for _l, arc, pri, fcsv, _n in cases]
        finally:
            setattr(ps, name, saved)
        d = max(largest_difference(as_report(b), m) for b, m in zip(base, moved))
        if d < 1000 * TOLERANCE:
            failures.append(f"moving {name} to {value} changes nothing ({d:.2g})")
    # Lexicon entries: a life-stage rule's confidence, a belief term's members' share
    # and a political term's ratio, as read from the TOML files.
    lex = ps.lexicons()
    entries = [("life-stages 'retired' confidence", next(
        r for r, _calendar in lex["life-stages"][0].values() if r["id"] == "retired"),
        "confidence", 0.62)]
    for term in lex["vocabulary"].values():
        if "church" in term["words"] and "members" in term:
            entries.append(("vocabulary 'church' share", term["members"], "christian", 0.76))
        if "socialis*" in term["words"] and "lean" in term:
            entries.append(("vocabulary 'socialis*' ratio", term["lean"], "left", 6.5))
    if len(entries) != 3:
        failures.append(f"the lexicon entries to move were not all found ({len(entries)})")
    for what, table, key, value in entries:
        saved = table[key]
        table[key] = value
        try:
            moved = [ps.posteriors(arc, pri, fcsv) for _l, arc, pri, fcsv, _n in cases]
        finally:
            table[key] = saved
        d = max(largest_difference(as_report(b), m) for b, m in zip(base, moved))
        if d < 1000 * TOLERANCE:
            failures.append(f"moving {what} to {value} changes nothing ({d:.2g})")
    saved = ps.saturation
    ps.saturation = lambda n: 0.0 if n == 0 else 1.0 + 0.9 * np.log(n)
    try:
        moved = [ps.posteriors(arc, pri, fcsv) for _l, arc, pri, fcsv, _n in cases]
    finally:
        ps.saturation = saved
    d = max(largest_difference(as_report(b), m) for b, m in zip(base, moved))
    if d < 1000 * TOLERANCE:
        failures.append(f"moving f(n) changes nothing ({d:.2g})")
    return failures


def as_report(py):
    return {"attributes": [{"id": a, "distribution": [{"id": v, "probability": p}
                                                      for v, p in dist.items()]}
                           for a, dist in py["attributes"].items()]}


if __name__ == "__main__":
    sys.exit(main())
