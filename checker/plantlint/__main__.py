"""``python -m plantlint`` runs the plantlint command line."""

from plantlint.cli import run

run()
