"""``python -m cruiseplan``: the command line."""

import sys

from cruiseplan.cli import main

sys.exit(main())
