"""``python -m mechid`` runs the command line."""

from mechid.cli import app

app(prog_name="mechid")
