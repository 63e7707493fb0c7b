"""Error hierarchy of the solver.

Every error a user can cause is an :class:`InputError`; it carries the dotted path of the field
(``shafts[0].segments[1].section.inner_diameter``) so the CLI and the panel can name it.

A message is one line of at most :data:`LONGEST_LINE` characters. It quotes at most
:data:`QUOTED` characters of any value the user wrote (:func:`quoted`), a few names of a list
(:func:`listing`); :class:`InputError`'s text is cut to that line whatever it was given.
"""

from __future__ import annotations

import json
import re
from collections.abc import Iterable
from typing import Any

#: The longest line a message takes (characters; README, "Commands").
LONGEST_LINE = 200
#: The most of a value a message quotes (characters).
QUOTED = 60
#: The most names of a list a message shows.
LISTED = 5
#: Where a line would break: line and paragraph separators, and the other control characters.
_BREAKS = re.compile(r"[\x00-\x1f\x7f-\x9f\u2028\u2029]+")


def short(text: str, most: int = QUOTED) -> str:
    """``text`` cut to ``most`` characters, the cut marked with an ellipsis."""
    return text if len(text) <= most else text[: most - 1] + "…"


def quoted(value: Any) -> str:
    """``value`` as a message quotes it: its ``repr``, at most :data:`QUOTED` characters."""
    return short(repr(value))


def path_key(name: str) -> str:
    """A key of the user's as a field path shows it, at most :data:`QUOTED` characters.

    As written, or in JSON quotes when it is empty, has blanks at an end or characters that are
    not plain text (a line break would split the message).
    """
    if name.isprintable() and name.strip() == name != "":
        return short(name)
    written = json.dumps(name, ensure_ascii=False)
    return short("".join(c if c.isprintable() else _escaped(c) for c in written))


def _escaped(character: str) -> str:
    code = ord(character)
    return f"\\u{code:04x}" if code <= 0xFFFF else f"\\U{code:08x}"


def listing(names: Iterable[Any]) -> str:
    """The first :data:`LISTED` of ``names``, quoted, then how many more there are."""
    shown: list[str] = []
    more = 0
    for name in names:
        if len(shown) < LISTED:
            shown.append(quoted(name))
        else:
            more += 1
    return ", ".join(shown) + (f" and {more:,} more" if more else "")


def one_line(text: str, most: int = LONGEST_LINE) -> str:
    """``text`` on one line (breaks and control characters as spaces), cut to ``most``."""
    return short(_BREAKS.sub(" ", text), most)


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

    def __str__(self) -> str:
        """The one line a user reads: the field (a long one cut in the middle), the message."""
        field = self.field
        if len(field) > 2 * QUOTED:
            field = f"{field[: QUOTED - 1]}…{field[-QUOTED:]}"
        return one_line(f"{field}: {self.message}" if field else self.message)


class MechanismError(InputError):
    """Part of the system is free to spin: no support restrains it."""
