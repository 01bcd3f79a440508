"""How the origin tag of a number or rule is shown on screen (reports, widgets, tables).

Data keep their precise tags (``"from-memory"`` marks a recalled value for the developers and
the tests); screens never say "from memory": such a value is shown as a typical value to check
against the part's data sheet.
"""

from __future__ import annotations

import re

__all__ = ["origin_text", "TYPICAL"]

#: What a screen says for a recalled, unconfirmed value.
TYPICAL = "typical value — check your part's data sheet"

_RECALLED = re.compile(r"(?i)\bfrom[- ]memory\b|\bmemory of the standard(?:'s figure)?\b")


def origin_text(tag: object) -> str:
    """Screen text for an origin tag or a note: "from-memory"/"from memory" → :data:`TYPICAL`.

    Examples
    --------
    >>> origin_text("from-memory")
    "typical value — check your part's data sheet"
    >>> origin_text("standard: IEEE Std 1789-2015")
    'standard: IEEE Std 1789-2015'
    """
    text = "" if tag is None else str(tag)
    return _RECALLED.sub(TYPICAL, text)
