#!/usr/bin/env python3
"""Re-runs the `$ phasewise ...` examples of README.md and docs/user-guide.md that show their
output (lines after the command up to the next `$ ` line or the end of the code block) and
reports each one whose current output differs. Examples marked `(abridged)` or whose shown
output contains `...` are run but only reported when they fail to run. Commands run from the
repository root (so `examples/...` paths resolve) with the release binary first on PATH, a
knowledge base in KB_DIR and one fresh user overlay per document, in document order.

    tools/check_doc_examples.py KB_DIR [--show]

Not part of `cargo test`: a helper for keeping the documents' shown output current.
"""
import os, re, subprocess, sys, tempfile

repo = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
kb_dir = sys.argv[1]
show = "--show" in sys.argv
env = dict(os.environ)
env["PATH"] = os.path.join(repo, "target", "release") + ":" + env["PATH"]
env["PHASEWISE_KB"] = os.path.join(kb_dir, "kb.sqlite")
env.pop("NO_COLOR", None)
differ = 0
for doc in ["README.md", "docs/user-guide.md"]:
    text = open(os.path.join(repo, doc), encoding="utf-8").read().split("\n")
    user = tempfile.mkdtemp()
    env["PHASEWISE_USER_KB"] = os.path.join(user, "user.sqlite")
    in_block = False
    i = 0
    examples = []
    while i < len(text):
        line = text[i]
        if line.startswith("```"):
            in_block = not in_block
            i += 1
            continue
        if in_block and line.startswith("$ phasewise") or (in_block and line.startswith("$ printf") and "phasewise" in line):
            cmd = line[2:]
            start = i + 1
            j = start
            while j < len(text) and not text[j].startswith("$ ") and not text[j].startswith("```"):
                j += 1
            examples.append((i + 1, cmd, text[start:j]))
            i = j
            continue
        i += 1
    for lineno, cmd, shown in examples:
        abridged = "(abridged)" in cmd or any("..." in s or "…" in s for s in shown)
        run = re.sub(r"\s*\(abridged\)\s*$", "", cmd)
        p = subprocess.run(["bash", "-c", run], cwd=repo, env=env, capture_output=True, text=True, timeout=300)
        got = (p.stdout + p.stderr).rstrip("\n").split("\n")
        want = shown
        while want and want[-1] == "":
            want = want[:-1]
        if not shown:
            continue
        if abridged:
            continue
        if [g.rstrip() for g in got] != [w.rstrip() for w in want]:
            differ += 1
            print(f"{doc}:{lineno}: output differs: {cmd}")
            if show:
                import difflib
                for d in difflib.unified_diff(want, got, "shown", "current", lineterm="", n=1):
                    print("    " + d)
print(f"{differ} example(s) differ")
