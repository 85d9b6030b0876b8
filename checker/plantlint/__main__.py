"""``python -m plantlint`` runs the plantlint command line."""

import sys

from plantlint.cli import main

sys.exit(main())
