#!/usr/bin/env python3
"""An independent implementation of docs/split-spec.md (split-v1), written from the
document alone with Python's hashlib and integers. The test suite runs it on the spec's
test vectors and compares with the expected assignments, so the spec is shown to be
implementable without foldseal's code.

Usage: python3 split_v1.py < vectors.json  → prints {"name": ["id,repeat,fold", ...], ...}
"""
import hashlib
import json
import sys

DOMAIN = b"foldseal/split-v1"


def key(seed, repeat, ident):
    msg = DOMAIN + b"\x00" + str(seed).encode("ascii") + b"\x00" + str(repeat).encode("ascii") + b"\x00" + ident.encode("utf-8")
    return hashlib.sha256(msg).digest()


def key_order(idents, seed, repeat):
    # Ascending by the 32 digest bytes, then by the id's UTF-8 bytes.
    return sorted(idents, key=lambda i: (key(seed, repeat, i), i.encode("utf-8")))


def prefix32(digest):
    return int.from_bytes(digest[:4], "big")


def utf8(s):
    return s.encode("utf-8")


# §6: white space for quoting, exactly as the spec lists it.
WHITE = set(chr(c) for c in list(range(0x09, 0x0E)) + [0x20, 0xA0, 0x1680] + list(range(0x2000, 0x200B)) + [0x2028, 0x2029, 0x202F, 0x205F, 0x3000, 0xFEFF])


def csv_cell(s):
    if any(ch in s for ch in ',"\r\n') or (s and (s[0] in WHITE or s[-1] in WHITE)):
        return '"' + s.replace('"', '""') + '"'
    return s


def rejection(v):
    """Spec §8: the reason an input is rejected, as foldseal's problem code, or None."""
    rule, rows = v["rule"], v["rows"]
    labels = [r[1] for r in rows]
    k = v.get("folds", 5)
    if rule in ("kfold", "stratified-kfold") and k > len(rows):
        return "too-many-folds"
    groups = set(r[2] for r in rows) if rows and len(rows[0]) > 2 else set()
    if rule == "grouped-kfold" and k > len(groups):
        return "too-many-folds"
    if rule == "leave-group-out" and len(groups) < 2:
        return "too-few-groups"
    if rule == "stratified-kfold" and v.get("assign", "balanced") == "balanced" and min(labels.count(c) for c in set(labels)) < k:
        return "class-smaller-than-folds"
    lines = assign(v)
    for rep in range(1, v.get("repeats", 1) + 1):
        folds = [int(l.rsplit(",", 2)[2]) for l in lines if int(l.rsplit(",", 2)[1]) == rep]
        if rule == "holdout":
            if folds.count(1) in (0, len(folds)):
                return "empty-part"
        elif rule in ("kfold", "stratified-kfold", "grouped-kfold") and set(folds) != set(range(1, k + 1)):
            return "empty-fold"
    return None


def assign(v):
    rule = v["rule"]
    rows = v["rows"]
    ids = [r[0] for r in rows]
    label = {r[0]: r[1] for r in rows}
    group = {r[0]: r[2] for r in rows} if rows and len(rows[0]) > 2 else {}
    k = v.get("folds", 5)
    seed = v.get("seed", 0)
    mode = v.get("assign", "balanced")
    out = []
    for shown_rep in range(1, v.get("repeats", 1) + 1):
        # §9: an inner split's keys carry "R.F.r" in the repeat field.
        rep = f"{v['outer'][0]}.{v['outer'][1]}.{shown_rep}" if "outer" in v else shown_rep
        fold = {}
        if rule in ("kfold", "stratified-kfold") and mode == "stable":
            for i in ids:
                fold[i] = prefix32(key(seed, rep, i)) % k + 1
        elif rule == "kfold":
            for p, i in enumerate(key_order(ids, seed, rep)):
                fold[i] = p % k + 1
        elif rule == "stratified-kfold":
            counter = 0
            for c in sorted(set(label.values()), key=utf8):
                for i in key_order([i for i in ids if label[i] == c], seed, rep):
                    fold[i] = counter % k + 1
                    counter += 1
        elif rule == "grouped-kfold":
            groups = sorted(set(group.values()), key=utf8)
            if mode == "stable":
                gf = {g: prefix32(key(seed, rep, g)) % k + 1 for g in groups}
            else:
                size = {g: sum(1 for i in ids if group[i] == g) for g in groups}
                order = sorted(groups, key=lambda g: (-size[g], key(seed, rep, g), utf8(g)))
                load = [0] * k
                gf = {}
                for g in order:
                    best = min(range(k), key=lambda f: (load[f], f))
                    gf[g] = best + 1
                    load[best] += size[g]
            for i in ids:
                fold[i] = gf[group[i]]
        elif rule == "holdout":
            p = round(v["test-fraction"] * 1000000)
            for i in ids:
                fold[i] = 2
            if mode == "stable":
                for i in ids:
                    if prefix32(key(seed, rep, i)) * 1000000 < p * 2**32:
                        fold[i] = 1
            else:
                for c in sorted(set(label.values()), key=utf8):
                    members = key_order([i for i in ids if label[i] == c], seed, rep)
                    t = (len(members) * p + 500000) // 1000000
                    for i in members[:t]:
                        fold[i] = 1
        elif rule == "leave-one-out":
            for r, i in enumerate(sorted(ids, key=utf8)):
                fold[i] = r + 1
        elif rule == "leave-group-out":
            gs = sorted(set(group.values()), key=utf8)
            for i in ids:
                fold[i] = gs.index(group[i]) + 1
        for i in sorted(ids, key=utf8):
            out.append(f"{csv_cell(i)},{shown_rep},{fold[i]}")
    return out


if __name__ == "__main__":
    vectors = json.load(sys.stdin)
    out = {}
    for v in vectors:
        reason = rejection(v)
        out[v["name"]] = {"reject": reason} if reason else assign(v)
    json.dump(out, sys.stdout)
