"""Argument types shared by the command groups: numbers checked as argparse reads them."""

import argparse
import math

__all__ = ["finite_number", "positive_number", "named_positive", "ratio_amounts"]


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


def named_positive(example, quantity, *, last_equals=False):
    """An option type reading ``NAME=VALUE`` with VALUE a finite number greater than zero.

    Parameters
    ----------
    example : str
        An example shown when the text has no ``=``, e.g. ``"S=1e-3"``.
    quantity : str
        What VALUE is, for the messages (e.g. ``"activity"``, ``"total [mol/kg]"``).
    last_equals : bool
        Split at the last ``=`` (names that may hold one) instead of the first.

    Returns
    -------
    callable
        ``text -> (name, value)`` raising :class:`argparse.ArgumentTypeError`
        (argparse names the option and exits with 2).
    """

    def read(text):
        if "=" not in text:
            raise argparse.ArgumentTypeError(f"expected NAME=VALUE such as {example}, got {text!r}")
        name, _, value = text.rpartition("=") if last_equals else text.partition("=")
        name = name.strip()
        if not name:
            raise argparse.ArgumentTypeError(f"no name before '=' in {text!r} (e.g. {example})")
        try:
            v = float(value)
        except ValueError:
            raise argparse.ArgumentTypeError(
                f"{name!r}: {quantity} {value!r} is not a number"
            ) from None
        if not (math.isfinite(v) and v > 0):
            raise argparse.ArgumentTypeError(f"{name!r}: {quantity} must be > 0, got {value!r}")
        return name, v

    read.__name__ = f"NAME={quantity}"
    return read


def ratio_amounts(text):
    """Read amounts such as ``70:19:11`` (or ``70,19,11``), each finite and greater than zero.

    Parameters
    ----------
    text : str
        The option's value as typed.

    Returns
    -------
    tuple of float

    Raises
    ------
    argparse.ArgumentTypeError
        If an amount is not a number or not greater than zero.
    """
    parts = text.replace(",", ":").split(":")
    try:
        vals = tuple(float(p) for p in parts)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected amounts like 70:19:11, got {text!r}") from None
    if any(not (math.isfinite(v) and v > 0) for v in vals):
        raise argparse.ArgumentTypeError(f"ratio amounts must be > 0, got {text!r}")
    return vals
