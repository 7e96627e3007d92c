#!/usr/bin/env python3
"""Reruns every worked example's commands and checks the numbers its document
quotes against what the tool prints today.

A document under notebooks-free-docs/examples/ marks each quoted number in a
comment block:

    <!-- gapwise-check
    run: anneal data-samples/triangle.toml schedules/linear.toml -d 20 --json
    ground_probability: 0.899084 +- 1e-5
    outcomes.0.bits: 101
    -->

`run` is a gapwise command line (run from the repository root) that prints
JSON; each further line is a dotted key path into that JSON, the quoted value,
and for numbers an absolute tolerance. `{tmp}` in a `run` line stands for a
fresh temporary folder (for commands that must write a file, such as
`pause-map --out {tmp}/map.h5`), so checks leave nothing in the source tree and
never resume from an earlier run's journal. Exit status 0 when every check holds.
Usage: check_worked_examples.py GAPWISE_EXE REPO_ROOT
"""
import json
import pathlib
import re
import shlex
import subprocess
import sys
import tempfile

BLOCK = re.compile(r"<!--\s*gapwise-check\s*\n(.*?)-->", re.S)


def lookup(data, path):
    for part in path.split("."):
        data = data[int(part)] if isinstance(data, list) else data[part]
    return data


def main():
    exe, root = sys.argv[1], pathlib.Path(sys.argv[2])
    docs = sorted((root / "notebooks-free-docs" / "examples").glob("*.md"))
    checks = failures = 0
    for doc in docs:
        for block in BLOCK.findall(doc.read_text()):
            lines = [l.strip() for l in block.strip().splitlines() if l.strip()]
            if not lines or not lines[0].startswith("run:"):
                print(f"{doc.name}: a check block must start with 'run:'")
                failures += 1
                continue
            with tempfile.TemporaryDirectory() as tmp:
                cmd = [exe] + [w.replace("{tmp}", tmp) for w in shlex.split(lines[0][4:].strip())]
                proc = subprocess.run(cmd, cwd=root, capture_output=True, text=True)
            if proc.returncode != 0:
                print(f"{doc.name}: command failed ({proc.returncode}): {' '.join(cmd)}\n{proc.stderr}")
                failures += 1
                continue
            data = json.loads(proc.stdout)
            for line in lines[1:]:
                key, _, expect = line.partition(":")
                key, expect = key.strip(), expect.strip()
                checks += 1
                try:
                    got = lookup(data, key)
                except (KeyError, IndexError, ValueError) as e:
                    print(f"{doc.name}: {key}: missing in the output ({e})")
                    failures += 1
                    continue
                if "+-" in expect:
                    value, tol = (float(x) for x in expect.split("+-"))
                    ok = abs(float(got) - value) <= tol
                else:
                    ok = str(got) == expect
                if not ok:
                    print(f"{doc.name}: {key}: the document says {expect}, the tool prints {got}")
                    failures += 1
    print(f"worked examples: {len(docs)} documents, {checks} quoted values checked, {failures} failures")
    if not docs or checks == 0:
        print("no checks found")
        return 1
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
