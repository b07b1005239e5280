"""``python -m sdofreport.cli``: the same command line as the ``sdofreport`` command."""

import sys

from sdofreport.cli import main

if __name__ == "__main__":
    sys.exit(main())  # as the console script that pip writes for ``sdofreport`` does
