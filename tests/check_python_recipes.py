#!/usr/bin/env python3
"""Runs every code block of notebooks-free-docs/python-recipes.md, in order, the
way a reader would: the `sh` block's gapwise commands first (in a fresh folder
that links the repository's data-samples/ and schedules/), then each `python`
block in one shared namespace in that folder. A block that raises fails the
run (the block and the error are printed). With --figures DIR the PNG files
the blocks drew are copied to DIR (how the page's figures are made).
The blocks of the section "## The Python module" (to the next "## " heading) run when the
environment says the build has it (GAPWISE_PYTHON_MODULE=1, set by CTest with
PYTHONPATH); in a build without it (the sanitizer build) they are skipped, and
the skip is printed.

Usage: check_python_recipes.py GAPWISE_EXE REPO_ROOT [--figures DIR]
"""
import os
import pathlib
import re
import shlex
import shutil
import subprocess
import sys
import tempfile
import traceback

BLOCK = re.compile(r"^```(sh|python)\n(.*?)^```", re.S | re.M)


def main():
    exe = str(pathlib.Path(sys.argv[1]).resolve())
    root = pathlib.Path(sys.argv[2]).resolve()
    figures = pathlib.Path(sys.argv[sys.argv.index("--figures") + 1]).resolve() if "--figures" in sys.argv else None
    page = (root / "notebooks-free-docs" / "python-recipes.md").read_text(encoding="utf-8")
    blocks = BLOCK.findall(page)
    # Which blocks belong to the section on the Python module (they need the module).
    start = page.find("\n## The Python module")
    end = page.find("\n## ", start + 1) if start >= 0 else -1
    end = len(page) if end < 0 else end
    in_module = [start >= 0 and start < m.start() < end for m in BLOCK.finditer(page)]
    if not any(kind == "python" for kind, _ in blocks):
        print("no python blocks found")
        return 1
    tmp = pathlib.Path(tempfile.mkdtemp(prefix="gapwise-recipes-"))
    here = os.getcwd()
    try:
        for sub in ("data-samples", "schedules"):
            (tmp / sub).symlink_to(root / sub)
        os.chdir(tmp)
        namespace = {"__name__": "__recipes__"}
        ran = skipped = 0
        for index, (kind, code) in enumerate(blocks):
            if kind == "sh":
                for line in code.splitlines():
                    words = shlex.split(line)
                    if not words:
                        continue
                    if words[0] == "build/gapwise":
                        words[0] = exe
                    proc = subprocess.run(words, capture_output=True, text=True)
                    if proc.returncode != 0:
                        print(f"FAIL: {line}\n{proc.stderr}")
                        return 1
            else:
                if in_module[index] and os.environ.get("GAPWISE_PYTHON_MODULE") != "1":
                    print(f"python block {ran + 1} skipped: this build has no Python module")
                    ran += 1
                    skipped += 1
                    continue
                try:
                    exec(compile(code, f"python-recipes.md block {ran + 1}", "exec"), namespace)
                except Exception:
                    print(f"FAIL: python block {ran + 1}:\n{code}")
                    traceback.print_exc()
                    return 1
                ran += 1
        pngs = sorted(tmp.glob("*.png"))
        if len(pngs) < 4:
            print(f"FAIL: only {len(pngs)} figures drawn")
            return 1
        if figures:
            figures.mkdir(parents=True, exist_ok=True)
            for png in pngs:
                shutil.copy(png, figures / png.name)
        print(f"{ran - skipped} python blocks ran, {skipped} skipped; figures: {', '.join(p.name for p in pngs)}")
        return 0
    finally:
        os.chdir(here)
        shutil.rmtree(tmp, ignore_errors=True)


if __name__ == "__main__":
    sys.exit(main())
