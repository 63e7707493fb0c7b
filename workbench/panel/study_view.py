"""The Study tab: a plan from the case as it is, run with a live progress bar and Cancel, read.

The study runs on a background thread (:func:`~workbench.study.engine.run_study`), so the kernel
stays free for a Cancel click. The engine calls back from that thread; what it reports is handed
to the kernel's event loop (``call_soon_threadsafe``) and only there written into widgets — with
no loop running (plain Python, tests) it is written at once, under a lock.

Small studies (up to :data:`IN_PROCESS_MAX` variants) run in this process with no cluster:
starting a local dask cluster takes about 2 s on a 2-core machine, while 10,000 variants of a
usual case take well under a second in one batch per chunk — the tab stays quick to answer.
Larger ones start one local cluster the first time and keep it for later runs (closed with
:meth:`StudyView.close`). The rows are the same either way (the engine's chunks and streams do
not depend on where they run).

After a run, the rows' summary is drawn (:mod:`workbench.panel.study_results`); when the case is
edited afterwards, the results say they are of the case as it was (stale) until run again.
"""

from __future__ import annotations

import asyncio
import json
import tempfile
import threading
from collections.abc import Callable
from pathlib import Path
from typing import Any

import ipywidgets as w
from IPython.display import display

from workbench.case.errors import InputError
from workbench.panel.document import clone
from workbench.panel.form import Form, sized
from workbench.panel.markup import render, render_study
from workbench.panel.study_plan_form import PlanForm
from workbench.panel.study_results import StudyResults
from workbench.study.attached import STUDY_MIME_TYPE, study_output
from workbench.study.engine import Progress, StudyOutcome, local_cluster, run_study
from workbench.study.evaluate import prepare
from workbench.study.histogram import utilisation_histogram
from workbench.study.summary import summarise

#: Studies of at most this many variants run in this process, with no cluster (module notes).
IN_PROCESS_MAX = 10_000


class StudyView:
    """The Study tab: the plan's entries, Run and Cancel, the progress bar, the results.

    Parameters
    ----------
    form
        The panel's fields (the tab's message lines are its lines; its unit reader).
    case_text
        The current valid case's file text (raises while the case as edited is not solved).
    case_path
        The case file's path, if the panel has one (the rows file goes beside it).
    """

    title = "Study"

    def __init__(
        self, form: Form, case_text: Callable[[], str], case_path: Callable[[], Path | None]
    ) -> None:
        self.form = form
        self._case_text = case_text
        self._case_path = case_path
        self.plan_form = PlanForm(form)
        self.rows_file = w.Text(description="rows to", layout=sized("520px"),
                                placeholder="beside the case file (.study.parquet)")  # fmt: skip
        self.run = w.Button(description="Run study", icon="play", button_style="info")
        self.run.on_click(lambda _: self.start_study())
        self.cancel = w.Button(description="Cancel", icon="stop", disabled=True)
        self.cancel.on_click(lambda _: self.cancel_study())
        self.progress = w.FloatProgress(value=0.0, min=0.0, max=1.0, description="variants")
        self.progress_words = w.HTML()
        self.message = form.message("study")
        self.results = StudyResults()
        #: The last finished run: plan, summary, rows file and its digest (plain JSON values).
        self.last: dict[str, Any] | None = None
        self._run_document: dict[str, Any] | None = None
        self._stop = threading.Event()
        self._thread: threading.Thread | None = None
        self._lock = threading.Lock()
        self._loop: asyncio.AbstractEventLoop | None = None
        self._cluster: Any = None
        self._client: Any = None
        self.box = w.VBox(
            [
                w.HTML(render("heading", "Study", " many variants drawn from distributions")),
                self.plan_form.box,
                self.rows_file,
                w.HBox([self.run, self.cancel, self.progress, self.progress_words]),
                self.message,
                self.results.box,
            ]
        )

    # --- entries ------------------------------------------------------------------------------

    def refresh_inputs(self) -> None:
        """Offer the document's inputs (after a structural edit or a change of units)."""
        self.plan_form.refresh_inputs(self.form.document)

    def _rows_path(self) -> Path:
        typed = self.rows_file.value.strip()
        if typed:
            return Path(typed).expanduser()
        case = self._case_path()
        if case is not None:
            return case.with_suffix(".study.parquet")
        return Path(tempfile.gettempdir()) / "workbench-study.parquet"

    # --- running ------------------------------------------------------------------------------

    def start_study(self) -> None:
        """Read the plan, check it against the case, and run it on a background thread."""
        self.message.value = ""
        if self.running:
            return
        try:
            if self.form.state.stale:
                msg = "the case as edited is not solved; fix the field marked in red first"
                raise InputError("study", msg)
            plan_document = self.plan_form.plan_document()
            plan_json = json.dumps(plan_document)
            case_text = self._case_text()
            plan = prepare(case_text, plan_json).plan  # every entry checked before a run
            path = self._rows_path()
            if not path.parent.is_dir():
                raise InputError("study rows to", f"no folder {str(path.parent)!r}")
        except InputError as error:
            self.message.value = render_study("stale", str(error))
            return
        self._stop.clear()
        self._run_document = clone(self.form.document)
        self.progress.value, self.progress.max = 0.0, float(plan.count)
        self.progress_words.value = ""
        self.run.disabled, self.cancel.disabled = True, False
        try:
            self._loop = asyncio.get_running_loop()
        except RuntimeError:
            self._loop = None
        arguments = (case_text, plan_json, plan, path)
        self._thread = threading.Thread(target=self._work, args=arguments, daemon=True)
        self._thread.start()

    @property
    def running(self) -> bool:
        """Whether a study is running."""
        return self._thread is not None and self._thread.is_alive()

    def cancel_study(self) -> None:
        """Stop the running study after the chunk it is on (its rows so far are kept)."""
        self._stop.set()

    def wait(self, timeout: float | None = None) -> None:
        """Wait for the running study to finish (a script or a test)."""
        if self._thread is not None:
            self._thread.join(timeout)

    def close(self) -> None:
        """Close the local cluster kept for large studies."""
        if self._client is not None:
            self._client.close()
            self._cluster.close()
        self._client = self._cluster = None

    def _engine(self, count: int) -> dict[str, Any]:
        if count <= IN_PROCESS_MAX:
            return {"in_process": True}
        if self._client is None:
            from dask.distributed import Client  # noqa: PLC0415 - only for a large study

            # Not the default client of the notebook (the engineer's own dask work stays
            # theirs), and no context entered here: close() may run on another thread.
            self._cluster = local_cluster()
            self._client = Client(self._cluster, set_as_default=False)
        return {"client": self._client}

    def _work(self, case_text: str, plan_json: str, plan: Any, path: Path) -> None:
        """The background thread: run, summarise, hand the results to the kernel's loop."""
        try:
            engine = self._engine(plan.count)
            outcome = run_study(case_text, plan_json, path, progress=self._report,
                                cancel=self._stop, **engine)  # fmt: skip
            found = (
                self._read(case_text, plan_json, plan, outcome, engine) if outcome.rows else None
            )
        except (InputError, OSError) as error:
            why = str(error)
            self._hand_over(lambda: self._failed(why))
            return
        except Exception as error:  # a thread's error has no one to reach but the tab
            why = f"the study stopped: {type(error).__name__}: {error}"
            self._hand_over(lambda: self._failed(why))
            return
        self._hand_over(lambda: self._finished(outcome, found))

    def _read(
        self,
        case_text: str,
        plan_json: str,
        plan: Any,
        outcome: StudyOutcome,
        engine: dict[str, Any],
    ) -> dict[str, Any]:
        summary = summarise(outcome.path, plan, outcome.total)
        if plan.sensitivity.sobol and not outcome.stopped:
            from workbench.study.sensitivity import sobol_indices  # noqa: PLC0415 - SALib, rarely

            sobol_path = outcome.path.with_suffix(".sobol.parquet")
            summary["sobol"], _ = sobol_indices(case_text, plan, sobol_path, cancel=self._stop,
                                                **engine)  # fmt: skip
        found = study_output(case_text, plan_json, summary, outcome.path, outcome.stopped)
        return {**found, "histogram": utilisation_histogram(outcome.path)}

    def _hand_over(self, action: Callable[[], None]) -> None:
        """Run ``action`` where widgets may be written: the kernel's loop, or here under a lock."""
        if self._loop is not None and self._loop.is_running():
            self._loop.call_soon_threadsafe(action)
            return
        with self._lock:
            action()

    def _report(self, progress: Progress) -> None:
        self._hand_over(lambda: self._show_progress(progress))

    def _show_progress(self, progress: Progress) -> None:
        self.progress.value = float(progress.done)
        rate = progress.done / progress.seconds if progress.seconds > 0 else 0.0
        self.progress_words.value = render(
            "text", f"{progress.done:,} of {progress.total:,} ({rate:,.0f} variants/s)"
        )

    def _failed(self, why: str) -> None:
        self.run.disabled, self.cancel.disabled = False, True
        self.message.value = render_study("stale", why)

    def _finished(self, outcome: StudyOutcome, found: dict[str, Any] | None) -> None:
        self.run.disabled, self.cancel.disabled = False, True
        if found is None:
            self.message.value = render("text", "cancelled before any variant was written")
            return
        histogram = found.pop("histogram")
        self.last = found
        self.results.draw(found["summary"], histogram)
        if outcome.stopped:
            self.message.value = render(
                "text",
                f"cancelled: {outcome.rows:,} of {outcome.total:,} variants written to "
                f"{outcome.path} (kept; the results below cover them)",
            )
        self.case_changed()

    # --- the case -----------------------------------------------------------------------------

    def case_changed(self) -> None:
        """Mark the results stale when the case differs from the one they were run on."""
        if self.last is None or self._run_document is None:
            return
        if self.form.document == self._run_document:
            self.results.fresh()
        else:
            self.results.stale(
                "These results are of the case as it was when the study ran; it has been "
                "edited since. Run the study again."
            )

    def for_record(self) -> None:
        """Show the last study as the output the calculation record takes (run in a cell).

        Raises
        ------
        InputError
            No study has finished yet.
        """
        bundle = self.bundle()
        if bundle is None:
            raise InputError("study", "no study has finished yet: run one in the Study tab first")
        display(bundle, raw=True)

    def bundle(self) -> dict[str, Any] | None:
        """The last study as the output the calculation record reads, or ``None``."""
        if self.last is None:
            return None
        return {STUDY_MIME_TYPE: self.last, "text/plain": f"study: {self.last['rows_file']}"}
