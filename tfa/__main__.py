"""``python -m tfa``: the same as the ``tfa`` command."""

import sys

from .cli import main

if __name__ == "__main__":
    sys.exit(main())
