"""Run the command line as ``python -m pourbaix.cli``."""

from pourbaix.cli.process import run

run()
