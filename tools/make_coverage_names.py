#!/usr/bin/env python3
"""Coverage list for the name-resolution test (tests/data/coverage_names.tsv, issue 13).

Commonly analysed compounds = names of the open retention data (RepoRT training tables,
../shared/data/retention/retention.tsv, CC BY-SA 4.0) measured in at least MIN_SETS
chromatographic datasets, whose name the data gives to one InChIKey only; plus the names of the
experimental pKa set (../shared/data/pka/pka_train.tsv, CC BY 4.0 rows) that have a name.
Each row: name, InChIKey (from the source), source. Deterministic.

Usage: python3 tools/make_coverage_names.py [--min-sets 3]
"""
import argparse, csv, os, sys

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.dirname(HERE)
sys.path.insert(0, HERE)
from build_seed import clean_retention_name, has_stereo_word  # noqa: E402


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--retention", default=os.path.join(ROOT, "..", "shared", "data", "retention", "retention.tsv"))
    ap.add_argument("--pka", default=os.path.join(ROOT, "..", "shared", "data", "pka", "pka_train.tsv"))
    ap.add_argument("--min-sets", type=int, default=3)
    ap.add_argument("--out", default=os.path.join(ROOT, "tests", "data", "coverage_names.tsv"))
    a = ap.parse_args()
    sets, keys = {}, {}
    with open(a.retention, encoding="utf-8", newline="") as fh:
        for row in csv.DictReader(fh, delimiter="\t"):
            n = clean_retention_name(row["name"])
            if not n or not row["inchikey"]:
                continue
            low = n.lower()
            sets.setdefault(low, [n, set()])[1].add(row["dataset_id"])
            keys.setdefault(low, set()).add(row["inchikey"])
    rows = []
    for low, (n, s) in sorted(sets.items()):
        # a stereo name on a structure without stereo has no single expected record
        if len(s) >= a.min_sets and len(keys[low]) == 1 and not has_stereo_word(n):
            rows.append((n, next(iter(keys[low])), "RepoRT retention data (CC BY-SA 4.0), %d datasets" % len(s)))
    seen = {r[0].lower() for r in rows}
    if os.path.exists(a.pka):
        with open(a.pka, encoding="utf-8", newline="") as fh:
            for row in csv.DictReader(fh, delimiter="\t"):
                n = (row.get("name") or "").strip()
                if n and row["licence"] == "CC BY 4.0" and n.lower() not in seen and clean_retention_name(n):
                    seen.add(n.lower())
                    rows.append((n, row["inchikey"], "open pKa data (Baltruschat & Czodrowski 2020, CC BY 4.0)"))
    with open(a.out, "w", encoding="utf-8") as f:
        f.write("# Commonly analysed compounds by name (tools/make_coverage_names.py). Sources named per row.\n")
        f.write("name\tinchikey\tsource\n")
        for r in rows:
            f.write("\t".join(r) + "\n")
    print("%d names -> %s" % (len(rows), a.out), file=sys.stderr)


if __name__ == "__main__":
    main()
