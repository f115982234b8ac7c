"""``python -m minutes``: the same as the ``minutes`` command."""

from .cli import main

main()
