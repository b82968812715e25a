"""The archive (layout L, as `telltale synth large` writes it) and the friends file, read
the way docs/evidence.md and docs/mapping.md describe them, for scripts/python_sources.py.
Independent of telltale's code."""

import csv
import io
import json
import zipfile
from datetime import datetime

from python_lexicons import name_key


def unix(value):
    if isinstance(value, (int, float)):
        return int(value)
    return int(datetime.fromisoformat(value.replace("Z", "+00:00")).timestamp())


# Layout L's friend fields per attribute id (its mapping, telltale-mapping.toml).
FRIEND_FIELDS = {"age_band": "age_range", "location": "lives_in", "politics": "leaning",
                 "religion": "faith"}


def read_archive(path):
    """Items as dicts (kind, id, name, date), records of one kind merged by id or, with
    no id, by name key (the earliest date kept); friends as dicts (id, name, values)."""
    items, where = [], {}
    friends = []
    with zipfile.ZipFile(path) as z:
        names = sorted(z.namelist())
        records = []
        for n in names:
            if n.startswith("activity/liked/") and n.endswith(".json"):
                for p in json.loads(z.read(n))["pages"]:
                    records.append(("like", p.get("page_ref"), p["title"].strip(), unix(p["at"])))
        for g in json.loads(z.read("communities/memberships.json"))["groups"]:
            records.append(("group", None, g["group_name"].strip(), unix(g["since"])))
        for kind, ident, name, date in records:
            key = (kind, "id", ident) if ident is not None else (kind, "name", name_key(name))
            if key in where:
                it = items[where[key]]
                it["date"] = min(it["date"], date)
                continue
            where[key] = len(items)
            items.append({"kind": kind, "id": ident, "name": name, "date": date})
        for f in json.loads(z.read("people/friends.json"))["friends"]:
            friends.append({"id": f.get("uid"), "name": f.get("name", ""),
                            "date": unix(f["since"]) if "since" in f else None,
                            "values": {a: f.get("public", {}).get(field)
                                       for a, field in FRIEND_FIELDS.items()}})
    return items, friends


def merge_friends_file(path, friends, attrs):
    """docs/evidence.md, "The friends file": separator the most frequent of , ; tab in
    the header; name and/or id columns; one column per attribute (id or label); rows
    matched by id, else by name key; a value from the file replaces the archive's."""
    with open(path, encoding="utf-8") as f:
        text = f.read()
    header = text.splitlines()[0]
    sep = max([",", ";", "\t"], key=header.count)
    rows = list(csv.reader(io.StringIO(text), delimiter=sep))
    head = [h.strip().lower() for h in rows[0]]
    name_col = next((i for i, h in enumerate(head) if h in ("name", "friend", "full name")), None)
    id_col = next((i for i, h in enumerate(head) if h in ("id", "uid", "friend id")), None)
    attr_cols = {}
    for i, h in enumerate(head):
        for a in attrs:
            if h in (a["id"].lower(), a["label"].lower()):
                attr_cols[i] = a["id"]
    for row in rows[1:]:
        cell = lambda i: row[i].strip() if i is not None and i < len(row) else ""
        ident, name = cell(id_col), cell(name_col)
        if not ident and not name:
            continue
        match = None
        for fr in friends:
            if ident and fr["id"] and fr["id"] == ident:
                match = fr
                break
        if match is None and name:
            match = next((fr for fr in friends if name_key(fr["name"]) == name_key(name)), None)
        if match is None:
            match = {"id": ident or None, "name": name, "date": None, "values": {}}
            friends.append(match)
        for i, a in attr_cols.items():
            if cell(i):
                match["values"][a] = cell(i)
    return friends
