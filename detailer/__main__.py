"""``python -m detailer``: the slabwright command line."""

from detailer.cli import main

raise SystemExit(main())
