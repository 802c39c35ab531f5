"""Shared test set-up: backend header, hypothesis profiles, reference data."""

from __future__ import annotations

import json
import os
from pathlib import Path
from typing import Any

import pytest
from hypothesis import HealthCheck, settings

from realquad._backend import BACKEND, BUILD_NOTE

settings.register_profile(
    "quick", max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow]
)
settings.register_profile(
    "ci", max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow]
)
settings.register_profile(
    "thorough", max_examples=2000, deadline=None, suppress_health_check=[HealthCheck.too_slow]
)
settings.load_profile(os.environ.get("HYPOTHESIS_PROFILE", "quick"))

DATA_DIRS = [
    Path(__file__).resolve().parent / "data",
    Path(__file__).resolve().parents[2] / "shared" / "data",
]


def pytest_report_header(config: pytest.Config) -> str:
    note = f" ({BUILD_NOTE})" if BUILD_NOTE else ""
    return f"realquad kernels: {BACKEND}{note}"


def load_reference(name: str) -> Any:
    """Load a reference data file (tests/data first, then ../shared/data)."""
    for base in DATA_DIRS:
        path = base / name
        if path.exists():
            return json.loads(path.read_text(encoding="utf-8"))
    raise FileNotFoundError(name)


@pytest.fixture(scope="session")
def oeis() -> Any:
    return load_reference("oeis.json")
