"""File actions of the dashboard: Open, Save, Save as, Revert and the "unsaved changes" mark.

:class:`DesignFileState` remembers which design file the session came from, the bytes it had on
disk (their SHA-256) and the design as loaded or last saved. :class:`FileBar` is the row of
buttons. Saving is atomic (:func:`pwmkit.record.save_design`: temporary file, fsync, one
``os.replace``) and refuses, with a message, when the file on disk changed since it was loaded
or saved here — so edits made elsewhere are never overwritten unseen.
"""

from __future__ import annotations

import hashlib
import os
from pathlib import Path

import ipywidgets as w

from ..design import Design
from ..errors import DesignError
from ._base import Panel, esc, safe_callback
from .session import DesignSession

__all__ = ["DesignFileState", "FileBar"]


def _digest(path: Path) -> str | None:
    try:
        return hashlib.sha256(path.read_bytes()).hexdigest()
    except FileNotFoundError:
        return None


class DesignFileState:
    """The design file behind a session (or none yet).

    Attributes
    ----------
    path : pathlib.Path or None
    saved : Design or None — the design as loaded or last saved
    digest : SHA-256 of the file's bytes at that moment (None when there is no file)
    """

    def __init__(self, path: str | os.PathLike[str] | None = None, saved: Design | None = None) -> None:
        self.path = None if path is None else Path(path)
        self.saved = saved
        self.digest = None if self.path is None else _digest(self.path)
        #: comment lines at the end of the file (e.g. the other part sets `pwmkit new` found), kept on save
        self.trailer = ""

    @classmethod
    def load(cls, path: str | os.PathLike[str]) -> tuple[DesignFileState, Design]:
        """Read a design file; returns the state and the design (DesignError when unreadable)."""
        from ..record.designfile import load_design, trailing_comments

        p = Path(path)
        data_digest = _digest(p)
        design = load_design(p)
        state = cls(p, design)
        state.digest = data_digest
        try:
            state.trailer = trailing_comments(p.read_text(encoding="utf-8"))
        except (OSError, UnicodeDecodeError):  # it was just read as a design: keep going without the comments
            state.trailer = ""
        return state, design

    def dirty(self, design: Design) -> bool:
        """True when ``design`` differs from the one loaded or last saved."""
        return self.saved is None or design != self.saved

    def changed_on_disk(self) -> bool:
        """True when the file's bytes are no longer those loaded or saved here."""
        return self.path is not None and _digest(self.path) != self.digest

    def save(self, design: Design, path: str | os.PathLike[str] | None = None) -> Path:
        """Write ``design`` atomically to ``path`` (default: the current file).

        Raises
        ------
        DesignError
            No file name; the current file changed on disk since it was loaded or saved; ``path``
            names another file that already exists.
        """
        from ..record.designfile import save_design

        target = self.path if path is None else Path(path)
        if target is None:
            raise DesignError("file: no design file yet; type a file name (e.g. my-driver.toml) and press Save as")
        if target.suffix.lower() != ".toml":
            raise DesignError(f"file: {str(target)!r} is not allowed; give a .toml file name")
        same = self.path is not None and target.resolve() == self.path.resolve()
        if same and self.changed_on_disk():
            raise DesignError(f"{target}: changed on disk since it was loaded or saved here — not saved. Press "
                              "Revert to load the file as it is now, or Save as another name")
        if not same and target.exists():
            raise DesignError(f"{target}: already exists — not saved; choose another name (or Open it)")
        save_design(design, target, force=same, trailer=self.trailer)
        self.path, self.saved, self.digest = target, design, _digest(target)
        return target


class FileBar(Panel):
    """Open, Save, Save as and Revert for the session's design file, with an "unsaved changes" mark.

    Attributes
    ----------
    state : DesignFileState
    path : ipywidgets.Text — the file name used by Open and Save as
    open, save, save_as, revert : ipywidgets.Button
    mark : ipywidgets.HTML (CSS class ``pwmkit-dirty`` when there are unsaved changes)
    """

    css_name = "filebar"
    message_lead = "File"

    def __init__(self, session: DesignSession, state: DesignFileState | None = None) -> None:
        super().__init__()
        self.session = session
        self.state = state or DesignFileState()
        self.path = w.Text(value="" if self.state.path is None else str(self.state.path), placeholder="my-driver.toml",
                           description="design file", layout=w.Layout(width="420px"),
                           style={"description_width": "80px"})
        self.path.add_class("pwmkit-file-path")
        self.open = w.Button(description="Open", icon="folder-open", layout=w.Layout(width="80px"))
        self.save = w.Button(description="Save", icon="save", layout=w.Layout(width="80px"))
        self.save_as = w.Button(description="Save as", layout=w.Layout(width="80px"))
        self.revert = w.Button(description="Revert", icon="undo", layout=w.Layout(width="84px"))
        for b, css in ((self.open, "open"), (self.save, "save"), (self.save_as, "save-as"), (self.revert, "revert")):
            b.add_class(f"pwmkit-file-{css}")
        self.mark = w.HTML()
        self.mark.add_class("pwmkit-file-mark")
        self._discard_armed = False
        self.open.on_click(lambda _b: self.do_open())
        self.save.on_click(lambda _b: self.do_save())
        self.save_as.on_click(lambda _b: self.do_save_as())
        self.revert.on_click(lambda _b: self.do_revert())
        self.set_body([w.HBox([self.path, self.open, self.save, self.save_as, self.revert, self.mark],
                              layout=w.Layout(align_items="center", flex_flow="row wrap"))])
        session.subscribe(lambda _ev: self.refresh_mark())
        self.refresh_mark()

    @property
    def dirty(self) -> bool:
        """Unsaved changes in the session."""
        return self.state.dirty(self.session.design)

    def refresh_mark(self) -> None:
        try:
            if self.dirty:
                self.mark.value = ("<span class='pwmkit-dirty' style='color:#8a2d00;font-weight:600'>● unsaved "
                                   "changes</span>")
            else:
                where = esc(self.state.path.name) if self.state.path is not None else ""
                self.mark.value = f"<span class='pwmkit-saved' style='color:#2f6b4f'>✓ saved {where}</span>"
        except Exception:  # a display helper must never raise into a callback
            from ._base import log

            log.exception("pwmkit: file mark failed")

    def _propose(self, design: Design) -> bool:
        verdict = self.session.propose(design)
        if verdict is not None:
            self.show_message(verdict)
            return False
        return True

    @safe_callback
    def do_open(self, path: str | None = None) -> None:
        """Load the file named in the path field (or ``path``); unsaved edits need a second press."""
        target = (path or self.path.value).strip()
        if not target:
            raise DesignError("file: type the name of a design file to open")
        if self.dirty and not self._discard_armed:
            self._discard_armed = True
            self.show_message("unsaved changes — press Open again to discard them and open the file, or Save first",
                              kind="note")
            return
        self._discard_armed = False
        state, design = DesignFileState.load(target)
        previous = self.state
        self.state = state
        if not self._propose(design):
            self.state = previous
            return
        self.path.value = str(state.path)
        self.clear_message()
        self.refresh_mark()

    @safe_callback
    def do_save(self) -> None:
        """Save to the current file (refuses when it changed on disk)."""
        self._discard_armed = False
        target = self.state.save(self.session.design)
        self.path.value = str(target)
        self.show_message(f"saved {target}", kind="note")
        self.refresh_mark()

    @safe_callback
    def do_save_as(self, path: str | None = None) -> None:
        """Save to the file named in the path field (or ``path``); an existing other file is refused."""
        self._discard_armed = False
        target = (path or self.path.value).strip()
        if not target:
            raise DesignError("file: type a new file name (e.g. my-driver.toml) for Save as")
        saved = self.state.save(self.session.design, target)
        self.path.value = str(saved)
        self.show_message(f"saved {saved}", kind="note")
        self.refresh_mark()

    @safe_callback
    def do_revert(self) -> None:
        """Go back to the file as it is on disk now (or the design last saved when there is no file)."""
        self._discard_armed = False
        if self.state.path is None:
            if self.state.saved is not None and self._propose(self.state.saved):
                self.clear_message()
            return
        state, design = DesignFileState.load(self.state.path)
        if self._propose(design):
            self.state = state
            self.clear_message()
        self.refresh_mark()
