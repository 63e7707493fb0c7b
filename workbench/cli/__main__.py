"""``python -m workbench.cli``: the ``workbench`` command."""

from workbench.cli import main

raise SystemExit(main())
