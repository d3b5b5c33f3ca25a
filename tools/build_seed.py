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

STEREO_PREFIXES = ("(+)", "(-)", "(±)", "(r)", "(s)", "(e)", "(z)", "cis-", "trans-", "d-", "l-",
                   "(2r", "(2s", "(1r", "(1s", "(3r", "(3s", "(4r", "(4s", "(5r", "(5s", "(6r", "(6s",
                   "r-", "s-", "(r,", "(s,", "dl-", "rac-", "e-", "z-", "meso-", "endo-", "exo-", "alpha-d-", "beta-d-")


def has_stereo_word(name):
    low = name.lower()
    return low.startswith(STEREO_PREFIXES) or "-(r)-" in low or "-(s)-" in low or "(e)-" in low or "(z)-" in low


def clean_retention_name(n):
    """A name from the retention data, or None when it is noise (codes, placeholders, mojibake)."""
    n = n.strip().rstrip("*").strip()
    if not n or len(n) > MAX_NAME_LEN or not useful_name(n):
        return None
    low = n.lower()
    if "?" in n or "\ufffd" in n or "Ã" in n or "Î" in n or low.startswith(("putative", "unknown", "compound", "metabolite", "feature")):
        return None
    if any(ch.isdigit() for ch in n) and n.replace("-", "").replace("_", "").isalnum() and not any(ch.isalpha() for ch in n[:1]):
        return None
    return n


def add_retention(compounds, order, path):
    """Every compound of the open retention data (RepoRT-derived, CC BY-SA 4.0) enters the
    base with its InChIKey, the data's SMILES and the names the data gives it.

    Names are added only where they cannot mislead: a name the data gives to more than one
    InChIKey is dropped (RepoRT rows carry some wrong names), a name already held by another
    compound of the base stays with that compound, and a name that denotes a stereoisomer
    (`(+)-`, `(R)-`, `cis-`, `L-` ...) is not given to a record without stereo (InChIKey
    stereo block UHFFFAOYSA)."""
    if not os.path.exists(path):
        print(f"retention data not found at {path}; skipped", file=sys.stderr)
        return
    try:
        from rdkit import Chem, RDLogger
        from rdkit.Chem.rdMolDescriptors import CalcMolFormula
        from rdkit.Chem.Descriptors import MolWt
        RDLogger.DisableLog("rdApp.*")
    except ImportError:
        Chem = None
    names_by_key, smiles_by_key = {}, {}
    keys_by_name = {}
    with open(path, encoding="utf-8", newline="") as fh:
        for row in csv.DictReader(fh, delimiter="\t"):
            key, smi = row["inchikey"], row["smiles"]
            if not key or not smi:
                continue
            smiles_by_key.setdefault(key, smi)
            n = clean_retention_name(row["name"])
            if n:
                names_by_key.setdefault(key, {}).setdefault(n.lower(), [n, 0])[1] += 1
                keys_by_name.setdefault(n.lower(), set()).add(key)
    held = {}
    for k, c in compounds.items():
        for n in [c["pref"]] + c["names"]:
            held.setdefault(n.lower(), set()).add(k)
    added = named = 0
    for key in sorted(smiles_by_key):
        # most datasets first; among equals the fuller short name (`Codeine` over `Codein`)
        cands = sorted(names_by_key.get(key, {}).values(),
                       key=lambda x: (-x[1], -len(x[0]) if len(x[0]) <= 30 else 0, x[0]))
        stereo_less = key.split("-")[1:2] == ["UHFFFAOYSA"]
        good = []
        for n, _ in cands:
            low = n.lower()
            if len(keys_by_name[low]) > 1:
                continue
            if held.get(low, set()) - {key}:
                continue
            if stereo_less and has_stereo_word(n):
                continue
            good.append(n)
        if key in compounds:
            c = compounds[key]
            for n in good:
                if n not in c["names"]:
                    c["names"].append(n)
                    named += 1
                c.setdefault("retention_names", []).append(n)
            continue
        smi = smiles_by_key[key]
        formula, mw = "", ""
        if Chem is not None:
            m = Chem.MolFromSmiles(smi)
            if m is None:
                continue
            formula, mw = CalcMolFormula(m), "%.5f" % MolWt(m)
        compounds[key] = dict(cid="", cas="", formula=formula, mw=mw, smiles=smi, key=key,
                              pref=good[0] if good else key, names=good, source="retention-report")
        order.append(key)
        added += 1
        named += len(good)
    print(f"retention data: {added} compounds added, {named} names added", file=sys.stderr)


ABBREVIATION_NOISE = {"ci", "8ci", "9ci", "inn", "usan", "ban", "jan", "dcf", "usp", "nf", "tn", "van",
                      "iso", "jp", "ep", "bp", "fcc", "mi", "ii", "iii", "iv", "vi", "acd", "iupac", "hplc",
                      "gr", "ar", "ca", "na", "mart", "who", "rs", "pharm", "inci", "jis", "bsi", "uk",
                      "us", "eu", "salt", "free", "base", "acid", "anhydrous", "solution", "hydrate", "std"}


def abbreviation_of(name):
    """`ABBR` from a name written `long name (ABBR)` when ABBR reads as the initials of the
    long name (its letters appear in order in it, starting with its first letter), e.g.
    `aminomethylphosphonic acid (ampa)` -> `ampa`; None otherwise."""
    name = name.strip()
    if not name.endswith(")") or " (" not in name:
        return None
    long, abbr = name[:-1].rsplit(" (", 1)
    a = abbr.strip().lower()
    if not (2 <= len(a) <= 8) or not a.replace("-", "").isalnum() or sum(ch.isalpha() for ch in a) < 2:
        return None
    if a in ABBREVIATION_NOISE or a.strip("0123456789") in ABBREVIATION_NOISE:
        return None
    letters = [ch for ch in long.lower() if ch.isalnum()]
    if not letters or letters[0] != a[0]:
        return None
    it = iter(letters)
    if not all(ch in it for ch in a if ch.isalnum()):
        return None
    return abbr.strip()


def with_abbreviations(names):
    """The names plus every abbreviation written in parentheses after a long name (class rule
    for how abbreviations enter the synonym table)."""
    out = list(names)
    low = {n.lower() for n in names}
    for n in names:
        a = abbreviation_of(n)
        if a and a.lower() not in low:
            out.append(a)
            low.add(a.lower())
    return out


def fix_tautomers(compounds):
    """Stored structures as the usual tautomer: an imidic acid (`C(=N)O`, e.g. PubChem's
    labetalol record) is written as its amide. The InChIKey does not change (standard InChI
    treats the two as one mobile-hydrogen structure)."""
    try:
        from rdkit import Chem, RDLogger
        from rdkit.Chem import AllChem
        RDLogger.DisableLog("rdApp.*")
    except ImportError:
        print("RDKit not installed: imidic acids not fixed", file=sys.stderr)
        return
    patt = Chem.MolFromSmarts("[CX3;!a](=[NX2;H1;!a])[OX2;H1]")
    rxn = AllChem.ReactionFromSmarts("[C;!a:1](=[N;H1;!a:2])[O;H1:3]>>[C:1](-[N:2])=[O:3]")
    fixed = 0
    for c in compounds.values():
        smi = c["smiles"]
        if "N" not in smi or "O" not in smi:
            continue
        m = Chem.MolFromSmiles(smi)
        if m is None or not m.HasSubstructMatch(patt):
            continue
        for _ in range(4):
            prods = rxn.RunReactants((m,))
            if not prods:
                break
            p = prods[0][0]
            try:
                Chem.SanitizeMol(p)
            except Exception:
                break
            m = p
            if not m.HasSubstructMatch(patt):
                break
        new = Chem.MolToSmiles(m)
        if Chem.MolToInchiKey(m) == c["key"]:
            c["smiles"] = new
            fixed += 1
    print(f"imidic acids written as amides: {fixed}", file=sys.stderr)


def fix_stereo_less_names(compounds):
    """A stereo-less record (InChIKey stereo block UHFFFAOYSA) must not carry as its preferred
    name the preferred name of a stereoisomer record of the same skeleton (PubChem's
    stereo-less codeine record is titled `isocodeine`). It takes instead a name of its own:
    the first of its names that no same-skeleton record uses as preferred name."""
    by_skeleton = {}
    for k, c in compounds.items():
        by_skeleton.setdefault(k.split("-")[0], []).append(k)
    renamed = 0
    for block, keys in by_skeleton.items():
        if len(keys) < 2:
            continue
        for k in keys:
            if k.split("-")[1] != "UHFFFAOYSA":
                continue
            c = compounds[k]
            others = {compounds[o]["pref"].lower() for o in keys if o != k}
            if c["pref"].lower() not in others:
                continue
            # the names the retention data measured it under first, then its other names in
            # source order (the IUPAC-style name first)
            cands = [n for n in c.get("retention_names", []) + c["names"] if n.lower() not in others and useful_name(n)
                     and not cas_ok(n) and not has_stereo_word(n)]
            if cands:
                c["pref"] = cands[0]
                renamed += 1
    print(f"stereo-less records renamed: {renamed}", file=sys.stderr)


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--chemicals-wheel")
    ap.add_argument("--retention", default=os.path.join(ROOT, "..", "shared", "data", "retention", "retention.tsv"))
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

    add_retention(compounds, order, a.retention)
    fix_tautomers(compounds)
    fix_stereo_less_names(compounds)
    for c in compounds.values():
        c["names"] = with_abbreviations(c["names"])

    by_cas = {c["cas"]: k for k, c in compounds.items() if c["cas"]}
    os.makedirs(OUT, exist_ok=True)

    def write_gz(path, header, rows):
        # Plain tab-separated text, no escaping: the Rust reader splits on tabs, and an escape
        # character would double every backslash of a SMILES (`C/C=C\\C`).
        buf = io.StringIO()
        buf.write("\t".join(header) + "\n")
        for r in rows:
            buf.write("\t".join(str(x).replace("\t", " ").replace("\n", " ").replace("\r", " ") for x in r) + "\n")
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
        # The names the retention data measured the compound under go right after the first
        # (systematic) synonym, so that the cap on synonyms never drops them.
        ret = [n for n in c.get("retention_names", []) if n in names]
        if ret:
            names = names[:1] + ret + [n for n in names[1:] if n not in ret]
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
