"""Error hierarchy of the solver.

Every error a user can cause is an :class:`InputError`; it carries the dotted path of the field
(``shafts[0].segments[1].section.inner_diameter``) so the CLI and the panel can name it.
"""

from __future__ import annotations


class WorkbenchError(Exception):
    """Base class of every error raised on purpose by workbench."""


class InputError(WorkbenchError, ValueError):
    """Bad input: a value, a reference or a structure the model cannot accept.

    Parameters
    ----------
    field
        Dotted path of the offending field, e.g. ``"shafts[0].segments[1].length"``; empty when
        the error concerns the case as a whole.
    message
        What is wrong, in plain words, with the value and its unit where there is one.
    """

    def __init__(self, field: str, message: str) -> None:
        self.field = field
        self.message = message
        super().__init__(f"{field}: {message}" if field else message)


class MechanismError(InputError):
    """Part of the system is free to spin: no support restrains it."""
