"""``python -m geomgen.cli``."""

from . import main

main()
