"""The fields of a calculation's title block: their keys, in the order shown, and their labels.

One table for the panel's title-block editor and the record's cover. The title block travels in
the notebook's metadata ``workbench.title_block`` or in an output of type
:data:`workbench.case.TITLE_BLOCK_MIME_TYPE`; every value is text.
"""

from __future__ import annotations

__all__ = ["HISTORY_FIELDS", "TEXT_FIELDS", "TITLE_FIELDS"]

#: Title-block fields, in the order the record shows them, with their labels.
TITLE_FIELDS: dict[str, str] = {
    "project": "Project",
    "calculation_number": "Calculation number",
    "revision": "Revision",
    "subject": "Subject",
    "prepared_by": "Prepared by",
    "date_prepared": "Date prepared",
    "checked_by": "Checked by",
    "date_checked": "Date checked",
    "approved_by": "Approved by",
    "date_approved": "Date approved",
}

#: Free-text fields of the title block, shown as sections of their own.
TEXT_FIELDS = ("purpose", "scope")

#: The keys of one entry of ``revision_history``.
HISTORY_FIELDS = ("revision", "date", "by", "description")
