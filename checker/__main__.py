"""``python -m checker`` runs the plantlint command line."""

import sys

from .cli import main

sys.exit(main())
