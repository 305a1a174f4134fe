#!/usr/bin/env python3
"""docs/gate.md shows the Slurm scripts that slurm_cluster_test.py submits:
each `<!-- tests/cluster/NAME -->` line is followed by a fenced block that
must equal that file byte for byte, and every script the cluster test uses
must be shown. So the page cannot drift from what ran on the cluster.

usage: docs_test.py SOURCE_DIR
"""
import os
import sys

SCRIPTS = ("gate-array.sh", "merge.sh", "submit.sh")


def shown_blocks(page):
    """{file named by a marker: the fenced block right after it}."""
    lines = page.splitlines(keepends=True)
    blocks = {}
    for i, line in enumerate(lines):
        stripped = line.strip()
        if not (stripped.startswith("<!-- tests/cluster/") and stripped.endswith("-->")):
            continue
        name = stripped[len("<!-- "):-len("-->")].strip()
        if i + 1 >= len(lines) or not lines[i + 1].startswith("```"):
            blocks[name] = None  # marker without a block right after it
            continue
        body = []
        for inner in lines[i + 2:]:
            if inner.startswith("```"):
                break
            body.append(inner)
        blocks[name] = "".join(body)
    return blocks


def main():
    source = sys.argv[1]
    with open(os.path.join(source, "docs", "gate.md")) as f:
        blocks = shown_blocks(f.read())
    problems = []
    for script in SCRIPTS:
        name = "tests/cluster/" + script
        with open(os.path.join(source, name)) as f:
            text = f.read()
        if name not in blocks:
            problems.append(f"docs/gate.md does not show {name} (no '<!-- {name} -->' line)")
        elif blocks[name] != text:
            problems.append(f"docs/gate.md's block after '<!-- {name} -->' differs from {name}")
    for name in blocks:
        if os.path.basename(name) not in SCRIPTS:
            problems.append(f"docs/gate.md shows {name}, which the cluster test does not use")
    for p in problems:
        print("FAILED:", p)
    if not problems:
        print(f"docs/gate.md shows {', '.join(SCRIPTS)} as they are in tests/cluster/")
    return 1 if problems else 0


if __name__ == "__main__":
    sys.exit(main())
