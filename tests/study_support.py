"""Shared pieces of the study tests: a small case, a plan writer and one local dask cluster."""

from __future__ import annotations

import json
import logging
from collections.abc import Iterator
from typing import Any

import pytest

#: A solid steel shaft fixed at x = 0 with a torque at its free end; the design states an
#: allowable shear stress, so its one check is τ = 16T/(πd³) against it. Demo values.
SHAFT_CASE: dict[str, Any] = {
    "units": {"length": "mm", "torque": "N*m", "stress": "MPa", "angle": "deg"},
    "materials": {"steel": {"shear_modulus": 79300, "yield_strength": 350}},
    "shafts": [
        {"id": "main", "segments": [
            {"length": 500, "material": "steel", "section": {"shape": "solid", "diameter": 50}}
        ]}
    ],
    "supports": [{"shaft": "main", "x": 0, "kind": "fixed"}],
    "load_cases": [{"name": "service", "torques": [{"shaft": "main", "x": 500, "torque": 2000}]}],
    "design": {"shear_criterion": "allowable", "allowable_shear_stress": 100},
}  # fmt: skip


def case_text(**changes: Any) -> str:
    """The shaft case as JSON text, with top-level keys replaced."""
    return json.dumps({**SHAFT_CASE, **changes})


def plan_text(inputs: list[dict[str, Any]], **sampling: Any) -> str:
    """A plan's JSON: the inputs and the sampling keys given, every output."""
    outputs = ["governing_utilisation", "check_utilisations", "reactions", "twists"]
    return json.dumps({"inputs": inputs, "sampling": sampling, "outputs": outputs})


def diameter_input(**distribution: Any) -> dict[str, Any]:
    """The shaft's diameter varied with ``distribution``."""
    return {"path": "shafts[0].segments[0].section.diameter", "distribution": distribution}


@pytest.fixture(scope="session")
def study_cluster() -> Iterator[Any]:
    """A client of a LocalCluster of two worker processes (one thread each), kept for the session."""
    from dask.distributed import Client, LocalCluster

    from workbench.study.engine import ONE_THREAD

    cluster = LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                           dashboard_address=":0",  # its HTTP routes on a free port, never a taken 8787
                           silence_logs=logging.ERROR, env=ONE_THREAD)  # fmt: skip
    with cluster, Client(cluster) as client:
        yield client
