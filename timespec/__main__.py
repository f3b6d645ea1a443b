"""``python -m timespec`` runs the command-line tool."""

from timespec.cli import main

raise SystemExit(main())
