"""The command line: ``pourbaix COMMAND ...`` (see :func:`pourbaix.cli.commands.main`)."""

from pourbaix.cli.commands import main

__all__ = ["main"]
