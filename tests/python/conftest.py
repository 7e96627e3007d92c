"""Shared fixtures of the Python module's tests (run by CTest: see tests/CMakeLists.txt).

PYTHONPATH must hold the module folder (build/python); GAPWISE_EXE names the
command-line binary of the same build, GAPWISE_SOURCE_DIR the source tree.
"""
import os
import pathlib

import pytest

SOURCE = pathlib.Path(os.environ.get("GAPWISE_SOURCE_DIR", pathlib.Path(__file__).resolve().parents[2]))


def pytest_configure(config):
    # CTest runs the `slow` ones as python_module_slow (CTest label slow), the rest as python_module.
    config.addinivalue_line("markers", "slow: takes several seconds (CTest python_module_slow)")


@pytest.fixture
def source_dir():
    return SOURCE


@pytest.fixture
def gapwise_exe():
    exe = os.environ.get("GAPWISE_EXE")
    if not exe or not os.path.exists(exe):
        pytest.fail("GAPWISE_EXE must name the gapwise binary of the same build (CTest sets it)")
    return exe
