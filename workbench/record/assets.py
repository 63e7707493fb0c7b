"""Where the record's templates and static files are: the source tree's or the installed copy."""

from __future__ import annotations

from pathlib import Path

from workbench.case.errors import InputError


def templates_dir() -> Path:
    """The folder holding ``workbench_record/``: the source tree's or the installed package's."""
    here = Path(__file__).resolve()
    for candidate in (here.parents[1] / "templates", here.parents[2] / "templates"):
        if (candidate / "workbench_record" / "conf.json").is_file():
            return candidate
    msg = f"the record template folder is missing (looked beside {here.parents[1]})"
    raise InputError("templates", msg)
