"""Allow ``python -m faultwise``."""

from faultwise.cli import main

raise SystemExit(main())
