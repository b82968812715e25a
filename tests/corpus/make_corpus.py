"""Write the malformed-input corpus under tests/corpus/: broken and hostile archives,
mappings and reference priors files.

Each case is a folder with the archive (zip file or folder), a mapping, optionally a
priors file, and case.toml saying how telltale is run on it and what its output must
contain. tests/corpus.rs runs every case. The archives are made here (Python standard
library only) so each defect is exact and documented; the outputs are checked in.

Usage: python tests/corpus/make_corpus.py   (from the repository root)
"""
import io
import json
import os
import shutil
import struct
import zipfile
import zlib

ROOT = os.path.dirname(os.path.abspath(__file__))

LIKES_MAPPING = """format = 1
[[source]]
kind = "like"
files = ["**/*.json"]
records = "$.likes[*]"
name = "$.title"
date = "$.at"
"""

GOOD_LIKES = json.dumps({"likes": [{"title": "Weekend Pottery Fans", "at": 1600000000},
                                   {"title": "Quiet Chess Circle", "at": 1600000100}]})


JSON = ["scan", "{archive}", "--mapping", "{mapping}", "--format", "json"]


def case(name, expect, exit_code=0, args=None, mapping=LIKES_MAPPING, priors=None):
    d = os.path.join(ROOT, name)
    if os.path.exists(d):
        shutil.rmtree(d)
    os.makedirs(d)
    with open(os.path.join(d, "mapping.toml"), "w") as f:
        f.write(mapping)
    if priors is not None:
        with open(os.path.join(d, "priors.json"), "w") as f:
            f.write(priors)
    args = args or ["scan", "{archive}", "--mapping", "{mapping}"] + (["--priors", "{priors}"] if priors else [])
    with open(os.path.join(d, "case.toml"), "w") as f:
        f.write(f"args = {json.dumps(args)}\nexit = {exit_code}\nexpect = {json.dumps(expect, ensure_ascii=False)}\n")
    return d


def zip_bytes(entries, method=zipfile.ZIP_DEFLATED):
    buf = io.BytesIO()
    with zipfile.ZipFile(buf, "w", method) as z:
        for name, data in entries:
            info = zipfile.ZipInfo(name, date_time=(2026, 11, 30, 0, 0, 0))
            info.compress_type = method
            z.writestr(info, data)
    return buf.getvalue()


def write(path, data):
    with open(path, "wb") as f:
        f.write(data if isinstance(data, bytes) else data.encode())


# 1. A zip cut off half way.
d = case("truncated-zip", ["archive.zip: the zip file is damaged or truncated"], exit_code=1)
z = zip_bytes([("likes.json", GOOD_LIKES * 50)])
write(os.path.join(d, "archive.zip"), z[: len(z) // 2])

# 2. An entry marked encrypted (general-purpose flag bit 0 set in both headers).
d = case("encrypted-entry", ["secret.json: stored encrypted", "Weekend Pottery Fans"], args=JSON)
z = bytearray(zip_bytes([("secret.json", GOOD_LIKES), ("open/likes.json", GOOD_LIKES)]))
local = z.find(b"PK\x03\x04")
struct.pack_into("<H", z, local + 6, struct.unpack_from("<H", z, local + 6)[0] | 1)
central = z.find(b"PK\x01\x02")
struct.pack_into("<H", z, central + 8, struct.unpack_from("<H", z, central + 8)[0] | 1)
write(os.path.join(d, "archive.zip"), bytes(z))

# 3. Entry names that are not UTF-8 (a Latin-1 byte, no UTF-8 flag), written by hand.
def raw_stored_zip(name: bytes, data: bytes) -> bytes:
    crc = zlib.crc32(data)
    local = struct.pack("<IHHHHHIIIHH", 0x04034B50, 20, 0, 0, 0, 0, crc, len(data), len(data), len(name), 0) + name
    central = struct.pack("<IHHHHHHIIIHHHHHII", 0x02014B50, 20, 20, 0, 0, 0, 0, crc, len(data), len(data),
                          len(name), 0, 0, 0, 0, 0, 0) + name
    end = struct.pack("<IHHHHIIH", 0x06054B50, 0, 0, 1, 1, len(central), len(local) + len(data), 0)
    return local + data + central + end


d = case("non-utf8-names", ["Weekend Pottery Fans"], args=JSON)
write(os.path.join(d, "archive.zip"), raw_stored_zip(b"caf\xe9.json", GOOD_LIKES.encode()))

# 4. Text that is not UTF-8 inside a JSON file (Latin-1 bytes).
d = case("non-utf8-text", ["likes.json: not valid UTF-8 text", "Caf\ufffd Society"], args=JSON)
os.makedirs(os.path.join(d, "archive"))
write(os.path.join(d, "archive", "likes.json"), b'{"likes": [{"title": "Caf\xe9 Society"}]}')

# 5. A UTF-8 byte-order mark before the JSON.
d = case("bom", ["Weekend Pottery Fans"], args=JSON)
os.makedirs(os.path.join(d, "archive"))
write(os.path.join(d, "archive", "likes.json"), b"\xef\xbb\xbf" + GOOD_LIKES.encode())

# 6. UTF-8 text decoded as Latin-1 and re-encoded by an exporter, repaired by the mapping.
d = case("mis-decoded-utf8", ["Café Crème Lovers", "Łódź Sketchers"],
         mapping=LIKES_MAPPING + 'repair = "latin1-mojibake"\n', args=JSON)
os.makedirs(os.path.join(d, "archive"))
damaged = lambda s: s.encode("utf-8").decode("latin-1")
write(os.path.join(d, "archive", "likes.json"),
      json.dumps({"likes": [{"title": damaged("Café Crème Lovers")}, {"title": damaged("Łódź Sketchers")}]}, ensure_ascii=False))

# 7. Invalid JSON.
d = case("invalid-json", ["likes.json, line 3: not valid JSON", "file skipped"])
os.makedirs(os.path.join(d, "archive"))
write(os.path.join(d, "archive", "likes.json"), '{"likes": [\n {"title": "A"},\n {"title": "B",, }\n]}')

# 8. Ragged CSV.
d = case("ragged-csv", ["groups.csv, line 3: 2 rows have a different number of fields", "Chess Circle"], args=JSON,
         mapping='format = 1\n[[source]]\nkind = "group"\nfiles = ["groups.csv"]\nname = "Group"\ndate = "Joined"\n')
os.makedirs(os.path.join(d, "archive"))
write(os.path.join(d, "archive", "groups.csv"), "Group,Joined\nChess Circle,2020-01-02\nLonely\nA,2020-01-01,extra\n")

# 9. An empty zip.
d = case("empty-archive", ["the archive holds no files", "matched no file in the archive"])
write(os.path.join(d, "archive.zip"), zip_bytes([]))

# 10. A mapping that matches nothing in the archive.
d = case("mapping-matches-nothing", ["matched no file in the archive", 'files = ["**/*.json"]'])
os.makedirs(os.path.join(d, "archive"))
write(os.path.join(d, "archive", "notes.txt"), "nothing to see")

# 11. Priors of another format version.
d = case("priors-wrong-version", ["priors.json: this priors file is format 2; this telltale reads format 1"],
         exit_code=1, priors=json.dumps({"format": 2, "attributes": []}))
os.makedirs(os.path.join(d, "archive"))
write(os.path.join(d, "archive", "likes.json"), GOOD_LIKES)

# 12. Attribute names the priors do not have.
d = case("unknown-attribute",
         ["the mapping names attribute 'shoe_size'", "'Atlantis' is not a value of location"],
         mapping=LIKES_MAPPING + '\n[[source]]\nkind = "self"\nfiles = ["me.toml.json"]\n[source.attributes]\nshoe_size = "$.shoe"\nlocation = "$.home"\n')
os.makedirs(os.path.join(d, "archive"))
write(os.path.join(d, "archive", "likes.json"), GOOD_LIKES)
write(os.path.join(d, "archive", "me.toml.json"), '{"shoe": "42", "home": "Atlantis"}')

# 13. Duplicated items in the archive and in the priors.
priors = {
    "format": 1,
    "provenance": {"source": "corpus", "licence": "CC0-1.0", "created": "2026-12-01",
                   "method": "hand-made for a test", "synthetic": True},
    "attributes": [{"id": "age_band", "label": "Age band", "threshold": 0.5,
                    "values": [{"id": "young", "label": "Young", "base_rate": 0.5},
                               {"id": "old", "label": "Old", "base_rate": 0.5}]}],
    "items": [{"id": "p1", "name": "Quiet Chess Circle", "members": {"age_band": [1, 9]}},
              {"id": "p1", "name": "Quiet Chess Circle again", "members": {"age_band": [9, 1]}}],
}
d = case("duplicated-items", ["the id 'p1' is listed twice", '"items": 1'],
         priors=json.dumps(priors),
         args=["scan", "{archive}", "--mapping", "{mapping}", "--priors", "{priors}", "--format", "json"])
os.makedirs(os.path.join(d, "archive"))
write(os.path.join(d, "archive", "likes.json"),
      json.dumps({"likes": [{"title": "Quiet Chess Circle"}, {"title": "quiet chess circle!"}]}))

# 14. A compression bomb: 256 MiB of zeros in a ~250 KB entry (ratio about 1000:1).
d = case("compression-bomb", ["compression ratio of a zip entry", "--limit compression-ratio="], exit_code=1)
buf = io.BytesIO()
with zipfile.ZipFile(buf, "w", zipfile.ZIP_DEFLATED, compresslevel=9) as zf:
    info = zipfile.ZipInfo("likes.json", date_time=(2026, 11, 30, 0, 0, 0))
    info.compress_type = zipfile.ZIP_DEFLATED
    with zf.open(info, "w") as f:
        block = b"\0" * (1 << 20)
        for _ in range(256):
            f.write(block)
write(os.path.join(d, "archive.zip"), buf.getvalue())

# 15. JSON nested far too deep.
d = case("deep-json", ["JSON nested 5000 levels deep, over the limit of 128"])
os.makedirs(os.path.join(d, "archive"))
write(os.path.join(d, "archive", "likes.json"), "[" * 5000 + "]" * 5000)

# 16. An NDJSON line over the line limit (with the limit lowered to 1 KiB).
d = case("long-line", ["follows.ndjson, line 2: line longer than the limit of 1.0 KiB", "Short One"],
         mapping='format = 1\n[[source]]\nkind = "follow"\nfiles = ["follows.ndjson"]\nname = "$.who"\n',
         args=JSON + ["--limit", "line-bytes=1K"])
os.makedirs(os.path.join(d, "archive"))
write(os.path.join(d, "archive", "follows.ndjson"),
      '{"who": "Short One"}\n{"who": "' + "x" * 4000 + '"}\n')

# 17. A zip entry compressed with a method telltale does not read (bzip2).
d = case("unsupported-method", ["compressed with a method telltale does not read (Bzip2)"], args=JSON)
write(os.path.join(d, "archive.zip"), zip_bytes([("likes.json", GOOD_LIKES)], method=zipfile.ZIP_BZIP2))

# 18. Entry names that climb out of the archive: never extracted, read in place.
d = case("path-traversal-names", ["Weekend Pottery Fans"], args=JSON)
write(os.path.join(d, "archive.zip"), zip_bytes([("../../outside/likes.json", GOOD_LIKES)]))

# 19. Dates telltale cannot read.
d = case("bad-dates", ["likes.json, record 1, field 'date': 'next spring' is not a date telltale reads", "Weekend Pottery Fans"], args=JSON)
os.makedirs(os.path.join(d, "archive"))
write(os.path.join(d, "archive", "likes.json"),
      json.dumps({"likes": [{"title": "Weekend Pottery Fans", "at": "next spring"}]}))

# ---- Hostile reference priors (each refusal names the file; item problems are warnings
# naming the file, the item and the attribute, and the scan goes on).
BASE_PRIORS = {
    "format": 1,
    "provenance": {"source": "corpus", "licence": "CC0-1.0", "created": "2026-12-04",
                   "method": "hand-made for a test", "synthetic": True},
    "attributes": [{"id": "politics", "label": "Political leaning", "threshold": 0.5,
                    "values": [{"id": "left", "label": "Left", "base_rate": 0.5},
                               {"id": "right", "label": "Right", "base_rate": 0.5}]}],
    "items": [{"id": "p1", "name": "Weekend Pottery Fans", "kind": "like",
               "members": {"politics": [10, 30]}}],
}
PRIORS_JSON = ["scan", "{archive}", "--mapping", "{mapping}", "--priors", "{priors}", "--format", "json"]


def priors_case(name, expect, mutate, exit_code=0, args=None):
    p = json.loads(json.dumps(BASE_PRIORS))
    text = mutate(p)
    d = case(name, expect, exit_code=exit_code, args=args or PRIORS_JSON,
             priors=text if isinstance(text, str) else json.dumps(p))
    os.makedirs(os.path.join(d, "archive"))
    write(os.path.join(d, "archive", "likes.json"), GOOD_LIKES)
    return d


def set_counts(counts):
    return lambda p: p["items"][0]["members"].__setitem__("politics", counts)


# 20-37.
priors_case("priors-huge-counts",
            ["priors.json: items[0] ('Weekend Pottery Fans'): 'politics' has a count of 1e300, more members than any group can have; ignored"],
            set_counts([1e300, 1e300]))
priors_case("priors-negative-counts",
            ["priors.json: items[0] ('Weekend Pottery Fans'): 'politics' has a count below 0 (-4); taken as 0", '"best_guess": "right"'],
            set_counts([-4, 30]))
priors_case("priors-non-integer-counts", ['"best_guess": "right"', '"items_matched": 1'],
            set_counts([2.5, 30.75]))
priors_case("priors-wrong-length",
            ["priors.json: items[0] ('Weekend Pottery Fans'): 'politics' has 3 counts for 2 values; ignored"],
            set_counts([1, 2, 3]))
priors_case("priors-duplicate-ids",
            ["priors.json: items[1] ('Weekend Pottery Fans'): the id 'p1' is listed twice; the later entry is ignored"],
            lambda p: p["items"].append(json.loads(json.dumps(p["items"][0]))))
priors_case("priors-duplicate-values", ["priors.json", "the value 'left' is listed twice"],
            lambda p: p["attributes"][0]["values"].append({"id": "left", "label": "Left again", "base_rate": 0.1}),
            exit_code=1)
priors_case("priors-zero-rate", ["priors.json", "value 'left' has base_rate 0; base rates must be above 0"],
            lambda p: p["attributes"][0]["values"][0].__setitem__("base_rate", 0.0), exit_code=1)
priors_case("priors-subnormal-rate", ['"best_guess": "right"'],
            lambda p: (p["attributes"][0]["values"][0].__setitem__("base_rate", 5e-324),
                       p["attributes"][0]["values"][1].__setitem__("base_rate", 1.0)))
priors_case("priors-threshold-out-of-range", ["priors.json", "threshold 1.5 must be above 0 and at most 1"],
            lambda p: p["attributes"][0].__setitem__("threshold", 1.5), exit_code=1)
priors_case("priors-negative-threshold", ["priors.json", "threshold -0.2 must be above 0 and at most 1"],
            lambda p: p["attributes"][0].__setitem__("threshold", -0.2), exit_code=1)
priors_case("priors-not-a-number", ["priors.json: line 1", "number out of range"],
            lambda p: json.dumps(p).replace("[10, 30]", "[1e999, 30]"), exit_code=1)
priors_case("priors-deep-nesting", ["priors.json: line 1", "invalid type: sequence"],
            lambda p: json.dumps(p).replace("[10, 30]", "[" * 100000 + "]" * 100000), exit_code=1)
priors_case("priors-deep-provenance", ["priors.json: line 1", "invalid type"],
            lambda p: '{"format": 1, "provenance": {"source": ' + "[" * 50000 + "]" * 50000 + "}}", exit_code=1)
priors_case("priors-huge-string", ["priors.json: items[1] ('" + "x" * 60 + "…'): the name is 2,097,152 bytes long, over the limit of 4.0 KiB (name-bytes); item skipped (raise it with --limit name-bytes=SIZE if you trust the file)", '"best_guess": "right"'],
            lambda p: p["items"].append({"name": "x" * (2 << 20), "members": {"politics": [1, 1]}}))
priors_case("priors-truncated", ["priors.json: line 1, column 200", "EOF while parsing"],
            lambda p: json.dumps(p)[:200], exit_code=1)
priors_case("priors-no-attributes", ["priors.json", "no attributes: the file must list at least one"],
            lambda p: p.__setitem__("attributes", []), exit_code=1)
priors_case("priors-shares-negative-n",
            ["priors.json: items[0] ('Weekend Pottery Fans'): 'politics' has a count below 0"],
            set_counts({"shares": [0.5, 0.5], "n": -10}))


def many_values(p):
    n = 100000
    p["attributes"][0]["values"] = [{"id": str(i), "label": "v", "base_rate": 1.0 / n} for i in range(n)]
    p["items"] = []


priors_case("priors-100000-values", ["priors.json: attributes[0] (politics) has 100,000 values, over the limit of 10,000 (values: the number of values of one attribute); raise it with --limit values=N if you trust the file"],
            many_values, exit_code=1)

# ---- Reading limits on the priors file (docs/priors.md, "Limits"): each message names
# the file, the field and the limit.
LIMIT = lambda setting: PRIORS_JSON + ["--limit", setting]
priors_case("priors-over-size", ["priors.json: the file is", "over the limit of 100 bytes (priors-bytes: the size of a priors file); raise it with --limit priors-bytes=SIZE"],
            lambda p: None, exit_code=1, args=LIMIT("priors-bytes=100"))
priors_case("priors-too-many-items", ["priors.json: the file lists more than 2 reference items, over the limit of 2 (priors-items", "--limit priors-items=N"],
            lambda p: p["items"].extend([{"name": f"Filler {i}", "members": {"politics": [1, 1]}} for i in range(2)]),
            exit_code=1, args=LIMIT("priors-items=2"))
priors_case("priors-many-aliases",
            ["priors.json: items[0] ('Weekend Pottery Fans'): 1,501 aliases, over the limit of 1,000 (aliases); the first 1,000 kept",
             "priors.json: items[0] ('Weekend Pottery Fans'): alias 1 is over the limit of 4.0 KiB (name-bytes); ignored", '"best_guess": "right"'],
            lambda p: p["items"][0].__setitem__("aliases", ["Pottery Weekenders", "a" * 5000] + [f"alias {i}" for i in range(1499)]))
priors_case("priors-long-label", ["priors.json: attributes[0] (politics).values[1].label is 5,000 bytes long, over the limit of 4.0 KiB (name-bytes"],
            lambda p: p["attributes"][0]["values"][1].__setitem__("label", "R" * 5000), exit_code=1)
priors_case("priors-many-member-attributes",
            ["priors.json: items[0] ('Weekend Pottery Fans'): members for 301 attributes, over the limit of 256 (attributes); the rest ignored"],
            lambda p: p["items"][0]["members"].update({f"other-{i:03}": [1, 1] for i in range(300)}))
priors_case("priors-long-count-list", ["priors.json: items[0] ('Weekend Pottery Fans'): 'politics' has 20000 counts for 2 values; ignored"],
            set_counts([1] * 20000))
priors_case("priors-items-first-long-name",
            ["priors.json: items[0] ('" + "n" * 60 + "…'): the name is 5,000 bytes long, over the limit of 4.0 KiB (name-bytes); item skipped", '"items_matched": 1'],
            lambda p: json.dumps({"items": [{"name": "n" * 5000, "members": {"politics": [1, 1]}}] + p["items"],
                                  "format": 1, "provenance": p["provenance"], "attributes": p["attributes"]}))

# ---- A tampered priors cache (tests/corpus.rs makes the real cache of
# shared/cache-priors.json, 20,001 items, in a temporary cache folder, then spoils it
# as case.toml's `cache` says; each run must name the cache and the file, read the
# JSON instead, rebuild the cache and leave the saved decisions alone).
shared = os.path.join(ROOT, "shared")
os.makedirs(shared, exist_ok=True)
cache_priors = json.loads(json.dumps(BASE_PRIORS))
cache_priors["attributes"][0]["threshold"] = 0.4375  # a figure found once in the cache
cache_priors["items"] += [{"name": f"Filler item {i}", "members": {"politics": [1 + i % 7, 2]}} for i in range(20000)]
write(os.path.join(shared, "cache-priors.json"), json.dumps(cache_priors))
CACHE_ARGS = ["scan", "{archive}", "--mapping", "{mapping}", "--priors", "{shared}/cache-priors.json", "--format", "json"]
for mode, why in [("truncated", "cut short or padded"),
                  ("bit-flipped", "damaged: its checksum does not match"),
                  ("wrong-version", "made by another version of telltale"),
                  ("absurd-values", "its contents are inconsistent"),
                  ("other-file", "made from another priors file"),
                  ("not-a-cache", "not a telltale priors cache")]:
    d = case(f"priors-cache-{mode}",
             ["cache-priors.json was not used (" + why + "); read", "cache-priors.json itself instead", '"best_guess": "right"'],
             args=CACHE_ARGS)
    with open(os.path.join(d, "case.toml"), "a") as f:
        f.write(f'cache = "{mode}"\n')
    os.makedirs(os.path.join(d, "archive"))
    write(os.path.join(d, "archive", "likes.json"), GOOD_LIKES)

# ---- Friends files and mappings over their limits.
FRIENDS = ["scan", "{archive}", "--mapping", "{mapping}", "--friends", "{friends}", "--format", "json"]


def friends_case(name, expect, csv, extra=(), exit_code=0):
    d = case(name, expect, exit_code=exit_code, args=FRIENDS + list(extra))
    os.makedirs(os.path.join(d, "archive"))
    write(os.path.join(d, "archive", "likes.json"), GOOD_LIKES)
    write(os.path.join(d, "friends.csv"), csv)


friends_case("friends-too-many-rows", ["friends.csv: more than 2 rows, over the limit (friends-rows: the number of rows in a friends file); the rest are not read (raise it with --limit friends-rows=N if you trust the file)"],
             "name,politics\nAda,left\nBo,right\nCy,left\nDee,right\n", extra=["--limit", "friends-rows=2"])
friends_case("friends-long-field", ["friends.csv, record 2: field 'name' is 5,000 bytes long, over the limit of 4.0 KiB (name-bytes); row skipped"],
             "name,politics\nAda,left\n" + "B" * 5000 + ",right\n")
friends_case("friends-over-size", ["friends.csv: the friends file is", "over the limit of 10 bytes (friends-bytes: the size of a friends file); raise it with --limit friends-bytes=SIZE"],
             "name,politics\nAda,left\n", extra=["--limit", "friends-bytes=10"], exit_code=1)

d = case("mapping-over-size", ["mapping.toml: the mapping file is 112 bytes, over the limit of 50 bytes (mapping-bytes: the size of a mapping file); raise it with --limit mapping-bytes=SIZE"],
         exit_code=1, args=JSON + ["--limit", "mapping-bytes=50"])
os.makedirs(os.path.join(d, "archive"))
write(os.path.join(d, "archive", "likes.json"), GOOD_LIKES)

d = case("mapping-inside-over-size", ["telltale-mapping.toml (inside archive): the mapping file is 112 bytes, over the limit of 50 bytes (mapping-bytes"],
         exit_code=1, args=["scan", "{archive}", "--limit", "mapping-bytes=50"])
os.makedirs(os.path.join(d, "archive"))
write(os.path.join(d, "archive", "likes.json"), GOOD_LIKES)
write(os.path.join(d, "archive", "telltale-mapping.toml"), LIKES_MAPPING)

# ---- Hostile mappings.
d = case("mapping-deep-toml", ["mapping.toml: line 2", "not valid TOML: cannot recurse further"], exit_code=1,
         mapping="format = 1\nx = " + "[" * 100000 + "]" * 100000 + "\n")
os.makedirs(os.path.join(d, "archive"))
write(os.path.join(d, "archive", "likes.json"), GOOD_LIKES)

d = case("mapping-thousands-of-sources", ["Weekend Pottery Fans"], args=JSON,
         mapping="format = 1\n" + "".join(
             f'[[source]]\nkind = "like"\nfiles = ["nothing-{i}/*.json"]\nname = "$.title"\n' for i in range(2000))
         + LIKES_MAPPING.replace("format = 1\n", ""))
os.makedirs(os.path.join(d, "archive"))
write(os.path.join(d, "archive", "likes.json"), GOOD_LIKES)

d = case("mapping-pathological-jsonpath", ["likes.json, record 1, field 'name': no name; record skipped", "Weekend Pottery Fans"], args=JSON,
         mapping='format = 1\n[[source]]\nkind = "like"\nfiles = ["likes.json"]\nrecords = "$..*..*..*..*..*..*"\nname = "$.title"\n')
os.makedirs(os.path.join(d, "archive"))
write(os.path.join(d, "archive", "likes.json"), json.dumps({"likes": [[[[[[{"title": "Weekend Pottery Fans"}]]]]] for _ in range(200)]}))

# ---- Hostile archives.
d = case("archive-absolute-names", ["Weekend Pottery Fans"], args=JSON)
write(os.path.join(d, "archive.zip"), zip_bytes([("/etc/likes.json", GOOD_LIKES)]))

d = case("archive-duplicate-names", ['"files_read": 1'], args=JSON)
write(os.path.join(d, "archive.zip"), zip_bytes([("likes.json", GOOD_LIKES), ("likes.json", GOOD_LIKES.replace("Weekend", "Midweek"))]))


def symlink_zip(name, target):
    buf = io.BytesIO()
    with zipfile.ZipFile(buf, "w") as z:
        info = zipfile.ZipInfo(name, date_time=(2026, 11, 30, 0, 0, 0))
        info.create_system = 3
        info.external_attr = (0o120777 << 16)
        z.writestr(info, target)
        ok = zipfile.ZipInfo("open/likes.json", date_time=(2026, 11, 30, 0, 0, 0))
        z.writestr(ok, GOOD_LIKES)
    return buf.getvalue()


d = case("archive-symlink-entry", ["secret.json, line 1: not valid JSON", "Weekend Pottery Fans"], args=JSON)
write(os.path.join(d, "archive.zip"), symlink_zip("secret.json", "/etc/passwd"))

d = case("archive-lying-sizes", ["likes.json: cannot read: File is larger than its declared uncompressed size; file skipped"], args=JSON)
z = bytearray(zip_bytes([("likes.json", GOOD_LIKES * 20)]))
central = z.find(b"PK\x01\x02")
struct.pack_into("<I", z, central + 24, 10)  # uncompressed size: 10 bytes
local = z.find(b"PK\x03\x04")
struct.pack_into("<I", z, local + 22, 10)
write(os.path.join(d, "archive.zip"), bytes(z))

d = case("archive-lying-sizes-huge", ["likes.json: over the limit on decompressed size of one mapped entry", "--limit entry-bytes="], exit_code=1, args=JSON)
z = bytearray(zip_bytes([("likes.json", GOOD_LIKES)]))
central = z.find(b"PK\x01\x02")
struct.pack_into("<I", z, central + 24, 0xFFFFFFF0)
local = z.find(b"PK\x03\x04")
struct.pack_into("<I", z, local + 22, 0xFFFFFFF0)
write(os.path.join(d, "archive.zip"), bytes(z))

d = case("folder-symlink-outside", ["etc-link: symbolic link not followed; left out", "Weekend Pottery Fans"], args=JSON)
os.makedirs(os.path.join(d, "archive"))
write(os.path.join(d, "archive", "likes.json"), GOOD_LIKES)
os.symlink("/etc", os.path.join(d, "archive", "etc-link"))

print("corpus written to", ROOT)
