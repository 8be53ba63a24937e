"""``python -m heatload.cli``: the ``heatload`` command."""

import sys

from heatload.cli import main

if __name__ == "__main__":    # not when a doctest collector imports the module
    sys.exit(main())
