"""Property-based fuzzing of the command line, ``verify`` and the panel (hypothesis)."""
