"""``python -m plumbrod``: the same as the ``plumbrod`` command."""

import sys

from plumbrod.cli import main

sys.exit(main())
