"""Finding the headless browser the page tests run in (Debian's chromium in CI)."""

import os
import shutil

import pytest

__all__ = ["browser_or_skip", "chromium"]


def chromium():
    """Path of the chromium executable, or None when it is not installed."""
    for name in ("chromium", "chromium-browser"):
        path = shutil.which(name)
        if path:
            return path
    return "/usr/bin/chromium" if os.path.exists("/usr/bin/chromium") else None


def browser_or_skip():
    """Chromium's path; skip the test without it, or fail it in CI (where .ci/run installs it)."""
    exe = chromium()
    if exe is None:
        if os.environ.get("CI", "").lower() in ("1", "true", "yes"):
            pytest.fail(
                "Chromium is not installed, and CI is set: .ci/run must install Debian's chromium package"
            )
        pytest.skip(
            "Chromium is not installed (apt-get install chromium); the browser test runs in CI"
        )
    return exe
