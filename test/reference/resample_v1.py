#!/usr/bin/env python3
"""An independent reading of docs/resample-spec.md (resample-v1), written from the text only.

Usage: resample_v1.py vectors   -> prints the spec's test vectors as JSON lines
       resample_v1.py check FILE -> reads JSON lines of vectors, recomputes each, exits 1 on a mismatch
"""
import hashlib, json, sys

DOMAIN = b"foldseal/resample-v1"

def bootstrap_draw(seed, replicate, repeat, label, m):
    out = []
    for j in range(m):
        t = j // 8
        msg = DOMAIN + b"\0bootstrap\0" + str(seed).encode() + b"\0" + str(replicate).encode() + b"\0" + \
            str(repeat).encode() + b"\0" + label.encode("utf-8") + b"\0" + str(t).encode()
        d = hashlib.sha256(msg).digest()
        i = j % 8
        w = int.from_bytes(d[4 * i:4 * i + 4], "big")
        out.append((w * m) >> 32)
    return out

def permute(seed, p, ids, labels, strata=None):
    def key(i):
        return hashlib.sha256(DOMAIN + b"\0permute\0" + str(seed).encode() + b"\0" + str(p).encode() + b"\0" + i.encode("utf-8")).digest()
    out = [None] * len(ids)
    groups = {}
    for idx in sorted(range(len(ids)), key=lambda i: ids[i].encode("utf-8")):
        groups.setdefault(strata[idx] if strata else "", []).append(idx)
    for rows in groups.values():
        by_key = sorted(rows, key=lambda i: (key(ids[i]), ids[i].encode("utf-8")))
        for k, row in enumerate(rows):
            out[by_key[k]] = labels[row]
    return out

CASES_BOOT = [(7, 1, 1, "yes", 5), (7, 2, 1, "yes", 5), (20261201, 1, 2, "no", 12), (0, 1000, 3, "café", 9), (1, 1, 1, "a", 1)]
CASES_PERM = [
    (7, 1, ["s1", "s2", "s3", "s4", "s5", "s6"], ["a", "a", "a", "b", "b", "b"], None),
    (7, 2, ["s1", "s2", "s3", "s4", "s5", "s6"], ["a", "a", "a", "b", "b", "b"], None),
    (11, 1, ["x3", "x1", "é2", "x2", "y1", "y2"], ["p", "q", "p", "q", "p", "q"], ["g1", "g1", "g1", "g2", "g2", "g2"]),
]

def vectors():
    for seed, b, r, label, m in CASES_BOOT:
        print(json.dumps({"seed": seed, "replicate": b, "repeat": r, "label": label, "rows": m,
                          "drawn": bootstrap_draw(seed, b, r, label, m)}, ensure_ascii=False))
    for seed, p, ids, labels, strata in CASES_PERM:
        v = {"seed": seed, "permutation": p, "ids": ids, "labels": labels}
        if strata:
            v["strata"] = strata
        v["permuted"] = permute(seed, p, ids, labels, strata)
        print(json.dumps(v, ensure_ascii=False))

def check(path):
    bad = 0
    for line in open(path, encoding="utf-8"):
        v = json.loads(line)
        if "drawn" in v:
            got = bootstrap_draw(v["seed"], v["replicate"], v["repeat"], v["label"], v["rows"])
            want = v["drawn"]
        else:
            got = permute(v["seed"], v["permutation"], v["ids"], v["labels"], v.get("strata"))
            want = v["permuted"]
        if got != want:
            bad += 1
            print("mismatch", line.strip(), "got", got)
    sys.exit(1 if bad else 0)

if __name__ == "__main__":
    if sys.argv[1] == "vectors":
        vectors()
    else:
        check(sys.argv[2])
