"""Worked example 07 (notebooks-free-docs/examples/07-python-field-study.md): its
script runs end to end, draws its figure, and prints the table the page quotes;
the page's Python block runs as written. The quoted numbers are the tool's own
(a regression check of the page, not a physics check: the physics checks are
in test_physics.py)."""
import re
import subprocess
import sys

import matplotlib.image
import pytest

pytestmark = pytest.mark.slow


def quoted_table(md):
    return [l for l in md.splitlines() if re.match(r"^\| [0-9]", l)]


def test_script_prints_the_quoted_table_and_draws_the_figure(tmp_path, source_dir):
    examples = source_dir / "notebooks-free-docs" / "examples"
    run = subprocess.run([sys.executable, str(examples / "07-python-field-study.py"), str(tmp_path)],
                         capture_output=True, text=True, timeout=120)
    assert run.returncode == 0, run.stderr
    printed = quoted_table(run.stdout)
    quoted = quoted_table((examples / "07-python-field-study.md").read_text(encoding="utf-8"))
    assert len(printed) == 8 and printed == quoted
    image = matplotlib.image.imread(tmp_path / "07-field-study.png")
    assert image.shape[0] > 300 and image.shape[1] > 1000  # three panels side by side
    assert image[..., :3].std() > 0.05  # not a blank canvas


def test_page_python_block_runs(source_dir, monkeypatch):
    md = (source_dir / "notebooks-free-docs" / "examples" / "07-python-field-study.md").read_text(encoding="utf-8")
    blocks = re.findall(r"^```python\n(.*?)^```", md, re.S | re.M)
    assert blocks
    monkeypatch.chdir(source_dir)
    namespace = {}
    exec(compile(blocks[0], "07-python-field-study.md", "exec"), namespace)
    assert namespace["study"]["duration_needed"]["status"] == "reached"
    assert abs(namespace["gap"]["gap_ghz"] - 0.4973) < 5e-5  # the table's h = 0.2 row
