"""Any value typed into any field of the panel: a message beside the field, or a new solve.

Every number entry and name entry of the demo panel gets a value drawn from extremes (0, −0,
the smallest and largest floats, NaN, ±inf), ordinary numbers, and any text up to a megabyte for
a name. The panel either takes it (solved, nothing shown, not stale) or shows exactly one
message, one line of at most 200 characters, beside the field or on its row, marks the charts
stale and keeps the last good results; typing the old value back clears it all. No exception
reaches the caller.
"""

from __future__ import annotations

import copy
import html
import math
import re
import warnings

import ipywidgets as w
import pytest
from hypothesis import given
from hypothesis import strategies as st

from tests.fuzz.documents import EXTREME, EXTREME_NUMBERS, is_extreme, long_strings
from tests.fuzz.harness import LONGEST_MESSAGE, TALLY, fuzz_settings, set_aside
from tests.panel_cases import open_demo, shown_messages
from workbench.panel import Workbench

#: Edits per CI run (each solves the demo case and redraws).
CI_EXAMPLES = 300

_TAG = re.compile(r"<[^>]*>")

numbers = st.one_of(
    st.sampled_from([v for v in EXTREME_NUMBERS if isinstance(v, float) or abs(v) < 2**53]),
    st.floats(allow_nan=True, allow_infinity=True),
    st.floats(-1e4, 1e4),
)
names = st.one_of(
    st.text(max_size=40),
    long_strings(),
    st.sampled_from(["", " ", "jam", "pressing", "pressing, factored", "a\nb", "\u2028"]),
)


@pytest.fixture(scope="module")
def opened(tmp_path_factory: pytest.TempPathFactory) -> tuple[Workbench, dict]:
    """The demo panel, opened once, and its document as opened."""
    panel = open_demo(tmp_path_factory.mktemp("panel-fuzz"))
    return panel, copy.deepcopy(panel.document)


def _as_opened(panel: Workbench, document: dict) -> None:
    """Put the panel back as opened when an example (a failing one, say) left it otherwise."""
    if panel.document != document or panel.stale or shown_messages(panel):
        panel.document.clear()
        panel.document.update(copy.deepcopy(document))
        panel.form.structural(lambda: None)


def _plain(message: str) -> str:
    return html.unescape(_TAG.sub("", message)).strip()


@fuzz_settings(CI_EXAMPLES)
@given(data=st.data())
def test_any_value_typed_into_any_field_gives_a_message_or_a_solve(
    opened: tuple[Workbench, dict], data: st.DataObject
) -> None:
    panel, document = opened
    _as_opened(panel, document)
    assert not panel.stale
    entries = sorted(
        (
            (path, widget)
            for path, widgets in panel.form.fields.items()
            for widget in widgets
            if isinstance(widget, (w.FloatText, w.Text))
        ),
        key=lambda item: item[0],
    )
    path, entry = data.draw(st.sampled_from(entries), label="field")
    good = entry.value
    # Quantities are typed as text too: numbers as a person writes them, and any text.
    typed = numbers if isinstance(entry, w.FloatText) else st.one_of(numbers.map(str), names)
    bad = data.draw(typed, label="value")
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")  # as a notebook shows them: under the cell
        entry.value = bad
    problems = [f"a warning was shown: {w.message}" for w in caught[:1]]
    shown = shown_messages(panel)
    if panel.stale:
        texts = {_plain(message) for message in shown}
        if not texts:
            problems.append(f"stale, no message beside a field: {_plain(panel.status.value)}")
        elif any("unexpected error" in t for t in texts):
            problems.append(f"an unexpected error: {texts}")
        elif len(texts) > 1:
            problems.append(f"several messages: {texts}")
        elif any("\n" in t or len(t) > LONGEST_MESSAGE for t in texts):
            problems.append(f"a message not one line of at most {LONGEST_MESSAGE}: {texts}")
        elif "wb-stale" not in panel.charts_box._dom_classes:
            problems.append("a message shown, the charts not marked stale")
    elif shown:
        problems.append(f"solved, yet {shown} is shown")
    elif not all(math.isfinite(y) for y in panel.charts.torque.now.y):
        problems.append("solved, and the torque chart holds a number that is not finite")
    made = [f"{EXTREME} {path}"] if is_extreme(good, bad) else []
    problems = set_aside(problems, made)
    TALLY[("panel edits", "refused, message shown" if panel.stale else "solved")] += 1
    assert not problems, f"{path} = {bad!r}: {problems}"
    entry.value = good  # typing the old value back clears it all
    if panel.document != document:  # a rename that merged two names: start again
        _as_opened(panel, document)
    assert not panel.stale and shown_messages(panel) == [], f"{path}: {bad!r} left a mark"
    assert "wb-stale" not in panel.charts_box._dom_classes
