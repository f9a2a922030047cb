"""`python -m service` is the `traptally` command."""

from service.cli import main

raise SystemExit(main())
