"""``python -m sitegen`` runs the command line."""

from .cli import run

run()
