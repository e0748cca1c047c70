"""``python -m sawplan`` runs the command line."""

from sawplan.cli.app import main

main()
