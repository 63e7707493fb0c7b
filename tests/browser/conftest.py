"""Fixtures of the browser tests: a private JupyterLab in a scratch folder."""

from __future__ import annotations

from collections.abc import Iterator
from pathlib import Path

import pytest

from tests.browser.lab import Lab, jupyter_lab


@pytest.fixture
def lab(tmp_path: Path) -> Iterator[Lab]:
    scratch = tmp_path / "lab"
    scratch.mkdir()
    with jupyter_lab(scratch) as running:
        yield running
