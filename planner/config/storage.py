"""Where the planner keeps user files, and how it writes them without loss.

Directories come from :mod:`platformdirs` (``user_config_dir``,
``user_cache_dir``, ``user_data_dir`` for the application ``splitplan``).
Setting ``SPLITPLAN_HOME`` puts all three under that one folder (used by the
tests and handy on a shared laptop).

Every write goes to a temporary file in the same directory, is flushed and
fsync'ed, then renamed over the target (:func:`atomic_write_bytes`), so a
crash or a full disk leaves either the old file or the new one, never half of
each.  A file that fails to parse is moved aside with :func:`quarantine`
(``name.corrupt-YYYYmmddTHHMMSS``) and reported, never silently overwritten.
"""

from __future__ import annotations

import os
import tempfile
from datetime import datetime, timezone
from pathlib import Path

from planner.errors import PlannerError

APP = "splitplan"
#: the observation log's file in the user data directory (see planner.config.logbook)
LOG_FILE_NAME = "observations.sqlite3"


def user_dir(kind: str) -> Path:
    """The user directory of ``kind`` ('config', 'cache' or 'data'), created on demand."""
    if kind not in ("config", "cache", "data"):
        raise ValueError(f"unknown directory kind {kind!r}")
    home = os.environ.get("SPLITPLAN_HOME")
    if home:
        path = Path(home) / kind
    else:
        import platformdirs

        path = Path(getattr(platformdirs, f"user_{kind}_dir")(APP, appauthor=False))
    try:
        path.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise PlannerError(f"cannot create the {kind} directory {path}: {exc.strerror}") from None
    return path


def log_path() -> Path:
    """Where the observation log lives (the file may not exist yet)."""
    return user_dir("data") / LOG_FILE_NAME


def atomic_write_bytes(path: str | os.PathLike, data: bytes) -> Path:
    """Write ``data`` to ``path`` atomically (temporary file, fsync, rename)."""
    path = Path(path)
    directory = path.parent if str(path.parent) else Path(".")
    try:
        directory.mkdir(parents=True, exist_ok=True)
        fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=directory)
    except OSError as exc:
        blocker = next((q for q in (directory, *directory.parents) if q.is_file()), None)
        why = f"{blocker} is a file, not a folder" if blocker is not None else (exc.strerror or exc)
        raise PlannerError(f"cannot write {path}: {why}") from None
    try:
        # mkstemp creates the file readable by its owner only; give the result
        # the mode an ordinary write would have (an existing file keeps its
        # mode), so a plan meant for the club is readable by the club.
        try:
            mode = path.stat().st_mode & 0o7777
        except OSError:
            umask = os.umask(0)
            os.umask(umask)
            mode = 0o666 & ~umask
        os.chmod(tmp, mode)
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
        os.replace(tmp, path)
    except OSError as exc:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        raise PlannerError(f"cannot write {path}: {exc.strerror or exc}") from None
    return path


def atomic_write_text(path: str | os.PathLike, text: str) -> Path:
    """Write UTF-8 text atomically; see :func:`atomic_write_bytes`."""
    return atomic_write_bytes(path, text.encode("utf-8"))


def quarantine(path: str | os.PathLike) -> Path:
    """Move a damaged file aside (keeping it) and return its new name."""
    path = Path(path)
    stamp = datetime.now(timezone.utc).strftime("%Y%m%dT%H%M%S")
    target = path.with_name(f"{path.name}.corrupt-{stamp}")
    n = 1
    while target.exists():
        target = path.with_name(f"{path.name}.corrupt-{stamp}-{n}")
        n += 1
    os.replace(path, target)
    return target
