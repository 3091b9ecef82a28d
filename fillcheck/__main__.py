"""``python -m fillcheck``: the same command line as the ``fillcheck`` entry point."""

from fillcheck.cli import main

main()
