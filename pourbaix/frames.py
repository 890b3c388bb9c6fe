"""Tables (lists of dicts) as pandas DataFrames; pandas is an optional extra imported only here, when used."""

from __future__ import annotations

from pourbaix.errors import OptionError

__all__ = ["Tabular", "as_frame"]


def as_frame(rows):
    """A table (list of dicts, one per row) as a pandas DataFrame.

    Parameters
    ----------
    rows : list of dict
        Rows with the same keys.

    Returns
    -------
    pandas.DataFrame

    Raises
    ------
    OptionError
        When pandas is not installed (it is an optional extra: ``pip install "pourbaix[scale]"``).

    Examples
    --------
    >>> as_frame([{"ph": 7.0, "state": "corrosion"}]).shape
    (1, 2)
    """
    try:
        import pandas as pd
    except ImportError:
        raise OptionError(
            "tables as DataFrames need pandas, an optional extra: pip install pandas "
            '(or pip install "pourbaix[scale]")'
        ) from None
    return pd.DataFrame(list(rows))


class Tabular:
    """What a result with a ``rows()`` method gets for notebooks and pandas.

    ``to_frame()`` gives its rows as a DataFrame, and a notebook shows the
    result as that table (or as plain text when pandas is not installed).
    """

    __slots__ = ()

    def to_frame(self):
        """The result's rows (see ``rows()``) as a pandas DataFrame.

        Returns
        -------
        pandas.DataFrame
            One row per dict of ``rows()``.

        Raises
        ------
        OptionError
            When pandas is not installed (an optional extra).
        """
        return as_frame(self.rows())

    def _repr_html_(self):
        try:
            return self.to_frame()._repr_html_()
        except OptionError:
            return None  # no pandas: the plain text form is shown
