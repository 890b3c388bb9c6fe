"""Self-contained HTML and Markdown reports of maps and analyses."""

from pourbaix.report.document import *  # noqa: F403
from pourbaix.report.document import __all__  # noqa: F401
