"""Argument types shared by the command groups: numbers checked as argparse reads them."""

import argparse
import math

__all__ = ["finite_number", "positive_number"]


def finite_number(text):
    """Read a finite number from an option value.

    Parameters
    ----------
    text : str
        The option's value as typed.

    Returns
    -------
    float
        The number.

    Raises
    ------
    argparse.ArgumentTypeError
        If it is not a number or not finite (argparse names the option and exits with 2).
    """
    try:
        v = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"not a number: {text!r}") from None
    if not math.isfinite(v):
        raise argparse.ArgumentTypeError(f"must be finite, got {text!r}")
    return v


def positive_number(text):
    """Read a finite number greater than zero from an option value.

    Parameters
    ----------
    text : str
        The option's value as typed.

    Returns
    -------
    float
        The number.

    Raises
    ------
    argparse.ArgumentTypeError
        If it is not a finite number greater than zero.
    """
    v = finite_number(text)
    if v <= 0:
        raise argparse.ArgumentTypeError(f"must be a positive number, got {text!r}")
    return v
