"""Shared paths for the Python package's tests."""

import os
import pathlib

import pytest

ROOT = pathlib.Path(__file__).resolve().parents[3]


@pytest.fixture(scope="session")
def root():
    return ROOT


@pytest.fixture(scope="session")
def cli():
    """The command-line tool built by `cargo build --release` (or FLASHDUTY_BIN)."""
    path = pathlib.Path(os.environ.get("FLASHDUTY_BIN", ROOT / "target" / "release" / "flashduty"))
    if not path.exists():
        pytest.fail(f"{path} not found: run `cargo build --release` first (or set FLASHDUTY_BIN)")
    return path
