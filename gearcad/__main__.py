"""``python -m gearcad``: the same as the ``gearcad`` command."""

import sys

from .cli import main

sys.exit(main())
