"""The Python module's rows of notebooks-free-docs/bad-input-catalogue.md
("The Python module"), end to end: each row's call raises gapwise.InputError
whose text is exactly the row's message, so the docs cannot drift from the module."""
import re

import numpy as np  # noqa: F401  (rows use np)
import pytest

import gapwise  # noqa: F401

ROW = re.compile(r"^\| (PY\d+) \| [^|]* \| `(.*)` \| (.*) \|$")


def rows(source_dir):
    doc = (source_dir / "notebooks-free-docs" / "bad-input-catalogue.md").read_text(encoding="utf-8")
    found = [m.groups() for m in map(ROW.match, doc.splitlines()) if m]
    assert len(found) >= 11, "the Python rows of the catalogue were not found"
    return found


def test_every_python_row_raises_its_catalogued_message(source_dir):
    names = {"gapwise": gapwise, "np": np,
             "TRIANGLE": str(source_dir / "data-samples" / "triangle.toml"),
             "LINEAR": str(source_dir / "schedules" / "linear.toml")}
    for row_id, call, message in rows(source_dir):
        with pytest.raises(gapwise.InputError) as err:
            eval(call, names)
        assert str(err.value) == message, row_id
        assert isinstance(err.value, ValueError) and err.value.fix in message, row_id
