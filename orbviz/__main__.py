"""``python -m orbviz`` runs the command line."""

from orbviz.cli import run

run()
