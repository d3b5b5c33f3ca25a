#!/usr/bin/env python3
"""Build phasewise's shipped knowledge-base seed files (data/kb/*.tsv.gz).

Sources (see data/ATTRIBUTION.md):
  * the MIT-licensed Python package `chemicals` 1.5.2 (PyPI): PubChem identifier
    tables `Identifiers/chemical identifiers pubchem large.tsv`, `... small.tsv` and
    `... example user db.tsv`, and `Identifiers/Anion db.tsv`, `Cation db.tsv`, `Inorganic db.tsv`;
    `Misc/wikidata_properties.tsv` (values from Wikidata, CC0) for boiling point and logP.
  * experimental aqueous pKa, CC BY 4.0 rows only, from ../shared/data/pka/pka_train.tsv
    (Baltruschat & Czodrowski 2020).
Deliberately NOT used: the handbook-derived tables of `chemicals` (CRC, Syrres logP),
the CAS Common Chemistry table, Yaws, DIPPR and NIST-derived files.

Usage:  python3 tools/build_seed.py [--chemicals-wheel PATH] [--pka PATH]
Without --chemicals-wheel the wheel is fetched with `pip download chemicals==1.5.2`.
Output is deterministic (sorted rows, gzip mtime 0).
"""
import argparse, csv, gzip, io, os, subprocess, sys, tempfile, zipfile

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.dirname(HERE)
OUT = os.path.join(ROOT, "data", "kb")
MAX_SYNONYMS = 60          # per compound; PubChem synonym lists have a long tail of catalogue numbers
MAX_NAME_LEN = 120

def fetch_wheel():
    d = tempfile.mkdtemp()
    subprocess.check_call([sys.executable, "-m", "pip", "download", "--no-deps", "-q",
                           "chemicals==1.5.2", "-d", d])
    return os.path.join(d, [f for f in os.listdir(d) if f.endswith(".whl")][0])

def read_member(z, name):
    return z.read("chemicals/" + name).decode("utf-8")

def cas_ok(cas):
    parts = cas.split("-")
    if len(parts) != 3 or not all(p.isdigit() for p in parts):
        return False
    digits = (parts[0] + parts[1])[::-1]
    return sum((i + 1) * int(c) for i, c in enumerate(digits)) % 10 == int(parts[2])

def useful_name(s):
    s = s.strip()
    if not s or len(s) > MAX_NAME_LEN:
        return False
    low = s.lower()
    # registry numbers and catalogue codes are noise for a chemist's look-up
    for p in ("dtxsid", "dtxcid", "chembl", "akos", "mfcd", "unii-", "nsc ", "ns0", "schembl", "zinc", "bdbm", "chebi:", "cas-"):
        if low.startswith(p):
            return False
    return True

def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--chemicals-wheel")
    ap.add_argument("--pka", default=os.path.join(ROOT, "..", "shared", "data", "pka", "pka_train.tsv"))
    a = ap.parse_args()
    wheel = a.chemicals_wheel or fetch_wheel()
    z = zipfile.ZipFile(wheel)
    compounds = {}   # inchikey -> dict
    order = []
    def add_rows(text, source):
        for line in text.splitlines():
            f = line.split("\t")
            if len(f) < 8:
                continue
            cid, cas, formula, mw, smiles, inchi, key = f[:7]
            names = [n for n in f[7:] if n]
            if not key or not smiles:
                continue
            if key in compounds:
                c = compounds[key]
                for n in names:
                    if n not in c["names"]:
                        c["names"].append(n)
                continue
            try:
                cid_i = int(cid)
            except ValueError:
                cid_i = -1
            # the second name column is the common name; prefer it over the IUPAC form
            pref = names[1] if len(names) > 1 else (names[0] if names else key)
            compounds[key] = dict(cid=cid_i if cid_i > 0 else "", cas=cas if cas_ok(cas) else "",
                                  formula=formula, mw=mw, smiles=smiles, key=key, pref=pref,
                                  names=names, source=source)
            order.append(key)
    # The package's "example user db" holds many of the commonest chemicals (hexane, aspirin)
    # that the large table lacks; it is read first so its records win on duplicates.
    add_rows(read_member(z, "Identifiers/chemical identifiers example user db.tsv"), "pubchem-common")
    add_rows(read_member(z, "Identifiers/chemical identifiers pubchem small.tsv"), "pubchem-small")
    add_rows(read_member(z, "Identifiers/chemical identifiers pubchem large.tsv"), "pubchem-large")
    for f, s in (("Anion db.tsv", "ions-anion"), ("Cation db.tsv", "ions-cation"), ("Inorganic db.tsv", "inorganic")):
        add_rows(read_member(z, "Identifiers/" + f), s)

    by_cas = {c["cas"]: k for k, c in compounds.items() if c["cas"]}
    os.makedirs(OUT, exist_ok=True)

    def write_gz(path, header, rows):
        # Raw fields, no escaping: the Rust reader splits on tabs and takes every byte as data.
        # (A csv writer with an escape character used to double every backslash and escape every
        # double quote, so a stereo SMILES with a backslash bond arrived with the backslash doubled
        # and did not parse; names with quotes carried a stray backslash.)
        buf = io.StringIO()
        for r in [header] + rows:
            cells = [str(x).replace("\t", " ").replace("\r", " ").replace("\n", " ") for x in r]
            buf.write("\t".join(cells) + "\n")
        with open(path, "wb") as fh:
            with gzip.GzipFile(fileobj=fh, mode="wb", compresslevel=9, mtime=0, filename="") as g:
                g.write(buf.getvalue().encode("utf-8"))

    rows = []
    for k in sorted(compounds):
        c = compounds[k]
        names = []
        seen = set()
        for n in c["names"]:
            n = n.strip()
            if n.lower() in seen or not useful_name(n):
                continue
            seen.add(n.lower())
            names.append(n)
        names = names[:MAX_SYNONYMS]
        # "|" separates synonyms; drop it from names themselves (very rare)
        names = [n.replace("|", "/") for n in names]
        rows.append([c["key"], c["cid"], c["cas"], c["formula"], c["mw"], c["smiles"],
                     c["pref"].replace("|", "/"), c["source"], "|".join(names)])
    write_gz(os.path.join(OUT, "compounds.tsv.gz"),
             ["inchikey", "cid", "cas", "formula", "molar_mass_g_mol", "smiles", "preferred_name", "table", "synonyms"], rows)

    props = []
    wd = read_member(z, "Misc/wikidata_properties.tsv").splitlines()
    hdr = wd[0].split("\t")
    for line in wd[1:]:
        f = dict(zip(hdr, line.split("\t")))
        try:
            casn = int(f["CAS"])
        except (KeyError, ValueError):
            continue
        s = str(casn)
        cas = f"{s[:-3]}-{s[-3:-1]}-{s[-1]}"
        key = by_cas.get(cas)
        if not key:
            continue
        if f.get("Tb"):
            props.append([key, "boiling_point", f"{float(f['Tb']):.2f}", "K", "experimental",
                          "Wikidata via chemicals 1.5.2 wikidata_properties.tsv", "CC0-1.0", ""])
        if f.get("logP"):
            props.append([key, "logp", f"{float(f['logP']):.3f}", "", "experimental",
                          "Wikidata via chemicals 1.5.2 wikidata_properties.tsv", "CC0-1.0", ""])
    n_pka = 0
    with open(a.pka, encoding="utf-8") as fh:
        r = csv.DictReader(fh, delimiter="\t")
        for row in r:
            if row["licence"] != "CC BY 4.0":
                continue
            key = row["inchikey"]
            if key not in compounds:
                continue
            temp = row.get("temp_C") or ""
            props.append([key, "pka", row["pka"], "", "experimental",
                          row["source"] + " (Baltruschat & Czodrowski 2020, doi:10.12688/f1000research.22090.2)",
                          "CC-BY-4.0", "type=" + (row["pka_type"] or "unspecified") + (";temp_c=" + temp if temp else "")])
            n_pka += 1
    props.sort()
    write_gz(os.path.join(OUT, "properties.tsv.gz"),
             ["inchikey", "property", "value", "unit", "kind", "source", "licence", "detail"], props)
    print(f"compounds: {len(rows)}  properties: {len(props)} (pKa rows: {n_pka})", file=sys.stderr)

if __name__ == "__main__":
    main()
