"""Test settings shared by the suite: hypothesis runs the same way from any fresh clone.

Property tests use the ``ci`` profile unless ``HYPOTHESIS_PROFILE`` names another:
examples are derived from each test (``derandomize``) and none are stored or replayed
(``database=None``), so a run never depends on what an earlier run saved. The
``nightly`` profile draws fresh random examples; with ``POURBAIX_PROPERTY_SCALE``
it multiplies every test's example budget (see DEVELOPERS.md).
"""

import os

from hypothesis import HealthCheck, settings

settings.register_profile(
    "ci",
    derandomize=True,
    database=None,
    print_blob=True,
    suppress_health_check=[HealthCheck.too_slow],
)
settings.register_profile(
    "nightly",
    derandomize=False,
    database=None,
    print_blob=True,
    suppress_health_check=[HealthCheck.too_slow],
)
settings.load_profile(os.environ.get("HYPOTHESIS_PROFILE", "ci"))
