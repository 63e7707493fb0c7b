"""The case being edited, its last valid solve, and the coalescing of edit bursts (no widgets).

:class:`CaseState` holds the case document (the case file's JSON in the panel's units, see
:mod:`workbench.panel.document`) and what the solver last made of it. After every edit it hands a
copy to the solver (:func:`~workbench.solver.io.parse_case`,
:func:`~workbench.solver.analysis.solve`, :func:`~workbench.design.checks.run_checks`); bad input
raises :class:`~workbench.case.errors.InputError`, and the last good results stay, marked stale.
It tells the panel through callbacks: ``on_solved()`` after a solve, ``on_error(error)`` when
the document is bad, and ``on_checked()`` when the checks that follow a solve are complete.

In a kernel (an event loop running), every edit is checked at once (``parse_case``), so a bad
value is flagged the moment it is typed, but the solve and the redraw wait until the burst of
edits ends (the loop runs queued callbacks after the current message or cell) and then run once,
on the newest valid document. A case with running speeds is then drawn in two steps: the solve
and its static and fatigue checks first (``on_solved``, the report partial: see
:attr:`~workbench.design.check_report.CheckReport.frequencies_pending`, which the panel shows as
being updated), then, once that is sent, the natural modes and the frequency checks
(``on_checked``, the report complete): the eigensolve no longer delays the charts. Reading :attr:`CaseState.results` (or ``model``, ``report``,
``stale``, ``error``) or calling :meth:`CaseState.settle` finishes that work at once. Without a
loop (plain scripts, tests) every edit solves and redraws before the assignment returns.
"""

from __future__ import annotations

import asyncio
import json
from collections.abc import Callable
from pathlib import Path as FilePath
from typing import Any

from workbench.case.errors import InputError, one_line
from workbench.case.units import UnitSystem
from workbench.design.checks import CheckReport, run_checks, with_frequency_checks
from workbench.panel import CASE_MIME_TYPE
from workbench.panel.document import Path, clone, plain_words, unit_key, unit_system
from workbench.panel.keys import quantity_of
from workbench.solver.analysis import Results, solve
from workbench.solver.build import read_beside
from workbench.solver.io import case_to_dict, parse_case, save_case
from workbench.solver.model import Model
from workbench.solver.modes import Modes, natural_modes

#: Seconds after a solve is drawn that its frequency checks (an eigensolve) run, in a kernel: the
#: page takes about 60-90 ms to draw the charts (measured with tests.benchmarks.paired_browser on
#: a 2-core machine), and an eigensolve run meanwhile takes the CPU it needs. The verdict, the
#: check table and the Modes section say they are being updated until then.
FREQUENCY_DELAY = 0.1


class CaseState:
    """The case document being edited, the last valid solve of it, and the work still pending.

    Parameters
    ----------
    document
        The case file's JSON (decoded), in any units the case file may use. A case that does not
        load is the caller's error (:class:`~workbench.case.errors.InputError` is raised).
    path
        The case file to save to.
    on_solved
        Called after every successful solve (the panel redraws).
    on_error
        Called with the error of a bad document (the panel shows it beside its field).
    on_checked
        Called when a partial report (drawn by ``on_solved``) has been completed.
    """

    def __init__(
        self,
        document: dict[str, Any],
        path: str | FilePath | None,
        on_solved: Callable[[], None],
        on_error: Callable[[InputError], None],
        on_checked: Callable[[], None] = lambda: None,
    ) -> None:
        self.path = FilePath(path) if path is not None else None
        with read_beside(self.path):  # drawing sections named relative to the case file
            model = parse_case(clone(document))
        key = unit_key(model.units)
        #: The panel's unit system (a key of :data:`~workbench.panel.document.UNIT_CHOICES`).
        self.units_key = key or "si"
        #: The case document edited (case-file JSON in the panel's units).
        self.document: dict[str, Any] = (
            clone(document) if key is not None else case_to_dict(model, unit_system("si"))
        )
        self._on_solved, self._on_error, self._on_checked = on_solved, on_error, on_checked
        # A partial report drawn, its frequency checks due (a kernel only): finished by the loop
        # once the page has drawn the rest (FREQUENCY_DELAY), or at once by settle().
        self._checks_due = False
        self._checks_timer: asyncio.TimerHandle | None = None
        #: Whether the frequency checks wait while this is set (a drag: they run once it ends).
        self.checks_held = False
        self._model: Model | None = None
        self._results: Results | None = None
        self._report: CheckReport | None = None
        # Natural modes are worked out only while the Modes section is open (or when asked for),
        # once per solved model: they are a dense eigenproblem, too dear for every edit.
        self._modes: Modes | None = None
        self._why_no_modes = ""
        self._modes_model: Model | None = None
        #: Results and checks pinned to compare against (drawn under the current ones).
        self.baseline: tuple[Results, CheckReport] | None = None
        self._stale = False
        self._error: InputError | None = None
        #: How many solves have run (a burst of edits in a kernel solves once).
        self.solve_count = 0
        # The case output the calculation record reads: made when first asked for after a
        # solve (after the redraw, not before it), then kept.
        self._case_bundle: dict[str, Any] | None = None
        # Coalescing: the newest valid model not yet solved, and the error of the last edit when
        # it came after that model; a flush is scheduled while _pending.
        self._queued: Model | None = None
        self._queued_error: InputError | None = None
        self._pending = False
        #: Entries typed but refused (no number, a unit of another quantity), by field path:
        #: (the text typed, why). The document keeps the last valid value, and while any is
        #: here nothing is solved: the screen would otherwise show a value the results ignore.
        self.refused: dict[str, tuple[str, InputError]] = {}

    # --- what the solver made of the document (pending work finished first) -------------------

    @property
    def units(self) -> UnitSystem:
        """The panel's unit system (the document's units)."""
        return unit_system(self.units_key)

    @property
    def model(self) -> Model | None:
        """The last valid model (solved), or ``None`` before the first valid case."""
        self.settle()
        return self._model

    @property
    def results(self) -> Results | None:
        """Results of :attr:`model`."""
        self.settle()
        return self._results

    @property
    def report(self) -> CheckReport | None:
        """Checks of :attr:`results`."""
        self.settle()
        return self._report

    @property
    def modes(self) -> Modes | None:
        """Natural modes of :attr:`model` (as ``natural_modes`` gives them), or ``None``.

        ``None`` when the case has no inertia (:attr:`why_no_modes` says why).
        """
        self.settle()
        self._ensure_modes()
        return self._modes

    @property
    def why_no_modes(self) -> str:
        """Why :attr:`modes` is ``None`` (empty when there are modes)."""
        self.settle()
        self._ensure_modes()
        return self._why_no_modes

    def _ensure_modes(self) -> None:
        if self._model is not None and self._modes_model is not self._model:
            report = self._report
            if report is not None and report.results.model is self._model and report.modes:
                # The checks already found them (running-speed bands): no second eigensolve.
                self._modes, self._why_no_modes = report.modes, ""
            else:
                self._modes, self._why_no_modes = _modes_of(self._model)
            self._modes_model = self._model

    @property
    def stale(self) -> bool:
        """Whether the document has an error, so the results are those of the last valid case."""
        self.settle()
        return self._stale

    @property
    def error(self) -> InputError | None:
        """The error of the document, when :attr:`stale`."""
        self.settle()
        return self._error

    @property
    def case_bundle(self) -> dict[str, Any] | None:
        """The case output the calculation record reads (``None`` before the first solve).

        That of the last valid solve: the case it solved and its verdict.
        """
        self.settle()
        if self.checks_pending:
            return None  # no verdict before every check has run
        if self._case_bundle is None and self._model is not None and self._report is not None:
            self._case_bundle = _case_output(self._model, self._report)
        return self._case_bundle

    @property
    def pending(self) -> bool:
        """Whether a solve of a burst of edits is scheduled on the event loop."""
        return self._pending

    # --- edits, solves, and their coalescing --------------------------------------------------

    @property
    def checks_pending(self) -> bool:
        """Whether the report drawn is partial, its frequency checks still to run."""
        return self._report is not None and not self._report.complete

    def settle(self) -> None:
        """Solve and redraw a pending edit now instead of when the burst of edits ends."""
        if self._queued is not None:
            self._flush()
        if self._checks_due:
            self._finish_checks()

    def edited(self) -> None:
        """An edit happened: check it now; solve and redraw now, or once the burst ends."""
        loop = _running_loop()
        if loop is None:
            self.refresh()
            return
        # A kernel: edits (from the browser, one message each, or from a cell's loop) arrive
        # faster than a redraw is worth. Each is validated at once, so its message shows as it is
        # typed; the solve and redraw run once, after the queued edits, on the newest valid model.
        model = self._parse()
        if model is not None:
            self._queued, self._queued_error = model, None
        elif self._queued is not None:
            self._queued_error = self._error  # the burst ends on a bad edit: show it after
        if self._queued is not None and not self._pending:
            self._pending = True
            loop.call_soon(self._flush)

    def _flush(self) -> None:
        self._pending = False
        model, error = self._queued, self._queued_error
        self._queued, self._queued_error = None, None
        if model is None:
            return
        if self.refused:  # refused while the solve waited: nothing is solved
            self._fail(self._first_refusal())
            return
        self._solve(model)
        if error is not None:  # the last edit was bad: its message, over the last good charts
            self._fail(error)

    def refresh(self) -> bool:
        """Solve the document and redraw; on bad input keep the last results, marked stale."""
        self._queued, self._queued_error = None, None
        model = self._parse()
        return model is not None and self._solve(model)

    def _parse(self) -> Model | None:
        """The document's model, or ``None`` (and its error shown) when the input is bad."""
        if self.refused:
            self._fail(self._first_refusal())
            return None
        try:
            with read_beside(self.path):
                return parse_case(clone(self.document))
        except InputError as error:
            self._fail(error)
        except Exception as error:
            self._fail(_unexpected(error))
        return None

    def _solve(self, model: Model) -> bool:
        """Solve and check a valid model, then let the panel redraw everything from it."""
        # In a kernel the eigensolve of the frequency checks waits until the rest is sent.
        loop = _running_loop()
        try:
            results = solve(model)
            report = run_checks(results, frequencies=loop is None)
        except InputError as error:
            self._fail(error)
            return False
        except Exception as error:
            self._fail(_unexpected(error))
            return False
        self._model, self._results, self._report = model, results, report
        self.solve_count += 1
        self._stale, self._error = False, None
        self._case_bundle = None
        self._checks_due = False
        self._on_solved()
        if loop is not None and not report.complete:
            self._checks_due = True
            self._schedule_checks(loop)
        return True

    def _schedule_checks(self, loop: asyncio.AbstractEventLoop) -> None:
        if self._checks_timer is not None:
            self._checks_timer.cancel()  # a newer solve: its own checks, after its own redraw
            self._checks_timer = None
        if not self.checks_held:
            self._checks_timer = loop.call_later(FREQUENCY_DELAY, self._finish_checks)

    def release_checks(self) -> None:
        """End :attr:`checks_held` (a drag ended): the frequency checks due follow."""
        self.checks_held = False
        loop = _running_loop()
        if self._checks_due:
            if loop is None:
                self._finish_checks()
            else:
                self._schedule_checks(loop)

    def _finish_checks(self) -> None:
        """Complete the partial report drawn (the frequency checks), then let the panel show it."""
        if self._checks_timer is not None:
            self._checks_timer.cancel()
            self._checks_timer = None
        if not self._checks_due:
            return  # done already (settle)
        self._checks_due = False
        report = self._report
        if report is None or report.complete:
            return
        try:
            self._report = with_frequency_checks(report)
        except InputError as error:
            self._fail(error)
            return
        except Exception as error:
            self._fail(_unexpected(error))
            return
        self._case_bundle = None
        self._on_checked()

    def _fail(self, error: InputError) -> None:
        self._stale, self._error = True, error
        self._on_error(error)

    def _first_refusal(self) -> InputError:
        return next(iter(self.refused.values()))[1]

    def refuse(self, text: str, error: InputError) -> None:
        """An entry typed into the field ``error`` names was refused: nothing is solved.

        The document keeps the field's last valid value; the last valid results stay, stale,
        until the field takes a value (:meth:`accept`) or the editors are rebuilt.
        """
        self.refused[error.field] = (text, error)
        self._queued, self._queued_error = None, None
        self._fail(error)

    def accept(self, field: str) -> None:
        """The field took a value: its earlier refusal no longer holds the solve back."""
        self.refused.pop(field, None)

    def show_current_error(self) -> None:
        """Show the document's error again (on widgets built since), without solving anything."""
        if self._stale and self._error is not None:
            self._on_error(self._error)

    # --- units, baseline, saving --------------------------------------------------------------

    def change_units(self, key: str) -> bool:
        """Re-express the document in another unit system; refused (``False``) while stale."""
        if self.stale or self.model is None:
            return False
        before, self.units_key = self.units, key
        document = case_to_dict(self.model, unit_system(key))
        _keep_keys(self.document, document, (), before, self.units)
        self.document = document
        return True

    def pin_baseline(self) -> bool:
        """Keep the current results as the baseline (not while stale); whether it was pinned."""
        if self.results is not None and self.report is not None and not self.stale:
            self.baseline = (self.results, self.report)
            return True
        return False

    def save(self, path: str | FilePath | None = None) -> FilePath:
        """Save the last valid case to its case file (atomically)."""
        target = FilePath(path) if path is not None else self.path
        if target is None:
            raise InputError("path", "this panel has no case file; give a path to save to")
        if self.stale or self.model is None:
            msg = "the case has errors (marked in red); fix them before saving"
            raise InputError("case", msg)
        save_case(self.model, target)
        self.path = target
        return target

    def case_json(self) -> str:
        """The current case file text (last valid case, panel units)."""
        assert self.model is not None
        return json.dumps(case_to_dict(self.model), indent=2, ensure_ascii=False)


def _keep_keys(old: Any, new: Any, path: Path, before: UnitSystem, after: UnitSystem) -> None:
    """Write back into ``new`` the keys of ``old`` it leaves out, converted to ``after``'s units.

    The case file is written without the keys at their defaults (a frequency margin of 0.2):
    kept, the document a unit switch gives has the keys, and so the fields, it had.
    """
    if isinstance(old, dict) and isinstance(new, dict):
        for key, value in old.items():
            if key not in new:
                new[key] = _converted(value, (*path, key), before, after)
            else:
                _keep_keys(value, new[key], (*path, key), before, after)
    elif isinstance(old, list) and isinstance(new, list) and len(old) == len(new):
        for number, (was, now) in enumerate(zip(old, new, strict=True)):
            _keep_keys(was, now, (*path, number), before, after)


def _converted(value: Any, path: Path, before: UnitSystem, after: UnitSystem) -> Any:
    """A document value at ``path`` in ``before``'s units, in ``after``'s."""
    if isinstance(value, dict):
        return {k: _converted(v, (*path, k), before, after) for k, v in value.items()}
    if isinstance(value, list):
        return [_converted(v, (*path, n), before, after) for n, v in enumerate(value)]
    quantity = quantity_of(path)
    if quantity is None or isinstance(value, bool) or not isinstance(value, (int, float)):
        return clone(value)
    return value * before.factor(quantity) / after.factor(quantity)


def _case_output(model: Model, report: CheckReport) -> dict[str, Any]:
    """The case output the calculation record reads (the exporter takes the last one)."""
    governing = report.governing
    text = (
        f"workbench case: {model.title or 'untitled'}; "
        f"{'all checks pass' if report.passes else 'some checks fail'}"
        + (f"; governing utilisation {governing.utilisation:.3f}" if governing else "")
    )
    return {CASE_MIME_TYPE: case_to_dict(model), "text/plain": text}


def _has_inertia(model: Model) -> bool:
    """Whether a case has discs or a material with a density (anything to vibrate)."""
    return bool(model.discs) or any(
        layer.material.density
        for shaft in model.shafts
        for segment in shaft.segments
        for layer in segment.layers
    )


def _modes_of(model: Model) -> tuple[Modes | None, str]:
    """The natural modes of a case (as ``workbench modes`` gives them), or why there are none."""
    if not _has_inertia(model):
        return None, (
            "This case has no inertia, so no natural frequencies: add discs, or a density for "
            "the shafts' materials (Vibration tab)."
        )
    try:
        return natural_modes(model), ""
    except InputError as error:
        return None, f"No natural modes: {plain_words(error.message)}"


def _running_loop() -> asyncio.AbstractEventLoop | None:
    """The event loop running (a kernel), or ``None`` (a plain script, a test)."""
    try:
        return asyncio.get_running_loop()
    except RuntimeError:
        return None


def _unexpected(error: Exception) -> InputError:
    """An error that is no fault of the input, said in one short line on the status line."""
    return InputError("", one_line(f"unexpected error ({type(error).__name__}): {error}"))
