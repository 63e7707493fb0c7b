"""The README's study-plan reference: ``python -m workbench.study.reference --readme README.md``.

Without ``--readme`` it prints the reference (:func:`~workbench.study.plan.plan_reference`).
"""

from __future__ import annotations

import sys
from pathlib import Path

from workbench.case.reference import replace_section
from workbench.study.plan import BEGIN, END, plan_reference


def main(argv: list[str] | None = None) -> int:
    """Print the plan reference, or rewrite it in a README (``--readme PATH``)."""
    arguments = argv if argv is not None else sys.argv[1:]
    if arguments[:1] != ["--readme"] or len(arguments) != 2:
        sys.stdout.write(plan_reference() + "\n")
        return 0
    readme = Path(arguments[1])
    readme.write_text(
        replace_section(readme.read_text("utf-8"), plan_reference(), BEGIN, END), "utf-8"
    )
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
