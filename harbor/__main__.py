"""``python -m harbor`` runs the command line."""

from harbor.cli import main

raise SystemExit(main())
