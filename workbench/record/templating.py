"""The record's templates: where they are, and the one autoescaping Jinja environment.

The top-level ``templates/`` folder ships inside the wheel as ``workbench/templates``; both
layouts are found from this file's own place. Every page, section and drawing of the record is
rendered by :func:`environment`, which escapes every value it writes (``autoescape=True``), so
a name from a case file or a notebook can never become markup.
"""

from __future__ import annotations

from functools import lru_cache
from pathlib import Path
from typing import Any

from workbench.case.errors import InputError

__all__ = ["TEMPLATE_NAME", "environment", "record_css", "render", "templates_dir"]

#: The record's template folder below :func:`templates_dir` (also nbconvert's template name).
TEMPLATE_NAME = "workbench_record"


@lru_cache(maxsize=1)
def templates_dir() -> Path:
    """The folder holding ``workbench_record/``: the source tree's or the installed package's.

    Raises
    ------
    InputError
        When neither layout holds the record's templates.
    """
    here = Path(__file__).resolve()
    for candidate in (here.parents[1] / "templates", here.parents[2] / "templates"):
        if (candidate / TEMPLATE_NAME / "conf.json").is_file():
            return candidate
    msg = f"the record template folder is missing (looked beside {here.parents[1]})"
    raise InputError("templates", msg)


@lru_cache(maxsize=1)
def record_css() -> str:
    """The record's own stylesheet (screen and print), read once per process."""
    return (templates_dir() / TEMPLATE_NAME / "static" / "record.css").read_text("utf-8")


def _decimals(places: int) -> Any:
    """A filter writing a number with ``places`` decimals (coordinates of the drawings)."""
    pattern = f"{{:.{places}f}}"
    return pattern.format


def _general(value: float) -> str:
    """A filter writing a number in the shortest general form (``:g``)."""
    return f"{value:g}"


@lru_cache(maxsize=1)
def environment() -> Any:
    """The record's Jinja environment: autoescaped, strict, templates compiled once per process.

    Block tags on a line of their own leave nothing behind (``trim_blocks``,
    ``lstrip_blocks``), so a template's lines are the lines it writes; a template's final
    newline is kept.
    """
    from jinja2 import Environment, FileSystemLoader, StrictUndefined  # noqa: PLC0415

    jinja = Environment(
        loader=FileSystemLoader(str(templates_dir() / TEMPLATE_NAME)),
        autoescape=True,
        undefined=StrictUndefined,
        keep_trailing_newline=True,
        trim_blocks=True,
        lstrip_blocks=True,
        auto_reload=False,
    )
    jinja.filters.update(f1=_decimals(1), f2=_decimals(2), g=_general)
    return jinja


def render(template: str, **context: Any) -> str:
    """Render one of the record's templates (a path below ``workbench_record/``)."""
    text: str = environment().get_template(template).render(**context)
    return text
