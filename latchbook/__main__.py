"""Run the ``latchbook`` command line: ``python -m latchbook ARGS``."""

import sys

from reviewer.cli import main

if __name__ == "__main__":
    sys.exit(main())
