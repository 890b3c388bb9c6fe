"""Run the command line as ``python -m pourbaix.cli``."""

import sys

from pourbaix.cli.commands import main

sys.exit(main())
