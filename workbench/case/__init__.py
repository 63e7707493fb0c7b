"""The case file: its declaration, units, materials, reading and writing.

The lowest layer: it imports nothing else of workbench. Everything here is plain data and
validation; mechanics live in :mod:`workbench.solver`, verdicts in :mod:`workbench.design`.
"""

#: MIME type of the notebook output holding a case document (the panel writes it; the record
#: reads the last one).
CASE_MIME_TYPE = "application/vnd.workbench.case+json"

#: MIME type of the notebook output holding a title block (the panel's title-block editor writes
#: it, since a kernel cannot write notebook metadata; the record reads the last one).
TITLE_BLOCK_MIME_TYPE = "application/vnd.workbench.title-block+json"
