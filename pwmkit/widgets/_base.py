"""Shared machinery of the widget panels: safe callbacks, inline messages, debouncing, formatting.

Nothing here computes physics; it only guards and schedules calls into the lower layers.
"""

from __future__ import annotations

import asyncio
import functools
import html
import logging
import math
import sys
from collections.abc import Callable
from typing import Any

import ipywidgets as w

from ..errors import DesignError

__all__ = ["Panel", "Debouncer", "Coalescer", "PLOT_DELAY", "fmt", "fmt_pct", "num", "esc", "safe_callback", "GENERIC_MESSAGE", "log"]

log = logging.getLogger("pwmkit.widgets")

#: Shown when something other than a DesignError goes wrong inside a callback (details go to the log).
GENERIC_MESSAGE = ("something went wrong while updating this view; the last good design is kept "
                   "(details in the log, logger 'pwmkit.widgets').")

DASH = "—"


def fmt(x: Any, unit: str = "", digits: int = 4) -> str:
    """Engineering text of a number, or an em dash for None/non-finite (never "nan")."""
    from ..values import format_value

    try:
        v = float(x)
    except (TypeError, ValueError):
        return DASH
    if not math.isfinite(v):
        return DASH
    try:
        return format_value(v, unit, digits)
    except DesignError:
        return DASH


def fmt_pct(x: Any, digits: int = 4, *, signed: bool = False) -> str:
    """A fraction as percent text (0.25 → "25 %"), or an em dash for None/non-finite."""
    try:
        v = 100.0 * float(x)
    except (TypeError, ValueError):
        return DASH
    if not math.isfinite(v):
        return DASH
    text = f"{v:+.{digits}g}" if signed else f"{v:.{digits}g}"
    return f"{text} %"


def num(x: Any, spec: str = ".4g", suffix: str = "") -> str:
    """``format(x, spec) + suffix``, or an em dash for None/non-finite (never "nan")."""
    try:
        v = float(x)
    except (TypeError, ValueError):
        return DASH
    if not math.isfinite(v):
        return DASH
    return f"{v:{spec}}{suffix}"


def esc(text: Any) -> str:
    """HTML-escaped text."""
    return html.escape(str(text), quote=True)


class Debouncer:
    """Run a function once after a burst of requests has settled (trailing edge).

    When an asyncio event loop runs in the calling thread (an IPython kernel: cells and widget
    messages both run on it), the call is scheduled ``delay`` seconds after the last request and
    earlier requests are dropped. Without a running loop (plain Python, unit tests) the call runs
    immediately, so behaviour stays deterministic. :meth:`flush` runs a pending call now.

    Parameters
    ----------
    fn : callable
        Called with no arguments; it must not raise (wrap it with :func:`safe_callback`).
    delay : float
        Quiet time before the call [s]; 0 runs immediately.
    """

    def __init__(self, fn: Callable[[], None], delay: float = 0.25) -> None:
        self._fn = fn
        self.delay = float(delay)
        self._handle: asyncio.TimerHandle | None = None
        self.pending = False

    def __call__(self) -> None:
        self.pending = True
        if self._handle is not None:
            self._handle.cancel()
            self._handle = None
        loop = _running_loop()
        if loop is None or self.delay <= 0:
            self.flush()
            return
        self._handle = loop.call_later(self.delay, self.flush)

    def flush(self) -> None:
        """Run the pending call now (no-op when nothing is pending)."""
        if self._handle is not None:
            self._handle.cancel()
            self._handle = None
        if self.pending:
            self.pending = False
            self._fn()

    def cancel(self) -> None:
        """Drop a pending call."""
        if self._handle is not None:
            self._handle.cancel()
            self._handle = None
        self.pending = False


class Coalescer(Debouncer):
    """Run a function ``delay`` seconds after the first request of a burst; later requests join it.

    Unlike :class:`Debouncer` the call is not pushed back by further requests, so a view redrawn
    through it follows a dragged slider at most ``delay`` behind, drawing the latest state once per
    window. Without a running event loop (plain Python, unit tests) the call runs immediately.
    :meth:`flush` runs a pending call now.

    Parameters
    ----------
    fn : callable
        Called with no arguments; it must not raise (wrap it with :func:`safe_callback`).
    delay : float
        Time from the first request to the call [s]; 0 runs immediately.
    """

    def __call__(self) -> None:
        if self._handle is not None:
            return  # joins the call already scheduled, which draws the latest state
        super().__call__()


#: Delay of plot redraws after an edit made on the page [s]: the readout's message reaches the page
#: first and is drawn before the browser spends its time on the plots; a dragged slider's plots are
#: drawn once per window, with the latest design. Edits made by code in a cell draw at once.
PLOT_DELAY = 0.1


def _handling_page_message() -> bool:
    """True while an IPython kernel handles a widget message from the page (not a cell's code)."""
    kernelbase = sys.modules.get("ipykernel.kernelbase")  # never imported here: only a running kernel has it
    if kernelbase is None or not kernelbase.Kernel.initialized():
        return False
    try:
        parent = kernelbase.Kernel.instance().get_parent("shell")
    except Exception:  # an ipykernel without get_parent: draw at once
        return False
    return isinstance(parent, dict) and parent.get("header", {}).get("msg_type") == "comm_msg"


def _running_loop() -> asyncio.AbstractEventLoop | None:
    try:
        return asyncio.get_running_loop()
    except RuntimeError:
        return None


def safe_callback(method: Callable[..., Any]) -> Callable[..., Any]:
    """Decorate a panel method used as a widget callback: it never raises.

    A :class:`~pwmkit.errors.DesignError` becomes the panel's inline message; anything else is
    logged with its traceback and replaced by :data:`GENERIC_MESSAGE`.
    """

    @functools.wraps(method)
    def wrapper(self: Panel, *args: Any, **kwargs: Any) -> Any:
        try:
            return method(self, *args, **kwargs)
        except DesignError as exc:
            self.show_message(str(exc))
        except Exception:  # a callback must never raise into the front end
            log.exception("pwmkit widget callback %s failed", method.__qualname__)
            self.show_message(GENERIC_MESSAGE)
        return None

    return wrapper


class Panel(w.VBox):
    """Base of every panel: a vertical box with a title line and an inline message area.

    Subclasses put their controls and views in ``self.body`` (a list handed to
    :meth:`set_body`) and call :meth:`show_message` / :meth:`clear_message`.
    The message is an HTML widget with CSS class ``pwmkit-msg``; it is hidden when empty.
    """

    title: str = ""
    css_name: str = "panel"
    #: Redraw this long after an edit in a running kernel [s] (0: at once); plot panels use
    #: :data:`PLOT_DELAY`.
    redraw_delay: float = 0.0
    #: First words of an error message (input panels say that the edit was not applied).
    message_lead: str = "Problem"

    def __init__(self, **kwargs: Any) -> None:
        self.message = w.HTML(value="", layout=w.Layout(display="none", margin="2px 0"))
        self.message.add_class("pwmkit-msg")
        self._heading = w.HTML(value=f"<div class='pwmkit-heading'>{esc(self.title)}</div>" if self.title else "")
        super().__init__(**kwargs)
        self.add_class("pwmkit-panel")
        self.add_class(f"pwmkit-{self.css_name}")
        self.active = True
        self._stale = False
        self._redraw = Coalescer(self._refresh_latest, self.redraw_delay) if self.redraw_delay > 0 else None

    # -- following the session (lazy while hidden) ----------------------------------------------
    def refresh(self, evaluation: Any) -> None:  # pragma: no cover - every panel overrides it
        """Show ``evaluation`` (the session's current one)."""

    def follow(self, evaluation: Any) -> None:
        """Session listener: refresh when active (at once, or after :attr:`redraw_delay` in a running
        kernel, with the session's latest evaluation), else remember to refresh on activation."""
        if not self.active:
            self._stale = True
        elif self._redraw is not None and _handling_page_message():
            self._redraw()
        else:  # code in a cell (or plain Python) reads the plots right after its edit: draw now
            self.refresh(evaluation)

    def _refresh_latest(self) -> None:
        session = getattr(self, "session", None)
        if session is not None:
            self.refresh(session.evaluation)

    def flush_redraw(self) -> None:
        """Run a delayed redraw now (no-op when none is pending)."""
        if self._redraw is not None:
            self._redraw.flush()

    def set_active(self, active: bool) -> None:
        """Mark the panel visible (refreshes it if the design changed while hidden) or hidden."""
        self.active = bool(active)
        if self.active and self._stale:
            self._stale = False
            session = getattr(self, "session", None)
            if session is not None:
                self.refresh(session.evaluation)

    def set_body(self, body: list[w.Widget]) -> None:
        head = [self._heading] if self.title else []
        self.children = tuple(head + [self.message] + list(body))

    def show_message(self, text: str, kind: str = "error") -> None:
        """Show ``text`` inline in this panel (``kind``: "error" or "note")."""
        colour = "#8a2d00" if kind == "error" else "#3d4652"
        background = "#fff3e8" if kind == "error" else "#eef3f8"
        symbol = "✖" if kind == "error" else "ℹ"
        self.message.value = (
            f"<div class='pwmkit-msg-{kind}' role='alert' style='color:{colour};background:{background};"
            f"border-left:4px solid {colour};padding:4px 8px;font-size:12px;white-space:normal'>"
            f"<b>{symbol} {esc(self.message_lead) if kind == 'error' else 'Note'}:</b> {esc(text)}</div>"
        )
        self.message.layout.display = None

    def clear_message(self) -> None:
        """Hide the inline message."""
        if self.message.value:
            self.message.value = ""
            self.message.layout.display = "none"

    def __repr__(self) -> str:
        session = getattr(self, "session", None)
        name = session.design.name if session is not None else "?"
        return f"{type(self).__name__}({name!r}; interactive in Jupyter)"

    @property
    def message_text(self) -> str:
        """The message as plain text ("" when none), for tests and notebooks."""
        import re

        return html.unescape(re.sub(r"<[^>]+>", "", self.message.value)).strip()
