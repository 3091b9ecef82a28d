"""``python -m fillcheck``: the same command line as the ``fillcheck`` entry point."""

from fillcheck.cli import app

app(prog_name="fillcheck")
