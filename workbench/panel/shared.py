"""Widget models the panel shares, and the closing of the widgets a rebuild leaves behind.

Layouts and styles are widgets of their own, each a model the browser must create: every field
made with one of its own costs three models. The editors' fields share them instead (they are
never changed once made), so rebuilding the editors — on a unit switch, a new segment — sends
about a third as many models to the page. A widget a rebuild replaces is closed
(:func:`close_tree`): left open, it stays a model in the kernel and on the page.
"""

from __future__ import annotations

import functools
from typing import Any

import ipywidgets as w

#: The model ids of the shared layouts and styles: closing a widget never closes these.
_SHARED: set[str] = set()


@functools.cache
def shared_layout(**css: str) -> w.Layout:
    """One layout per set of CSS properties, shared by every widget that uses it (never changed)."""
    layout = w.Layout(**css)
    _SHARED.add(layout.model_id)
    return layout


@functools.cache
def shared_style(widget: Any, **properties: str) -> w.Widget:
    """One style for widgets of class ``widget`` per set of properties, shared (never changed)."""
    style = widget.class_traits()["style"].klass(**properties)
    _SHARED.add(style.model_id)
    return style


def sized(width: str) -> w.Layout:
    """The shared widget layout of the given CSS width."""
    return shared_layout(width=width)


def close_tree(*widgets: w.Widget) -> None:
    """Close widgets, the boxes' children within, and their own (not shared) layouts and styles.

    A widget left behind by a rebuild stays a model in the kernel and on the page until closed.
    """
    stack = list(widgets)
    while stack:
        widget = stack.pop()
        if widget.comm is None or widget.model_id in _SHARED:
            continue
        stack.extend(getattr(widget, "children", ()))
        for name in ("layout", "style"):
            part = getattr(widget, name, None)
            if isinstance(part, w.Widget) and part.model_id not in _SHARED:
                part.close()
        widget.close()
