#!/usr/bin/env python3
"""Re-runs the `$ phasewise ...` examples of README.md and docs/user-guide.md that show their
output (lines after the command up to the next `$ ` line or the end of the code block) and
reports each one whose current output differs.

    tools/check_doc_examples.py KB_DIR [--show] [--update]

KB_DIR holds the shipped knowledge base `kb.sqlite` the release binary uses (by default
`~/.local/share/phasewise`; `phasewise kb path` prints it). `--show` prints a diff for each
example that differs; `--update` writes the current output into the documents in place of the
shown output (review the change with `git diff` before committing it).

How the examples run:
- with the release binary (target/release/phasewise) first on PATH, PHASEWISE_KB set to
  KB_DIR/kb.sqlite and NO_COLOR unset;
- in a fresh scratch folder per document (deleted afterwards, so no output of an example is left
  in the repository), in document order, with the user overlay `lab-overlay.sqlite` in that
  folder (the guide sets PHASEWISE_USER_KB so in section 1);
- the scratch folder links `examples/` and `docs/` of the repository, and every input file of
  `examples/broken/`, `examples/lab/` and `examples/measured/` at its top, so that both the
  commands written with `examples/...` paths and those the guide runs "from that folder" find
  their (invented) inputs.

Examples not compared (run only, reported when they fail to start): a command ending in
`(abridged)`, shown output containing `...` or `…`, and a command whose trailing shell comment
says `differs per machine` (e.g. the absolute path of the knowledge base).

Not part of `cargo test`: a helper for keeping the documents' shown output current.
"""
import difflib
import os
import re
import shutil
import subprocess
import sys
import tempfile

repo = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
args = [a for a in sys.argv[1:] if not a.startswith("--")]
if len(args) != 1:
    sys.exit(__doc__)
kb_dir = os.path.abspath(args[0])
show = "--show" in sys.argv
update = "--update" in sys.argv
if not os.path.exists(os.path.join(kb_dir, "kb.sqlite")):
    sys.exit(f"{sys.argv[0]}: no kb.sqlite in {kb_dir} (`phasewise kb path` prints where it is)")
env = dict(os.environ)
env["PATH"] = os.path.join(repo, "target", "release") + ":" + env["PATH"]
env["PHASEWISE_KB"] = os.path.join(kb_dir, "kb.sqlite")
env["PHASEWISE_USER_KB"] = "lab-overlay.sqlite"
env.pop("NO_COLOR", None)
INPUT_FOLDERS = ["examples/broken", "examples/lab", "examples/measured"]


def scratch_folder():
    """A fresh folder with the repository's examples linked in (see the module note)."""
    d = tempfile.mkdtemp(prefix="phasewise-doc-")
    for name in ["examples", "docs"]:
        os.symlink(os.path.join(repo, name), os.path.join(d, name))
    for folder in INPUT_FOLDERS:
        for f in sorted(os.listdir(os.path.join(repo, folder))):
            target = os.path.join(d, f)
            if not os.path.exists(target):
                os.symlink(os.path.join(repo, folder, f), target)
    return d


def examples_of(lines):
    """(index of the command line, command, index after the shown output, shown lines)."""
    out = []
    in_block = False
    i = 0
    while i < len(lines):
        line = lines[i]
        if line.startswith("```"):
            in_block = not in_block
            i += 1
            continue
        if in_block and (
            line.startswith("$ phasewise")
            or (line.startswith("$ printf") and "phasewise" in line)
        ):
            j = i + 1
            while j < len(lines) and not lines[j].startswith("$ ") and not lines[j].startswith("```"):
                j += 1
            out.append((i, line[2:], j, lines[i + 1 : j]))
            i = j
            continue
        i += 1
    return out


differ = 0
checked = 0
for doc in ["README.md", "docs/user-guide.md"]:
    path = os.path.join(repo, doc)
    lines = open(path, encoding="utf-8").read().split("\n")
    work = scratch_folder()
    replacements = []
    try:
        for i, cmd, end, shown in examples_of(lines):
            abridged = (
                "(abridged)" in cmd
                or "differs per machine" in cmd
                or any("..." in s or "…" in s for s in shown)
            )
            run = re.sub(r"\s*\(abridged\)\s*$", "", cmd)
            p = subprocess.run(
                ["bash", "-c", run], cwd=work, env=env, capture_output=True, text=True, timeout=600
            )
            got = (p.stdout + p.stderr).rstrip("\n").split("\n")
            if got == [""]:
                got = []
            want = list(shown)
            while want and want[-1] == "":
                want.pop()
            if not want or abridged:
                if p.returncode == 127 or "command not found" in p.stderr:
                    print(f"{doc}:{i + 1}: does not run: {cmd}")
                    differ += 1
                continue
            checked += 1
            if [g.rstrip() for g in got] != [w.rstrip() for w in want]:
                differ += 1
                print(f"{doc}:{i + 1}: output differs: {cmd}")
                if show:
                    for d in difflib.unified_diff(want, got, "shown", "current", lineterm="", n=1):
                        print("    " + d)
                # keep the blank lines that followed the shown output
                replacements.append((i + 1, i + 1 + len(want), [g.rstrip() for g in got]))
    finally:
        shutil.rmtree(work, ignore_errors=True)
    if update and replacements:
        for a, b, new in reversed(replacements):
            lines[a:b] = new
        with open(path, "w", encoding="utf-8") as f:
            f.write("\n".join(lines))
        print(f"{doc}: wrote the current output of {len(replacements)} example(s)")
print(f"{checked} example(s) compared, {differ} differ")
