"""``python -m desktop``: see :mod:`desktop.app`."""

from .app import main

raise SystemExit(main())
