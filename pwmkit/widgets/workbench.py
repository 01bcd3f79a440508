"""The dashboard's tools for your own design: its file, requirements, part search and conditions.

:func:`open_source` turns what :func:`pwmkit.widgets.dashboard` was given — a design file path, a
:class:`~pwmkit.design.Design` or a session — into a session and the file state. :func:`attach`
adds the file bar, the requirement band under the timing readout and the Requirements, Parts,
Candidates and Supply-and-ambient tabs to a built dashboard.
"""

from __future__ import annotations

import os
from typing import Any

from ..design import Design
from ..errors import DesignError
from .designfile_bar import DesignFileState, FileBar
from .session import DesignSession, as_session

__all__ = ["open_source", "attach_pages", "TAB_TITLES"]

#: Titles of the tabs :func:`attach_pages` adds.
TAB_TITLES = ("Requirements", "Parts", "Candidates", "Supply & ambient")


def open_source(source: Any) -> tuple[DesignSession, DesignFileState]:
    """(session, file state) for a design file path, a Design or a DesignSession."""
    if isinstance(source, (str, os.PathLike)):
        state, design = DesignFileState.load(source)
        return DesignSession(design), state
    if isinstance(source, (Design, DesignSession)):
        session = as_session(source)
        return session, DesignFileState(None, session.design)
    raise DesignError(f"design: expected a design file path, a pwmkit.design.Design or a DesignSession, got "
                      f"{type(source).__name__}")


def attach_pages(session: DesignSession, state: DesignFileState) -> tuple[FileBar, Any, list[tuple[str, Any]]]:
    """The file bar, the requirement band and the new tab pages for one session.

    The pages come as (title, factory) pairs: each factory builds its panel when called (the
    dashboard calls it when the page is first shown, see :class:`pwmkit.widgets.tabs.LazyPage`).
    """
    from .candidates import CandidatesPanel
    from .conditions import ConditionsPanel
    from .requirements import PartsPanel, RequirementBand, RequirementsPanel

    bar = FileBar(session, state)
    band = RequirementBand(session)
    pages: list[tuple[str, Any]] = [
        (TAB_TITLES[0], lambda: RequirementsPanel(session)), (TAB_TITLES[1], lambda: PartsPanel(session)),
        (TAB_TITLES[2], lambda: CandidatesPanel(session)), (TAB_TITLES[3], lambda: ConditionsPanel(session)),
    ]
    return bar, band, pages
