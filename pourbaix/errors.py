"""The project's error hierarchy: every bad-input error derives from one class."""

__all__ = [
    "PourbaixError",
    "FormulaError",
    "DataError",
    "DataFileError",
    "UnknownSpeciesError",
    "ConditionsError",
    "OptionError",
    "ExportError",
    "ReactionError",
]


class PourbaixError(Exception):
    """Root of every error this package raises for bad input or bad data.

    The command line catches this class, prints its message on one line and
    exits with status 2.
    """


class FormulaError(PourbaixError, ValueError):
    """A species formula could not be parsed; the message shows the position."""


class DataError(PourbaixError, ValueError):
    """A species table or data set is invalid or incomplete."""


class DataFileError(DataError):
    """One or more rows of a species or sources file are invalid.

    Attributes
    ----------
    problems : list of tuple
        ``(path, line, column, message)`` for every fault found in the file,
        so a user sees all of them at once.
    """

    #: Rows listed in the message; the rest are counted (all stay in ``problems``).
    MAX_ROWS_SHOWN = 20
    #: Longest message text per problem before it is shortened [characters].
    MAX_MESSAGE = 300

    def __init__(self, problems):
        self.problems = list(problems)
        rows_shown = []
        lines = []
        hidden = 0
        for p, ln, col, msg in self.problems:
            row = (p, ln)
            if row not in rows_shown:
                if len(rows_shown) >= self.MAX_ROWS_SHOWN:
                    hidden += 1
                    continue
                rows_shown.append(row)
            msg = _shorten(str(msg), self.MAX_MESSAGE)
            lines.append(f"{p}:{ln}:{col}: {msg}" if col else f"{p}:{ln}: {msg}")
        if hidden:
            rows_hidden = len({(p, ln) for p, ln, _, _ in self.problems}) - len(rows_shown)
            lines.append(
                f"... and {hidden} more problem(s) on {rows_hidden} more line(s) not listed; "
                "fix the ones above and run again"
            )
        super().__init__("\n".join(lines))


def _shorten(text, limit):
    """``text`` cut to about ``limit`` characters, saying how long it was."""
    if len(text) <= limit:
        return text
    return f"{text[: limit - 40]}... ({len(text)} characters in all)"


class UnknownSpeciesError(DataError, KeyError):
    """A species named by the user is not in the tables."""

    def __str__(self):  # KeyError would quote the message
        return str(self.args[0]) if self.args else ""


class ConditionsError(PourbaixError, ValueError):
    """Conditions (temperature, activity, ionic strength, window...) are out of range."""


class OptionError(PourbaixError, ValueError):
    """A named choice (reference electrode, model, data set...) is not known."""


class ExportError(PourbaixError, OSError):
    """An output file could not be written; nothing partial is left behind."""


class ReactionError(PourbaixError, ValueError):
    """A typed half-reaction or cell is malformed or does not balance; the message says where."""
