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
import argparse, csv, gzip, io, os, re, subprocess, sys, tempfile, zipfile

try:
    from rdkit import Chem, RDLogger
    RDLogger.DisableLog("rdApp.*")
    AMINO_ACID = Chem.MolFromSmarts("[CX4;!a]([NX3;!$(N=*)])[CX3](=O)[OX2H1,OX1-]")
except ImportError:
    Chem = None

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


# what a record without stereo adds to the name of its stereoisomer record (issue 13)
STEREO_UNSPECIFIED = " (stereo unspecified)"


def stereo_name(name):
    """A name whose prefix names one enantiomer (`levomethadone`, `dextropropoxyphene`)."""
    return name.strip().lower().startswith(("levo", "dextro"))


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


COUNTER_ION_TAIL = re.compile(r"^(.*[a-z0-9)\]])\s+(?:chloride|dichloride|bromide|dibromide|iodide|diiodide|"
                              r"methyl ?sulfate|metilsulfate|methosulfate|nitrate|hydroxide|tosylate)$")


def add_ion_table(compounds, order, path):
    """Every ion of the ion-chromatography table (data/ic_ions.tsv, written for phasewise)
    is a record of the base, as the ion: oxyanions such as chlorate and chromate that the
    PubChem tables hold only as acids or salts are found by name and by any form of their
    structure."""
    if Chem is None:
        print("RDKit not installed: ion table not added", file=sys.stderr)
        return
    from rdkit.Chem.rdMolDescriptors import CalcMolFormula
    from rdkit.Chem.Descriptors import MolWt
    added = 0
    with open(path, encoding="utf-8") as fh:
        lines = [l for l in fh if not l.startswith("#")]
    for row in csv.DictReader(lines, delimiter="\t"):
        smi = (row.get("smiles") or "").strip()
        m = Chem.MolFromSmiles(smi) if smi else None
        if m is None:
            continue
        key = Chem.MolToInchiKey(m)
        if not key or key in compounds:
            continue
        names = [row["name"]] + [n for n in (row.get("synonyms") or "").split(";") if n]
        compounds[key] = dict(cid="", cas="", formula=CalcMolFormula(m), mw="%.5f" % MolWt(m), smiles=smi,
                              key=key, pref=row["name"], names=names, source="ion-table")
        order.append(key)
        added += 1
    print(f"ion table: {added} ions added", file=sys.stderr)


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
        smi = smiles_by_key[key]
        cation = "." not in smi and "+]" in smi and "-]" not in smi
        good = []
        for n, _ in cands:
            low = n.lower()
            # a quaternary ammonium or other cation measured under its salt's name (`Mepiquat
            # chloride` for the cation alone) is the cation: the name without its counter-ion,
            # when the salt's name is another record's
            m = COUNTER_ION_TAIL.match(low)
            if cation and m and held.get(low, set()) - {key}:
                n = n[:len(m.group(1))]
                low = n.lower()
                if low in keys_by_name and keys_by_name[low] - {key}:
                    continue
                keys_by_name.setdefault(low, set()).add(key)
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
                same = [x for x in c["names"] if x.lower() == n.lower()]
                if same:
                    # a name the source table gives the record too
                    c.setdefault("retention_confirmed", []).append(same[0])
                else:
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
    name the preferred name of another record of the same skeleton (PubChem's stereo-less
    codeine record is titled `isocodeine`). When that record has stereo and the name is a
    proper name that says no stereo itself (`puromycin`, `cannabidiol`), the record keeps the
    name marked `(stereo unspecified)`: the name a chemist knows, honest that the record stands
    for no one stereoisomer, while the bare name stays the stereoisomer's (issue 13).
    Otherwise (`cis-4-octene`; a twin that differs only in charge) the record takes a name of
    its own: the first of its names that no same-skeleton record uses as preferred name."""
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
            twins = {compounds[o]["pref"].lower() for o in keys if o.split("-")[1] != "UHFFFAOYSA"}
            if (c["pref"].lower() in twins and not has_stereo_word(c["pref"]) and not stereo_name(c["pref"])
                    and proper_name(c["pref"], MAX_NAME_LEN - len(STEREO_UNSPECIFIED))):
                if c["pref"] not in c["names"]:
                    c["names"].insert(1 if c["names"] else 0, c["pref"])
                c["pref"] = c["pref"] + STEREO_UNSPECIFIED
                renamed += 1
                continue
            # the names the retention data measured it under first, then its other names in
            # source order (the IUPAC-style name first)
            cands = [n for n in c.get("retention_names", []) + c["names"] if n.lower() not in others and useful_name(n)
                     and not cas_ok(n) and not has_stereo_word(n)]
            if cands:
                c["pref"] = cands[0]
                renamed += 1
    print(f"stereo-less records renamed: {renamed}", file=sys.stderr)


# ---------------------------------------------------------------------------------------------
# Preferred names a practitioner recognises (issue 13, item 2)
# ---------------------------------------------------------------------------------------------
# The source tables' preferred name (the second name column) is at times a CAS number, a
# catalogue code, a molecular formula, an abbreviation, a brand or a mixture label, while a
# proper name sits among the synonyms. The rule below replaces the preferred name only when it
# is recognisably one of those, and only with a synonym that is a proper name, keeps the
# record's stereo, is no other record's preferred name, and changes what no name resolves to.
# Common practice, no source: the shapes and word lists are the author's, checked by eye on a
# random sample of the renamed records (see the commit message).

# official non-proprietary names in English (INN, USAN, BAN, JAN, ISO common names of
# pesticides, pharmacopoeia titles); the French (DCF) and Italian (DCIT) lists alone mark a name
# in another language, and reference-work tags (Merck Index `[mi]`, HSDB) also mark mixtures
# (`saffron [mi]` on crocin), so neither counts
OFFICIAL_TAGS = {"inn", "usan", "ban", "jan", "iso", "usp", "nf", "who-dd", "mart.", "vandf", "usp-rs",
                 "jp15", "jp16", "jp17", "jp18"}
# trailing `[...]`/`(...)` tags that mark a name as not the name itself (language variants,
# hazard notes) or as a trade name (KEGG's `(TN)`)
OTHER_TAGS = {"german", "french", "dutch", "polish", "latin", "russian", "czech", "spanish", "italian",
              "inn-latin", "inn-french", "inn-spanish", "iso-french", "forbidden", "poison", "corrosive",
              "tn", "ep impurity", "8ci", "9ci", "ci", "van", "iupac", "dcf", "dcit", "mi", "hsdb", "inci",
              "fhfi", "fcc", "ep", "ansi", "bsi"}
TAG_RE = re.compile(r"^(.*?)\s*[\[(]([^\[\]()]+)[\])]\s*$")

# Abbreviations that are the names practitioners use (solvents, buffers, nucleotides, classic
# pesticides and explosives); never replaced. Common practice, no source.
KEPT_ABBREVIATIONS = {
    "dmso", "dmf", "thf", "dma", "dmac", "nmp", "dcm", "mtbe", "etbe", "tame", "tbme", "hmpa", "dme",
    "edta", "egta", "dtpa", "nta", "hepes", "mops", "mes", "tris", "pipes", "caps", "ches", "taps",
    "tes", "bes", "tapso", "mopso", "popso", "epps", "dtt", "tcep", "sds", "tnt", "rdx", "hmx",
    "petn", "ddt", "dde", "ddd", "mcpa", "mcpp", "mcpb", "dnoc", "atp", "adp", "amp", "gtp", "gdp",
    "gmp", "ctp", "utp", "nad", "nadh", "nadp", "fad", "fmn", "camp", "cgmp", "gaba", "dopa", "nmda",
    "ampa", "paba", "deet", "tempo", "dabco", "dbu", "dmap", "tfa", "bht", "bha", "tbhq", "pfoa",
    "pfos", "lsd", "mdma", "mdea", "mda", "thc", "cbd", "pcp", "gbl", "ghb", "dmt", "tmb", "opd",
    "abts", "dpph", "mtt", "nbt", "bcip", "ans", "tns", "dapi"}

SALT_WORDS = ("hydrochloride", "sulfate", "sulphate", "sodium", "potassium", "calcium", "mesylate",
              "maleate", "tartrate", "citrate", "phosphate", "acetate", "bromide", "chloride", "iodide",
              "hydrobromide", "fumarate", "succinate", "besylate", "tosylate", "nitrate", "lactate",
              "magnesium", "lithium", "ammonium", " salt", "hcl", "hydrate")

# Names of one configuration of a sugar or sugar alcohol: a record without stereo, which stands
# for every configuration of its skeleton, must not be named by one of them (the stereo-less
# hex-2-ulopyranose is not `psicose`, nor `fructose`).
CONFIG_SUGAR_STEMS = ("allos", "altros", "glucos", "mannos", "gulos", "idos", "galactos", "talos",
                      "psicos", "fructos", "sorbos", "tagatos", "ribos", "arabinos", "xylos", "lyxos",
                      "erythros", "threos", "ribulos", "xylulos", "glucitol", "sorbitol", "mannitol",
                      "galactitol", "dulcitol", "allitol", "iditol", "talitol", "arabitol", "arabinitol",
                      "ribitol", "threitol", "levulos", "laevulos", "dextros")

# (named reagents, `lawesson reagent`, are what chemists call them: not a label here)
MIXTURE_WORDS = ("crude", "solution", "mixture", "mixt", "technical", "tech.", "tech grade",
                 "in methanol", "in acetonitrile", "in water", "in ethanol", "in hexane",
                 "certified reference", "from ")
MIXTURE_TAIL = re.compile(r"(,? (?:crude|solution|mixture|mixt\.?|technical|tech\.?|tech grade)|"
                          r" solution in .*| in (?:methanol|acetonitrile|water|ethanol|hexane).*| from .*)$")

OPENEYE_WORDS = ("azanyl", "oxidanyl", "bromanyl", "chloranyl", "fluoranyl", "iodanyl", "sulfanylidene",
                 "azanium", "oxidanide", "azanide", "lambda")

CHEMICAL_SUFFIXES = ("ane", "ene", "yne", "ol", "al", "one", "ide", "ate", "ite", "ium", "ose", "ole",
                     "oxide", "acid", "amine", "amide", "aldehyde", "ether", "ester", "yl", "ic",
                     "azole", "ine", "ane", "phenol", "ol")

CAS_SHAPE = re.compile(r"^\d{2,7}-\d{2}-\d$")
FORMULA_SHAPE = re.compile(r"^(?:[A-Za-z][a-z]?\d*){2,}$")


def name_tag(n):
    """(name without its trailing tag, tag words) for `x [usan:inn]` / `x (tn)`; (n, set())."""
    m = TAG_RE.match(n.strip())
    if not m:
        return n.strip(), set()
    words = {w.strip().lower() for w in re.split(r"[:/,]", m.group(2))}
    if words & (OFFICIAL_TAGS | OTHER_TAGS):
        return m.group(1).strip(), words
    return n.strip(), set()


def official_names(names):
    out = []
    for n in names:
        base, tags = name_tag(n)
        if tags & OFFICIAL_TAGS and not tags & OTHER_TAGS and base:
            out.append(base)
    return out


def is_code(n):
    """A catalogue or registry code: one token of letters and at least two digits whose letter
    runs are at most three long (`ac1l197p`, `agn-pc-047i3u`, `nsc-12345`, `brd-a612...`)."""
    t = n.strip().lower()
    if re.fullmatch(r"[a-z][a-z0-9]{1,7}[ -]\d[\d-]{3,}", t):
        return True   # a registry number with its prefix (`brn 0014598`, `einecs 215-123-4`)
    if " " in t or "," in t or "(" in t or "[" in t or len(t) < 5:
        return False
    if not re.fullmatch(r"[a-z0-9\-._]+", t):
        return False
    if re.search(r"\d{2,7}-\d\d-\d", t):
        return True   # a CAS number inside a code (`ambotz10236-47-2`)
    digits = sum(ch.isdigit() for ch in t)
    runs = re.findall(r"[a-z]+", t)
    return digits >= 2 and bool(runs) and max(len(r) for r in runs) <= 3


def is_formula(n):
    """A molecular formula written as the name (`c21h43n5o7`), five characters or more."""
    t = n.strip()
    if len(t) < 5 or not FORMULA_SHAPE.fullmatch(t) or not any(ch.isdigit() for ch in t):
        return False
    # every element symbol is a known one, written with its first letter and digits (`c21h43`)
    elements = re.findall(r"([A-Za-z][a-z]?)\d*", t)
    return all(e.lower() in ELEMENTS for e in elements)


ELEMENTS = {e.lower() for e in (
    "H He Li Be B C N O F Ne Na Mg Al Si P S Cl Ar K Ca Sc Ti V Cr Mn Fe Co Ni Cu Zn Ga Ge As Se Br "
    "Kr Rb Sr Y Zr Nb Mo Tc Ru Rh Pd Ag Cd In Sn Sb Te I Xe Cs Ba La Ce Pr Nd Pm Sm Eu Gd Tb Dy Ho Er "
    "Tm Yb Lu Hf Ta W Re Os Ir Pt Au Hg Tl Pb Bi Po At Rn Fr Ra Ac Th Pa U Np Pu Am Cm").split()}

VOWELS = set("aeiouy")
ONSETS = {"bl", "br", "ch", "cl", "cr", "dr", "fl", "fr", "gl", "gr", "kl", "kr", "ph", "pl", "pr", "qu",
          "rh", "sc", "sh", "sk", "sl", "sm", "sn", "sp", "st", "sw", "th", "tr", "tw", "wh", "wr", "ps",
          "pn", "xy", "zw"}


def pronounceable(word):
    """Whether a short letter string reads as a word (`furan`, `morin`, `nopol`) rather than as
    initials (`dmba`, `nnal`, `aibn`, `ksdk`)."""
    w = word.lower()
    if not w.isalpha() or not (set(w) & VOWELS):
        return False
    if w[0] not in VOWELS and len(w) > 1 and w[1] not in VOWELS and w[:2] not in ONSETS:
        return False
    if re.search(r"[^aeiouy]{3,}", w) and not re.search(r"(sch|str|chr|phr|thr|spr|scr|ngs|nts|rst)", w):
        return False
    if re.search(r"[aeiouy]{3,}", w) or w[:2] in ("aa", "ee", "ii", "uu"):
        return False
    if len(w) >= 3 and w[-1] not in VOWELS and w[-2] not in VOWELS and w[-2:] not in {
            "ng", "nk", "nt", "nd", "st", "sk", "rt", "rd", "rn", "rm", "rl", "ld", "lt", "lk", "ct",
            "pt", "ft", "mp", "ns", "ls", "rs", "ts", "ck", "sh", "th", "ch", "ph", "ll", "ss", "ff",
            "tt", "rk", "rb", "rg", "rc", "lm", "lp", "nc", "xt", "ms", "ds", "ps", "ks", "gs", "bs"}:
        return False
    return True


def is_abbreviation(n, names):
    """A preferred name of at most five characters that reads as initials, is not one of the
    abbreviations practitioners name the compound by, nor a name the record's synonyms use as a
    word (`nopol (terpene)`), nor itself an official name."""
    t = n.strip().lower()
    if len(t) > 5 or len(t) < 2 or t in KEPT_ABBREVIATIONS:
        return False
    if not re.fullmatch(r"[a-z0-9\-]+", t) or sum(ch.isalpha() for ch in t) < 2:
        return False
    letters = t.replace("-", "")
    if letters.isalpha() and pronounceable(letters):
        return False
    if re.fullmatch(r"[a-z]{1,3}-?\d{1,3}", t) and not re.fullmatch(r"[a-z]{2,3}\d", t):
        # `e-64`, `ipa-3`, `src-7`: a code-number name, not initials of anything in the record
        pass
    word = re.compile(r"(?<![a-z0-9])" + re.escape(t) + r"(?![a-z0-9])")
    for s in names:
        sl = s.lower()
        if sl != t and len(sl) > len(t) + 1 and word.search(sl) and not name_tag(s)[1]:
            return False
    return True


def expands(abbr, name):
    """Whether `name` reads as the long form of `abbr`: the abbreviation's letters appear in
    order in it, the first one first (`afb1` in `aflatoxin b1`)."""
    a = [ch for ch in abbr.lower() if ch.isalnum()]
    letters = [ch for ch in name.lower() if ch.isalnum()]
    if not a or not letters or letters[0] != a[0]:
        return False
    it = iter(letters)
    return all(ch in it for ch in a)


def is_mixture_label(n):
    low = n.lower()
    return any(re.search(r"(?<![a-z])" + re.escape(w), low) for w in MIXTURE_WORDS)


def chemical_looking(n):
    low = n.lower()
    return (any(ch.isdigit() for ch in low) or " " in low or "-" in low or "," in low or "(" in low
            or low.endswith(CHEMICAL_SUFFIXES))


def stereo_marked(n):
    """A stereo descriptor anywhere in the name (`fructose, (d)`, `beta-d-(-)-fructose`)."""
    low = n.lower()
    if has_stereo_word(low):
        return True
    return bool(re.search(r"(\((?:[rsez+\-±]|d|l|dl|rs|sr|[0-9]+[rsez][^)]*)\))|(?<![a-z])(?:d|l|dl|cis|trans|"
                          r"erythro|threo|meso|endo|exo|syn|anti|rel|rac)-|(?:alpha|beta)-[dl]-|\.alpha\.|\.beta\.|"
                          r"(?<![a-z])[dl]\(", low))


def configuration_name(n):
    low = n.lower()
    return any(s in low for s in CONFIG_SUGAR_STEMS)


def proper_name(n, max_len):
    """A synonym fit to be shown as the compound's name."""
    t = n.strip()
    low = t.lower()
    if not t or len(t) > max_len or not useful_name(t) or cas_ok(t) or CAS_SHAPE.match(t):
        return False
    if is_code(t) or is_formula(t) or is_mixture_label(t) or name_tag(t)[1]:
        return False
    if any(w in low for w in OPENEYE_WORDS) or "?" in t or "\ufffd" in t:
        return False
    if re.search(r", [0-9a-z(\[]", low) and low.endswith("-"):
        return False   # CA index name, inverted (`benzoxazolium, 3-(2-carboxyethyl)-...-`)
    if low.endswith(("-", ",")) or low.count("(") != low.count(")") or low.count("[") != low.count("]"):
        return False
    if re.search(r",\d+$", low):
        return False   # cut short (`2,2-difluoro-1,3-dimethyl-2-phenyl-1,3,2`)
    if re.search(r"[%<>;®™]|&reg;|\d m in |\d+(?:\.\d+)? ?(?:m|mm|mg/ml|g/l) ", low):
        return False   # a grade, a concentration or a list of components (`magnesium;octane;chloride`)
    if len(t) <= 5 and not pronounceable(low.replace("-", "")) and low not in KEPT_ABBREVIATIONS:
        return False   # an abbreviation does not replace an abbreviation
    return True


GREEK_WORDS = dict(zip("αβγδεζηθικλμνξοπρστυφχψω",
                       "alpha beta gamma delta epsilon zeta eta theta iota kappa lambda mu nu xi omicron pi "
                       "rho sigma tau upsilon phi chi psi omega".split()))
PRIMES = "'′’‘ʹ`´″"
STEREO_FREE_PREFIXES = ("(+/-)-", "(±)-", "(+-)-", "(rs)-", "(sr)-", "(r,s)-", "(r)-", "(s)-", "(+)-", "(-)-", "(−)-", "(–)-",
                        "rac-", "dl-", "d-", "l-", "(d)-", "(l)-", "(dl)-")


SIGN_CHARS = set("+-\u2212\u2013\u00b1/. ")
CONFIG_PART = re.compile(r"^(?:r|s|rs|sr|d|l|dl|\d+[ab]?[rs])$")


def rotation_sign(s):
    """(sign or None, length) of a `(+)`/`(-)`/racemate group opening `s`, or None
    (src/kb/normalise.rs `rotation_sign`)."""
    close = s.find(")", 1)
    if close < 0:
        return None
    inner = s[1:close]
    if not inner or len(inner) > 6 or not all(ch in SIGN_CHARS for ch in inner):
        return None
    plus = "+" in inner
    minus = any(ch in inner for ch in "-\u2212\u2013")
    if "\u00b1" in inner or (plus and minus):
        return (None, close + 1)
    if plus:
        return ("+", close + 1)
    if minus:
        return ("-", close + 1)
    return None


def has_configuration_descriptor(low):
    """src/kb/normalise.rs `has_configuration_descriptor`."""
    for inner in re.findall(r"\(([^()]*)\)", low):
        parts = [p.strip().rstrip("*") for p in inner.split(",")]
        if inner and all(CONFIG_PART.match(p) for p in parts):
            return True
    return bool(re.search(r"(?:^|[^a-z0-9])(?:d|l|dl)-", low))


def normalise(name, drop_stereo=False):
    """The name key of src/kb/normalise.rs (same rules), to foresee how the built base
    resolves a name."""
    rest = name.strip().lower()
    keep_sign = not has_configuration_descriptor(rest)
    while drop_stereo:
        before = len(rest)
        for p in STEREO_FREE_PREFIXES:
            if rest.startswith(p):
                r = rest[len(p):]
                if any(ch.isalnum() for ch in r):
                    rest = r
                break
        if len(rest) == before:
            break
    out = []
    i = 0
    while i < len(rest):
        ch = rest[i]
        if ch == "(":
            sign = rotation_sign(rest[i:])
            if sign is not None:
                if keep_sign and sign[0]:
                    out.append(sign[0])
                i += sign[1]
                continue
        i += 1
        if ch in GREEK_WORDS:
            out.append(GREEK_WORDS[ch])
        elif ch == "µ":
            out.append("mu")
        elif ch.isalnum():
            out.append(ch)
        elif ch in PRIMES and out and (out[-1][-1:].isdigit() or out[-1][-1:] == "'"):
            out.append("''" if ch == "″" else "'")
    return "".join(out)


class NameIndex:
    """Which records hold which name key at which rank, as kb/build.rs stores them: 0 the
    preferred name, 1 the first synonym, 2 the others, 3 a name's stereo-free key."""

    def __init__(self, recs):
        self.recs = recs          # list of dict(key, cid, smiles, pref, names)
        self.by_norm = {}
        self.held = [None] * len(recs)
        for i in range(len(recs)):
            self._add(i)

    def entries(self, i):
        r = self.recs[i]
        seen, out = set(), []
        for j, n in enumerate([r["pref"]] + r["names"]):
            norm = normalise(n)
            if not norm or norm in seen:
                continue
            out.append((norm, min(j, 2)))
            seen.add(norm)
            free = normalise(n, True)
            if free and free not in seen:
                out.append((free, 3))
                seen.add(free)
        return out

    def _add(self, i):
        self.held[i] = self.entries(i)
        for norm, rank in self.held[i]:
            self.by_norm.setdefault(norm, []).append((i, rank))

    def _remove(self, i):
        for norm, rank in self.held[i]:
            self.by_norm[norm].remove((i, rank))

    def replace(self, i, pref, names):
        self._remove(i)
        self.recs[i]["pref"], self.recs[i]["names"] = pref, names
        self._add(i)

    def twin_without_stereo(self, j, i):
        """Whether record j is the retention data's stereo-less twin of record i (same
        skeleton, no CID) and i a compound with two or more possible stereo elements, whose
        trivial name denotes i's diastereomer rather than the stereo-less record."""
        a, b = self.recs[j], self.recs[i]
        return (a["key"].split("-")[1] == "UHFFFAOYSA" and a["cid"] == "" and a["skel"] == b["skel"]
                and "@" in b["smiles"] and Chem is not None and self.stereo_elements(i) >= 2)

    def stereo_elements(self, i):
        """Possible stereo elements of record i (RDKit's count stands in for
        src/structure/canon.rs `possible_stereo_elements`)."""
        r = self.recs[i]
        if "n_stereo" not in r:
            m = Chem.MolFromSmiles(r["smiles"]) if Chem is not None else None
            r["n_stereo"] = len(Chem.FindPotentialStereo(m)) if m is not None else 0
            r["amino_acid"] = m is not None and m.HasSubstructMatch(AMINO_ACID)
        return r["n_stereo"]

    def stereo_choice(self, rows, best, order):
        """The rules of src/kb/resolve.rs `best_by_name` after the ranking: an alpha-amino
        acid named without descriptor is the L-isomer; a compound with one possible stereo
        element named without descriptor is the record of its skeleton without stereo."""
        i, rank = best
        r = self.recs[i]
        if "@" not in r["smiles"] or Chem is None:
            return best
        n = self.stereo_elements(i)
        if rank == 3 and r["amino_acid"]:
            low = r["pref"].lower()
            if low.startswith("d-"):
                ls = [e for e in rows if e[1] == 3 and self.recs[e[0]]["pref"].lower() == "l-" + low[2:]]
                if ls:
                    return min(ls, key=lambda e: (self.recs[e[0]]["cid"] == "", self.recs[e[0]]["cid"] or 0, e[0]))
            return best
        if n != 1:
            return best
        eff = lambda k: 0 if k == 3 else k
        for e in sorted(rows, key=order):
            o = self.recs[e[0]]
            if e != best and "@" not in o["smiles"] and o["skel"] == r["skel"] and (
                    rank == 3 or (e[1] != 3 and eff(e[1]) <= eff(rank))):
                return e
        return best

    # src/kb/resolve.rs `find_salt_of`: a name no record holds finds the salt record named
    # `name <counter-ion word>` (standardised to its parent)
    SALT_ROUTE_WORDS = ("chloride", "dichloride", "bromide", "dibromide", "iodide", "methyl sulfate",
                        "metilsulfate", "nitrate", "hydroiodide", "sulfate", "sulphate", "hydrochloride",
                        "sodium", "potassium", "calcium", "hydrobromide", "mesylate", "maleate", "tartrate",
                        "citrate", "phosphate", "fumarate", "besylate", "succinate", "acetate", "hcl",
                        "sodium salt")

    def salt_route(self, name):
        """The salt record a name that no record holds resolves to, or None."""
        base = name.strip()
        if not base or len(base.split()) > 3:
            return None
        for w in self.SALT_ROUTE_WORDS:
            salt = normalise(base + " " + w)
            j = self.decision(salt)[0]
            if j is not None and "." in self.recs[j]["smiles"] and normalise(self.recs[j]["pref"]) == salt:
                return j
        return None

    def decision(self, norm):
        """(record the name resolves to, skeletons holding it at the best rank)."""
        rows = self.by_norm.get(norm, [])
        if not rows:
            return (None, frozenset())
        def order(e):
            i, rank = e
            r = self.recs[i]
            return (0 if rank == 3 else rank, rank == 3, rank == 3 and "@" not in r["smiles"],
                    r["cid"] == "", r["cid"] if r["cid"] != "" else 0, i)
        best = self.stereo_choice(rows, min(rows, key=order), order)
        eff = 0 if best[1] == 3 else best[1]
        blocks = frozenset(self.recs[i]["skel"] for i, rank in rows if (0 if rank == 3 else rank) == eff)
        return (best[0], blocks)


# Names a chemist uses for the record (issue 13): the names an official list tags (INN, USAN,
# BAN, JAN, ISO, pharmacopoeias; also when a national standard's tag stands beside it, as in
# `prometryn [ansi:bsi:iso]`, but not a language's form, `prometryne [iso-french]`), except a
# name the record's synonyms also mark as a trade name (`mercurochrome (jp16)` beside
# `mercurochrome (tn)`); best first: the name carrying the most official-list tags (`kanamycin
# sulfate [usan:inn:ban]` before `kanamycin monosulfate [jan]`), then source order. With
# `retention`, then the names the retention data measured the record under when the source
# table gives it that name too.
LANGUAGE_TAGS = {"german", "french", "dutch", "polish", "latin", "russian", "czech", "spanish", "italian",
                 "inn-latin", "inn-french", "inn-spanish", "iso-french", "dcit"}
NOT_A_NAME_TAGS = LANGUAGE_TAGS | {"tn", "forbidden", "poison", "corrosive", "ep impurity"}


def usual_names(r, retention=False):
    names = r.get("all_names", r["names"])
    trade = {name_tag(n)[0].lower() for n in names if "tn" in name_tag(n)[1]}
    tagged = {}
    for k, n in enumerate(names):
        base, tags = name_tag(n)
        if (tags & OFFICIAL_TAGS and not tags & NOT_A_NAME_TAGS and base and "[" not in base
                and base.lower() not in trade):
            t = tagged.setdefault(base.lower(), [0, k, base])
            t[0] -= len(tags & OFFICIAL_TAGS)
    out = [v[2] for v in sorted(tagged.values())]
    if retention:
        out += [n for n in r.get("retention_confirmed", []) if proper_name(n, 60)
                and not any(ch.isdigit() for ch in n) and n.lower() not in trade]
    seen, uniq = set(), []
    stereo_less = r["key"].split("-")[1:2] == ["UHFFFAOYSA"]
    for n in out:
        if n.lower() not in seen and fits_record(r, n) and not (stereo_less and stereo_name(n)):
            seen.add(n.lower())
            uniq.append(n)
    return uniq


def spelling_key(w):
    """A word with the spellings of European languages read alike (ph/f, th/t, ae/e, oe/e,
    y/i, k/c, j/i: `nikotyna`, `etakridin`, `jodoform` read as `nicotina`, `etacridin`,
    `iodoform`)."""
    for x, y in (("ph", "f"), ("th", "t"), ("ae", "e"), ("oe", "e"), ("y", "i"), ("k", "c"), ("j", "i")):
        w = w.replace(x, y)
    return w


def foreign_form(p, o):
    """Whether the one-word name `p` is the one-word name `o` written in another language: the
    same word once spellings are read alike, but with the German or Dutch ending that drops
    the final `e` of `-ine`, `-ole`, `-one` (`nikotin`, `vinblastin`, `pirlindol`), a Latin `-um`
    (`valtratum`, `dithiazaninum`) or a Romance or Slavic `-a`/`-o` (`nicotina`, `nikotyna`).
    English spelling variants, which read alike whole (`beclomethasone`/`beclometasone`), and
    English names without the final `e` (`prometryn` beside `prometryne`) are no foreign forms:
    the official name must be the English one."""
    if not (re.fullmatch(r"[a-z]{5,}", p) and re.fullmatch(r"[a-z]{5,}", o)):
        return False
    kp, ko = spelling_key(p), spelling_key(o)
    if kp == ko:
        return False
    stem = ko[:-1] if ko.endswith("e") else ko
    if kp in (stem + "um", stem + "a", stem + "o"):
        return True
    return ko.endswith(("ine", "ole", "one")) and kp == stem


def word_support(w, names):
    """How many of the names, other than `w` itself, hold `w` as a word."""
    c = re.compile(r"(?<![a-z])" + re.escape(w) + r"(?![a-z])")
    return sum(1 for n in names if n.lower() != w and c.search(n.lower()))


def foreign_evidence(p, o, names):
    """A form without the final `e` (`nikotin` for `nicotine`) is also an English spelling of
    some names (`psilocybin`, whose INN is `psilocybine`): it counts as foreign only with a
    sign of it: a non-English letter (`k` for `c`: `nikotin`, `etakridin`), the source listing
    the official form first (`vinblastine`, then `vinblastin`), or the official form recurring
    in three synonyms or more and this form in none (`nicotine alkaloid`, `(-)-nicotine`)."""
    ko = spelling_key(o)
    if spelling_key(p) != (ko[:-1] if ko.endswith("e") else ko):
        return True   # a Latin, Romance or Slavic ending
    if p != o[:-1]:
        return True
    first = names[0].lower() if names else ""
    return first == o or (word_support(o, names) >= 3 and word_support(p, names) == 0)


def truncated_form(p, o):
    """Whether the one-word name `p` is the one-word name `o` cut by one or two letters at its
    start or end (`obramycin` for `tobramycin`), and not an English spelling variant of it
    (`estradiol` for `oestradiol`)."""
    if not (re.fullmatch(r"[a-z]{6,}", p) and re.fullmatch(r"[a-z]+", o)):
        return False
    if not 1 <= len(o) - len(p) <= 2 or spelling_key(p) == spelling_key(o):
        return False
    return o.endswith(p) or (o.startswith(p) and o[len(p):] != "e")


def stem_support(word, names):
    """How many of the names hold a word starting with the first six letters of `word`."""
    st = word[:6]
    return sum(1 for n in names if any(t.startswith(st) for t in re.findall(r"[a-z]+", n.lower())))


def unsupported_brand(p, usual, names):
    """Whether the one-word name `p` is a brand the record's synonyms do not back: no other
    synonym holds its stem (a generic name recurs in salt, grade and list forms: `diazinon
    50w`, `diazinon [iso]`), it shares no five letters with a usual name of the record (a
    variant of that name, `troxone` beside `troxonium tosilate`), and the record's first usual
    name is no systematic name and recurs in three synonyms or more (`carbiphene hydrochloride`
    beside `jubalon`; `kanamycin sulfate` beside `ophtalmokalixan`)."""
    if not re.fullmatch(r"[a-z]{4,}", p) or p in KEPT_ABBREVIATIONS or not usual:
        return False
    others = [n for n in names if n.lower() != p and name_tag(n)[0].lower() != p
              and not re.fullmatch(re.escape(p) + r" (?:" + DOSAGE_FORMS + r")\b.*", n.lower())]
    if stem_support(p, others) > 0:
        return False
    kp = spelling_key(p)
    for u in usual:
        ku = spelling_key(u.lower())
        if any(kp[i:i + 5] in ku for i in range(len(kp) - 4)) or spelling_variant(p, u.lower()):
            return False
    u = usual[0].lower()
    words = re.findall(r"[a-z]+", u)
    return (not any(ch.isdigit() for ch in u) and bool(words) and len(words) <= 4
            and stem_support(words[0], names) >= 3)


def unofficial_name(r):
    """(why, replacement names best first) when the preferred name is not what a chemist calls
    the record although the record has an official name: a foreign-language form of it, a
    truncated form of it, or a brand the synonyms do not back; (None, []) otherwise. Proper
    chemical names, older or other generic names and English spelling variants are kept."""
    o = r["pref"].strip()
    low = o.lower()
    official = usual_names(r)
    usual = usual_names(r, retention=True)
    if not usual or normalise(o) in {normalise(u) for u in usual}:
        return None, []
    names = r.get("all_names", r["names"])
    foreign = [u for u in official if foreign_form(low, u.lower()) and foreign_evidence(low, u.lower(), names)]
    if foreign:
        return "foreign-language form", foreign
    cut = [u for u in official if truncated_form(low, u.lower())]
    if cut:
        return "truncated name", cut
    if unsupported_brand(low, usual, names):
        return "brand without support", usual
    return None, []


def bad_preferred_name(r, officials):
    """Why the preferred name is not a name to show, or None."""
    o = r["pref"].strip()
    low = o.lower()
    names = r.get("all_names", r["names"])
    stereo_less = r["key"].split("-")[1:2] == ["UHFFFAOYSA"]
    if CAS_SHAPE.match(o):
        return "CAS number"
    if re.fullmatch(r"[A-Z]{14}-[A-Z]{10}-[A-Z]", o):
        return "InChIKey"
    if is_code(o):
        return "catalogue code"
    if is_formula(o):
        return "catalogue code"
    if is_mixture_label(o):
        return "mixture or solution label"
    if name_tag(o)[1] & (OFFICIAL_TAGS | {"tn"}):
        return "list tag"
    if is_abbreviation(o, names):
        return "abbreviation"
    off = {n.lower() for n in officials}
    # a brand: one word, not official itself, not a spelling variant of an official name
    # (`nordiazepam` beside `nordazepam [inn]` is no brand), not chemical-looking, and shown to be
    # a brand by the record: marked as a trade name (`vancocin (tn)`), named as a product
    # (`garamycin otic solution`), or second to an official name that is the record's first
    # synonym (`taxol` after `paclitaxel`). An older or other-language generic name (`rutin`
    # beside `rutoside [inn]`, `methiocarb` beside `mercaptodimethur [iso]`) has none of these.
    first = names[0].lower() if names else ""
    if (re.fullmatch(r"[a-z]+", low) and low not in off and officials and low not in KEPT_ABBREVIATIONS
            and not any(spelling_variant(low, x) for x in off)
            and not any(name_tag(n)[1] and name_tag(n)[0].lower() in (low + "e", low + "um", low + "a", low + "o")
                        for n in names)
            and not chemical_looking(low)
            and (first in off
                 or any(n.lower() == low + " (tn)" for n in names)
                 or any(re.fullmatch(re.escape(low) + r" (?:" + DOSAGE_FORMS + r")\b.*", n.lower()) for n in names))):
        return "brand"
    if stereo_less:
        stems = {s for s in CONFIG_SUGAR_STEMS for n in names + [o] if s in n.lower()}
        if len(stems) >= 2 and (has_stereo_word(o) or configuration_name(o)
                                or (is_plain_sugar(r["formula"]) and not chemical_looking(o))):
            return "one configuration's name on a record without stereo"
    return None


def spelling_variant(a, b):
    """Whether two names differ only in spelling (`nordiazepam`/`nordazepam`,
    `cephalothin`/`cefalotin`): at most one edit apart once ph/f, th/t, y/i, k/c, ae/e, oe/e
    are read alike."""
    def key(w):
        for x, y in (("ph", "f"), ("th", "t"), ("ae", "e"), ("oe", "e"), ("y", "i"), ("k", "c")):
            w = w.replace(x, y)
        return w
    a, b = key(a), key(b)
    if abs(len(a) - len(b)) > 1:
        return False
    prev = list(range(len(b) + 1))
    for i, ca in enumerate(a, 1):
        cur = [i]
        for j, cb in enumerate(b, 1):
            cur.append(min(prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + (ca != cb)))
        prev = cur
    return prev[-1] <= 1


DOSAGE_FORMS = ("otic|ophthalmic|cream|injection|injectable|tablets?|oral|ointment|drops|sterile|"
                "suspension|capsules?|elixir|syrup|gel|lotion|i\\.v\\.|iv|im|depot|forte|retard|sr|xl|er|la|"
                "liquifilm|s\\.o\\.p\\.|pediatric|powder|spray|inhaler|aerosol|pulvules|kapseals")


def is_plain_sugar(formula):
    """A monosaccharide or sugar alcohol formula, CnH2nOn or CnH2n+2On (n 3 to 7)."""
    m = re.fullmatch(r"C(\d)H(\d+)O(\d)", formula or "")
    if not m:
        return False
    c, h, o = map(int, m.groups())
    return 3 <= c <= 7 and o == c and h in (2 * c, 2 * c + 2)


def name_tier(n):
    """0 a proper name, 1 a systematic name in the `azanyl`/`oxidanyl` style, 2 an inverted
    index name (`phenol, 2-(...)-4-methyl-`), 3 anything else."""
    low = n.lower()
    if proper_name(n, MAX_NAME_LEN):
        return 0
    if any(w in low for w in OPENEYE_WORDS) and not low.endswith("-"):
        return 1
    if ", " in low:
        return 2
    return 3


def candidates(r, why, officials):
    """Replacement names, best first."""
    o = r["pref"]
    names = r["names"]
    out = list(officials)
    if why in ("brand", "foreign-language form", "truncated name", "brand without support"):
        return out   # (the names `unofficial_name` found, for the last three)
    if why == "list tag":
        # `teloxantrone [inn]` is `teloxantrone`; a trade name `sedotussin (tn)` gives way to
        # an official name first
        # (only these: the synonyms of such records are at times another compound's)
        base, tags = name_tag(o)
        out = [base] if tags & OFFICIAL_TAGS else out
        seen, uniq = set(), []
        for n in out:
            if n.lower() not in seen and n.lower() != o.lower():
                seen.add(n.lower())
                uniq.append(n)
        return uniq
    if why == "abbreviation":
        # only a name the abbreviation stands for (`aflatoxin b1` for `afb1`)
        out += [n for n in names if expands(o, n) and proper_name(n, 60)]
        return [n for n in out if n.lower() != o.lower()]
    if why.startswith("one configuration"):
        # a systematic name fits a record of no configuration (`hex-2-ulopyranose`)
        return sorted((n for n in names if name_tier(n) <= 1 and len(n) <= 80 and not configuration_name(n)
                       and any(ch.isdigit() for ch in n) and not stereo_marked(n)), key=name_tier)
    if why == "mixture or solution label":
        # the compound's own name, without the label (`aflatoxin m1 solution`), or a synonym
        # that names one compound of it (`aflatoxin g1` for `aflatoxin, crude`)
        stripped = MIXTURE_TAIL.sub("", o.lower()).strip(" ,")
        if stripped and stripped != o.lower():
            out += [n for n in names if n.lower().startswith(stripped) and proper_name(n, 80)]
            if " " in stripped or any(ch.isdigit() for ch in stripped):
                out.append(stripped)
    out += [n for n in r.get("retention_names", []) if proper_name(n, 80)]
    out += [n for n in names if proper_name(n, 80)]
    if why in ("CAS number", "catalogue code", "formula", "InChIKey"):
        rest = [n for n in names if useful_name(n) and not CAS_SHAPE.match(n) and not is_code(n)
                and not is_formula(n) and not name_tag(n)[1] and len(n) <= MAX_NAME_LEN]
        out += sorted(rest, key=name_tier)
    if why == "CAS number":
        # no name at all: say so, with the record's own CAS number (a bare number in the name
        # column reads as a name, and may be another registry entry than the record's)
        out.append("unnamed, CAS " + (r["cas"] or o))
    seen, uniq = set(), []
    for n in out:
        if n.lower() not in seen and n.lower() != o.lower():
            seen.add(n.lower())
            uniq.append(n)
    return uniq


UNAMBIGUOUS_SALT_WORDS = ("hydrochloride", "hydrobromide", "mesylate", "maleate", "tartrate", "citrate",
                          "fumarate", "succinate", "besylate", "tosylate", " salt", " hcl", "sodium",
                          "potassium", "calcium", "magnesium", "lithium", "hydrate")


def fits_record(r, n):
    """Whether a name agrees with the record's stereo and its salt form."""
    stereo_less = r["key"].split("-")[1:2] == ["UHFFFAOYSA"]
    if stereo_less and (stereo_marked(n) or configuration_name(n)):
        return False
    if not stereo_less and stereo_marked(r["pref"]) and not stereo_marked(n):
        return False
    if "." not in r["smiles"] and any(w in n.lower() for w in UNAMBIGUOUS_SALT_WORDS):
        return False
    return True


def set_skeletons(recs):
    """Each record's skeleton as kb/ambiguity.rs groups records (a salt with its parent, every
    stereoisomer together): the first InChIKey block of the largest fragment."""
    try:
        from rdkit import Chem, RDLogger
        RDLogger.DisableLog("rdApp.*")
    except ImportError:
        Chem = None
    for r in recs:
        r["skel"] = r["key"].split("-")[0]
        if Chem is None or "." not in r["smiles"]:
            continue
        frags = [f for f in r["smiles"].split(".")]
        m = Chem.MolFromSmiles(max(frags, key=lambda f: (sum(ch.isalpha() for ch in f), f)))
        if m is not None:
            k = Chem.MolToInchiKey(m)
            if k:
                r["skel"] = k.split("-")[0]


def with_stereo_note(idx, i, cands, pref_of):
    """The candidate names for record i; for a record without stereo, a name that finds a
    stereoisomer record of the same structure, as its preferred name or through the salt the
    name finds (`tobramycin` finds `tobramycin sulfate`, with stereo, beside PubChem's
    stereo-less tobramycin record), comes first marked `(stereo unspecified)`: the record
    keeps the name a chemist knows, says that it stands for no one stereoisomer, and the name
    itself keeps finding the stereoisomer."""
    recs = idx.recs
    r = recs[i]
    block, stereo = r["key"].split("-")[:2]
    if stereo != "UHFFFAOYSA":
        return cands
    out = []
    for n in cands:
        twins = [j for j in pref_of.get(normalise(n), set()) - {i}
                 if recs[j]["key"].split("-")[0] == block and recs[j]["key"].split("-")[1] != "UHFFFAOYSA"]
        if not twins and idx.decision(normalise(n))[0] is None:
            j = idx.salt_route(n)
            if j is not None and recs[j]["skel"] == r["skel"] and recs[j]["key"].split("-")[1] != "UHFFFAOYSA":
                twins = [j]
        if twins and not n.lower().endswith(STEREO_UNSPECIFIED):
            out.append(n + STEREO_UNSPECIFIED)
        out.append(n)
    return out


def rename_preferred(recs, report=None):
    """Replace recognisably bad preferred names (see `bad_preferred_name`) by a synonym that is
    a proper name; the old name stays a synonym. A replacement is taken only when no other
    record has it as preferred name and when the names involved resolve, in the built base, to
    what they resolved to before (checked on a model of kb/build.rs's name ranks): renaming never
    moves a name to another compound nor settles an ambiguity."""
    idx = NameIndex(recs)
    pref_of = {}
    for i, r in enumerate(recs):
        pref_of.setdefault(normalise(r["pref"]), set()).add(i)
    renamed, kept = 0, {}
    for i, r in enumerate(recs):
        # official names from all the source's synonyms (beyond the cap on stored synonyms)
        officials = [n for n in official_names(r.get("all_names", r["names"])) if fits_record(r, n)]
        why = bad_preferred_name(r, officials)
        if not why:
            why, officials = unofficial_name(r)
        if not why:
            continue
        o = r["pref"]
        done = False
        for n in with_stereo_note(idx, i, candidates(r, why, officials), pref_of):
            if not fits_record(r, n):
                continue
            nn, on = normalise(n), normalise(o)
            # a record with stereo may share its name with its twin without stereo that the
            # retention data added (same skeleton, no CID): `t-2 toxin` for the PubChem
            # record of CAS 21259-20-1 beside the data's stereo-less `T2 Toxin`
            others = pref_of.get(nn, set()) - {i}
            if not nn or (others and not all(idx.twin_without_stereo(j, i) for j in others)):
                continue
            if n.isupper() and len(n) > 5:
                n = n.lower()
            before = (idx.decision(on), idx.decision(nn))
            names = list(r["names"])
            if o not in names:
                names.insert(1 if names else 0, o)
            old_names = r["names"]
            idx.replace(i, n, names)
            after = (idx.decision(on), idx.decision(nn))
            if before[1][0] is None and after[1][0] == i:
                if idx.salt_route(n) not in (None, i):
                    # not new: the name found a salt record (`tobramycin` -> `tobramycin sulfate`)
                    idx.replace(i, o, old_names)
                    continue
                before = (before[0], after[1])   # a name new to the base (`aflatoxin m1`) finds this record
            moved_from_twin = (after[1][0] == i and before[1][0] in others and after[0] == before[0]
                               and after[1][1] == before[1][1])
            if after != before and not moved_from_twin:
                idx.replace(i, o, old_names)
                continue
            pref_of[on].discard(i)
            pref_of.setdefault(nn, set()).add(i)
            renamed += 1
            if report is not None:
                report.append((r["key"], why, o, n))
            done = True
            break
        if not done:
            kept[why] = kept.get(why, 0) + 1
    print(f"preferred names replaced: {renamed}; bad names kept for want of a safe replacement: {kept}",
          file=sys.stderr)


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--chemicals-wheel")
    ap.add_argument("--retention", default=os.path.join(ROOT, "..", "shared", "data", "retention", "retention.tsv"))
    ap.add_argument("--renames", help="write the replaced preferred names (TSV) to this file")
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
    add_ion_table(compounds, order, os.path.join(ROOT, "data", "ic_ions.tsv"))
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

    recs = []
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
        recs.append(dict(key=c["key"], cid=c["cid"], cas=c["cas"], smiles=c["smiles"], formula=c["formula"], pref=c["pref"].replace("|", "/"),
                         names=names, all_names=c["names"], retention_names=ret,
                         retention_confirmed=[n for n in c.get("retention_confirmed", []) if n in names], c=c))
    set_skeletons(recs)
    report = []
    rename_preferred(recs, report)
    if a.renames:
        with open(a.renames, "w", encoding="utf-8") as fh:
            fh.write("inchikey\twhy\tsource preferred name\tpreferred name\n")
            for row in report:
                fh.write("\t".join(row) + "\n")
    rows = []
    for r in recs:
        c = r["c"]
        rows.append([c["key"], c["cid"], c["cas"], c["formula"], c["mw"], c["smiles"],
                     r["pref"], c["source"], "|".join(r["names"])])
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
