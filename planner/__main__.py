"""``python -m planner`` runs the ``changeover`` command line."""

from planner.cli import main

main()
