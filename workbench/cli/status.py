"""Exit statuses of the ``workbench`` command (the README's table)."""

#: Success; every check passes.
EXIT_OK = 0
#: A check fails, nothing passes (``size``), or a record does not verify (``verify``).
EXIT_FAILED_CHECK = 1
#: Bad input: one line on stderr names the field.
EXIT_BAD_INPUT = 2
#: An unexpected internal error (a defect of workbench): one line, "please report".
EXIT_INTERNAL_ERROR = 3
#: A study stopped by Ctrl-C (128 + SIGINT, as shells report it); its rows so far are kept.
EXIT_INTERRUPTED = 130
