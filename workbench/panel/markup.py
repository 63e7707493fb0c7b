"""The panel's HTML: autoescaped Jinja macros (``templates/panel.html.j2``) fed plain values.

No HTML is built in Python: a piece of the panel asks for a macro by name with plain values
(numbers already formatted as text), and every value is escaped by the template engine, so a
case's names (shaft ids, load-case names, notes) cannot inject markup.
"""

from __future__ import annotations

import functools
from typing import Any

import jinja2


@functools.cache
def _macros(template: str = "panel.html.j2") -> Any:
    environment = jinja2.Environment(
        loader=jinja2.PackageLoader("workbench.panel", "templates"),
        autoescape=True,
        undefined=jinja2.StrictUndefined,
    )
    return environment.get_template(template).module


def render(macro: str, /, *args: Any, **values: Any) -> str:
    """The HTML of one macro of the panel's template, given its values.

    Example
    -------
    >>> render("italic", "<b> & co")
    '<i>&lt;b&gt; &amp; co</i>'
    """
    return str(getattr(_macros(), macro)(*args, **values))


def render_study(macro: str, /, *args: Any, **values: Any) -> str:
    """The HTML of one macro of the Study tab's template (``templates/study.html.j2``)."""
    return str(getattr(_macros("study.html.j2"), macro)(*args, **values))
