"""``python -m plumbrod``: the same as the ``plumbrod`` command."""

import sys

from plumbrod.cli.main import main

sys.exit(main())
