"""``python -m tiltyard`` runs the command line."""

from tiltyard.app.cli import main

raise SystemExit(main())
