"""A study in the calculation record: taken from the panel's output, signed, verified again.

The study is the panel's own (a small Monte Carlo run of the shaft case of
tests/study_support.py); verification re-runs its first variants from the plan and seed, checks
the rows file's SHA-256 when given, and fails on a changed summary number or rows file.
"""

from __future__ import annotations

import copy
import json
from pathlib import Path

import nbformat
import pyarrow as pa
import pyarrow.parquet as pq
import pytest

from tests.study_support import SHAFT_CASE
from workbench import cli
from workbench.case import CASE_MIME_TYPE
from workbench.case.errors import InputError
from workbench.cli.record import EXIT_NOT_VERIFIED
from workbench.panel import Workbench
from workbench.record.demo import DEMO_TITLE_BLOCK
from workbench.record.exporter import export_file
from workbench.record.verify import verify_record
from workbench.signing import write_key_pair
from workbench.study.attached import STUDY_MIME_TYPE

DIAMETER = "shafts[0].segments[0].section.diameter"
SIGNED_AT = "2025-03-01T12:00:00Z"


def _study_notebook(folder: Path) -> Path:
    """A notebook holding the panel's case and its last study, as a kernel writes them."""
    panel = Workbench(copy.deepcopy(SHAFT_CASE))
    form = panel.study.plan_form
    form.input_path.value = DIAMETER
    entries = {entry.description.split(" [")[0]: entry for entry in form.parameters.children}
    entries["mean"].value, entries["std"].value = "47", "1"
    form.add_input()
    form.count.value, form.seed.value = "3000", "5"
    panel.study.rows_file.value = str(folder / "rows.parquet")
    panel.study.start_study()
    panel.study.wait(120)
    bundle = panel.study.bundle()
    assert bundle is not None and panel.case_bundle is not None
    nb = nbformat.v4.new_notebook()
    nb.metadata["workbench"] = {"title_block": copy.deepcopy(DEMO_TITLE_BLOCK)}
    cell = nbformat.v4.new_code_cell("panel.study.for_record()")
    cell.outputs = [
        nbformat.v4.new_output("display_data", data=panel.case_bundle),
        nbformat.v4.new_output("display_data", data=bundle),
    ]
    nb.cells.append(cell)
    path = folder / "study.ipynb"
    nbformat.write(nb, str(path))
    return path


@pytest.fixture(scope="module")
def signed(tmp_path_factory: pytest.TempPathFactory) -> tuple[Path, Path, Path]:
    folder = tmp_path_factory.mktemp("study_record")
    private, public = write_key_pair(folder / "key")
    text, _ = export_file(_study_notebook(folder), key_file=private, signed_at=SIGNED_AT,
                          execute=False)  # fmt: skip
    record = folder / "record.html"
    record.write_text(text, encoding="utf-8", newline="")
    return record, public, folder / "rows.parquet"


def test_a_record_with_a_study_verifies_with_and_without_its_rows(
    signed: tuple[Path, Path, Path],
) -> None:
    record, public, rows = signed
    text = record.read_text("utf-8")
    assert 'id="study"' in text and "Clopper–Pearson" in text and "study-histogram" in text
    outcome = verify_record(record, public)
    assert outcome.ok, outcome.problems
    assert any("first 1000 variants run again" in fact for fact in outcome.facts)
    with_rows = verify_record(record, public, study_rows=rows)
    assert with_rows.ok, with_rows.problems
    assert any("is the one signed; its summary agrees" in fact for fact in with_rows.facts)
    assert cli.main(["verify", str(record), "--public-key", str(public),
                     "--study-rows", str(rows)]) == 0  # fmt: skip


def test_a_changed_summary_number_fails(signed: tuple[Path, Path, Path], tmp_path: Path) -> None:
    record, public, _ = signed
    text = record.read_text("utf-8")
    payload = verify_record(record, public).payload
    assert payload is not None
    shown = payload["study"]["summary"]["exceedance"]["exceeding"]
    written = f"({shown:,} of "
    assert text.count(written) == 1
    changed = tmp_path / "changed.html"
    changed.write_text(text.replace(written, f"({shown + 1:,} of "), "utf-8", newline="")
    outcome = verify_record(changed, public)
    assert not outcome.ok
    assert any("content was altered" in problem for problem in outcome.problems)
    assert cli.main(["verify", str(changed), "--public-key", str(public)]) == EXIT_NOT_VERIFIED


def test_a_changed_rows_file_fails(signed: tuple[Path, Path, Path], tmp_path: Path) -> None:
    record, public, rows = signed
    table = pq.read_table(rows)
    utilisation = table.column("governing_utilisation").to_numpy().copy()
    utilisation[-1] *= 1.5  # one variant past the first thousand: only the file can tell
    other = tmp_path / "rows.parquet"
    column = table.schema.get_field_index("governing_utilisation")
    pq.write_table(table.set_column(column, "governing_utilisation", pa.array(utilisation)), other)
    outcome = verify_record(record, public, study_rows=other)
    assert not outcome.ok
    assert any("is not the one signed" in problem for problem in outcome.problems)
    args = ["verify", str(record), "--public-key", str(public), "--study-rows", str(other)]
    assert cli.main(args) == EXIT_NOT_VERIFIED


def test_a_changed_plan_seed_fails_the_rerun(
    signed: tuple[Path, Path, Path], tmp_path: Path
) -> None:
    """An unsigned copy with another seed in its payload: the first variants run again differ."""
    from workbench.record.study import check_study

    record, public, _ = signed
    payload = verify_record(record, public).payload
    assert payload is not None
    study = json.loads(json.dumps(payload["study"]))
    study["plan"]["sampling"]["seed"] = 6
    _, problems = check_study(study, payload["case"], None)
    assert any("rows digest mismatch" in problem for problem in problems)


def test_a_study_of_another_case_or_a_missing_rows_file_is_refused(tmp_path: Path) -> None:
    path = _study_notebook(tmp_path)
    (tmp_path / "rows.parquet").rename(tmp_path / "moved.parquet")
    with pytest.raises(InputError, match="is not there"):
        export_file(path, execute=False)
    (tmp_path / "moved.parquet").rename(tmp_path / "rows.parquet")
    nb = nbformat.read(str(path), as_version=4)
    case = nb.cells[0].outputs[0]["data"][CASE_MIME_TYPE]
    case["load_cases"][0]["torques"][0]["torque"] = 2100
    nbformat.write(nb, str(path))
    with pytest.raises(InputError, match="another case"):
        export_file(path, execute=False)
    assert STUDY_MIME_TYPE in nb.cells[0].outputs[1]["data"]


def test_study_rows_on_a_record_without_a_study_is_bad_input(tmp_path: Path) -> None:
    from workbench.record.demo import demo_notebook

    path = tmp_path / "plain.ipynb"
    nbformat.write(demo_notebook(executed=True), str(path))
    text, _ = export_file(path, execute=False)
    record = tmp_path / "plain.html"
    record.write_text(text, "utf-8", newline="")
    assert 'id="study"' not in text
    assert cli.main(["verify", str(record), "--study-rows", str(tmp_path / "x.parquet")]) == 2


def test_a_signed_summary_that_is_not_the_rows_files_fails(
    signed: tuple[Path, Path, Path],
) -> None:
    """Checked below the signature: a summary number other than the rows file's is named, and a
    section that is not the one drawn from the signed study is named."""
    from workbench.record.computation import compute
    from workbench.record.study import check_study, verify_study

    record, public, rows = signed
    payload = verify_record(record, public).payload
    assert payload is not None
    study = json.loads(json.dumps(payload["study"]))
    study["summary"]["percentiles"]["governing_utilisation"]["p50"] *= 1.001
    _, problems = check_study(study, payload["case"], rows)
    assert problems == ["the study's summary differs from the one made again from its rows file"]
    _, problems = verify_study(payload["study"], compute(payload["case"]), "", None)
    assert "the study section written in the record differs from the signed study" in problems
