"""``python -m membrane`` runs the command line."""

from .cli import main

main()
