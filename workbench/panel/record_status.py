"""A loaded calculation record's signature status, as one line in the panel.

The line comes from :func:`workbench.signing.record_status` (the signing package, below the
faces): who prepared, checked and approved the record, with each key's fingerprint, or the
first signature that fails. The panel never imports the record's code.
"""

from __future__ import annotations

import os

from workbench.panel.markup import render
from workbench.signing import record_status

__all__ = ["RecordStatus"]


class RecordStatus:
    """A status line for a record file, shown in a notebook as an HTML widget.

    Parameters
    ----------
    path
        The record file (HTML) to read.

    Attributes
    ----------
    holds
        Whether every signature of the record holds and its content is unchanged.
    line
        The status in words.
    widget
        The ``ipywidgets.HTML`` showing the line.

    Example
    -------
    >>> status = RecordStatus("missing.html")
    >>> status.holds
    False
    """

    def __init__(self, path: str | os.PathLike[str]) -> None:
        import ipywidgets  # noqa: PLC0415 - the package stays light until a widget is made

        self.holds, self.line = record_status(path)
        self.widget = ipywidgets.HTML(render("record_status", self.holds, self.line))

    def _ipython_display_(self) -> None:
        from IPython.display import display  # noqa: PLC0415

        display(self.widget)
