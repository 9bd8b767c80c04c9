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

Every file the planner reads goes through :func:`read_user_file`: the path
must name a regular file (checked with ``os.stat`` before opening, so a FIFO
or a device such as ``/dev/zero`` is refused instead of blocking or filling
memory), and at most a stated number of bytes is read (:data:`MAX_BYTES`,
listed in docs/robustness.md).

Read-modify-write of the planner's own stores (saved profiles, plan files,
the ledger of written reports) happens under :func:`locked`, an exclusive
lock on a ``.lock`` file beside the store (``fcntl.flock``; ``msvcrt`` on
Windows), so concurrent processes never lose each other's entries.

Reports (``--out``, ``--plot``) go through :func:`check_output` and
:func:`write_output`: an existing file is replaced only when the planner
wrote it (its path and SHA-256 are in a small ledger in the data folder) or
with ``force``; a read-only file is never replaced; a missing folder is an
error, never created silently.
"""

from __future__ import annotations

import contextlib
import hashlib
import json
import os
import stat
import tempfile
from datetime import datetime, timezone
from pathlib import Path

from planner.errors import InputError, PlannerError

APP = "splitplan"
#: the observation log's file in the user data directory (see planner.config.logbook)
LOG_FILE_NAME = "observations.sqlite3"

MB = 1024 * 1024

#: Largest file read, per kind (bytes).  The full WDS summary is about 25 MB
#: and its VOTable form about 100 MB, so the catalogue cap leaves room for
#: growth while refusing a runaway file; TOML, horizon and target files are
#: hand-written and small.
MAX_BYTES = {
    "catalogue": 512 * MB,
    "toml": 4 * MB,
    "horizon": 4 * MB,
    "target list": 16 * MB,
    "json": 16 * MB,
}


def _size_text(n: int) -> str:
    return f"{n / MB:.0f} MB" if n >= MB else f"{n} bytes"


def user_path(path) -> Path:
    """``path`` as a Path with ``~`` expanded; an unknown ``~user`` is a one-line InputError."""
    try:
        return Path(os.fspath(path)).expanduser()
    except RuntimeError:  # pathlib: "Could not determine home directory"
        raise InputError(f"cannot expand {os.fspath(path)!r}: no such user's home folder; "
                         "give the full path") from None


def _kind_of(mode: int) -> str:
    if stat.S_ISFIFO(mode):
        return "a named pipe (FIFO)"
    if stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        return "a device"
    if stat.S_ISSOCK(mode):
        return "a socket"
    return "not a regular file"


_EXPECTED = {"toml": "a .toml file", "catalogue": "a catalogue text file", "horizon": "a horizon text file",
             "target list": "a CSV text file", "json": "a .json file"}


def check_regular(path, what: str = "file", expect: str = "a file") -> os.stat_result:
    """``os.stat`` of ``path`` after checking it names an existing regular file
    (a symbolic link to one is fine); a one-line InputError otherwise."""
    p = Path(path)
    try:
        st = os.stat(p)
    except FileNotFoundError:
        raise InputError(f"{what} {str(p)!r} does not exist") from None
    except NotADirectoryError:
        raise InputError(f"{what} {str(p)!r} does not exist (a part of the path is a file)") from None
    except OSError as exc:
        raise PlannerError(f"cannot read {what} {str(p)!r}: {exc.strerror or exc}") from None
    if stat.S_ISDIR(st.st_mode):
        raise InputError(f"{what} {str(p)!r} is a directory; give the path of {expect}")
    if not stat.S_ISREG(st.st_mode):
        raise InputError(f"{what} {str(p)!r} is {_kind_of(st.st_mode)}; give the path of a regular file")
    return st


def read_user_file(path, what: str = "file", kind: str = "toml") -> bytes:
    """The bytes of ``path``, read only if it is a regular file of at most
    ``MAX_BYTES[kind]`` bytes; a one-line InputError otherwise.

    The type is checked with ``os.stat`` before opening, the file is opened
    with ``O_NONBLOCK`` (so a file swapped for a FIFO in between cannot block)
    and checked again on the open descriptor, and never more than the cap
    plus one byte is read (a file that grows meanwhile is refused too)."""
    p = user_path(path)
    limit = MAX_BYTES[kind]
    st = check_regular(p, what, _EXPECTED.get(kind, "a file"))
    if st.st_size > limit:
        raise InputError(f"{what} {str(p)!r} is {_size_text(st.st_size)}; the limit for a {kind} "
                         f"file is {_size_text(limit)}")
    flags = os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_BINARY", 0)
    try:
        fd = os.open(p, flags)
    except OSError as exc:
        raise PlannerError(f"cannot read {what} {str(p)!r}: {exc.strerror or exc}") from None
    try:
        st = os.fstat(fd)
        if not stat.S_ISREG(st.st_mode):
            raise InputError(f"{what} {str(p)!r} is {_kind_of(st.st_mode)}; give the path of a regular file")
        chunks, total = [], 0
        while total <= limit:
            chunk = os.read(fd, min(8 * MB, limit + 1 - total))
            if not chunk:
                break
            chunks.append(chunk)
            total += len(chunk)
    except OSError as exc:
        raise PlannerError(f"cannot read {what} {str(p)!r}: {exc.strerror or exc}") from None
    finally:
        os.close(fd)
    if total > limit:
        raise InputError(f"{what} {str(p)!r} is larger than the limit for a {kind} file "
                         f"({_size_text(limit)})")
    return b"".join(chunks)


@contextlib.contextmanager
def locked(path):
    """Hold an exclusive lock for the read-modify-write of the store ``path``.

    The lock is a separate file (the store itself is replaced by rename, so
    it cannot carry the lock), named after the store's absolute path in the
    ``locks`` folder of the cache directory (beside the store when that
    folder cannot be made), so no lock file is left in the user's folders.
    The lock is released when the process ends, however it ends."""
    path = Path(path)
    key = hashlib.sha1(_ledger_key(path).encode("utf-8", "surrogateescape")).hexdigest()[:20]
    try:
        folder = user_dir("cache") / "locks"
        folder.mkdir(exist_ok=True)
        lock = folder / f"{key}.lock"
    except (PlannerError, OSError):
        lock = path.with_name(f".{path.name}.lock")
    try:
        fd = os.open(lock, os.O_RDWR | os.O_CREAT, 0o666)
    except OSError as exc:
        raise PlannerError(f"cannot lock {path}: {exc.strerror or exc}") from None
    try:
        try:
            import fcntl
        except ImportError:  # Windows
            import msvcrt

            os.lseek(fd, 0, os.SEEK_SET)
            while True:
                try:
                    msvcrt.locking(fd, msvcrt.LK_LOCK, 1)
                    break
                except OSError:  # LK_LOCK gives up after ten seconds; keep waiting
                    continue
            try:
                yield path
            finally:
                os.lseek(fd, 0, os.SEEK_SET)
                msvcrt.locking(fd, msvcrt.LK_UNLCK, 1)
        else:
            fcntl.flock(fd, fcntl.LOCK_EX)
            try:
                yield path
            finally:
                fcntl.flock(fd, fcntl.LOCK_UN)
    finally:
        os.close(fd)


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


def atomic_write_bytes(path: str | os.PathLike, data: bytes, make_dirs: bool = True) -> Path:
    """Write ``data`` to ``path`` atomically (temporary file, fsync, rename).

    Missing folders are created when ``make_dirs`` (the planner's own
    stores); otherwise a missing folder is a one-line error (reports)."""
    path = Path(path)
    directory = path.parent if str(path.parent) else Path(".")
    if not make_dirs and not directory.is_dir():
        raise PlannerError(f"cannot write {path}: the folder {directory} does not exist; create it first")
    try:
        if make_dirs:
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


# -- reports: never replace a file the planner did not write --------------------

LEDGER_NAME = "written-files.json"
LEDGER_SIZE = 2000  # most recent reports remembered


def _ledger_path() -> Path:
    return user_dir("data") / LEDGER_NAME


def _ledger_key(path: Path) -> str:
    """The absolute path, links resolved: one name per file."""
    return str(Path(os.path.abspath(path)).resolve())


def _read_ledger() -> dict[str, str]:
    p = _ledger_path()
    try:
        st = os.stat(p)
    except OSError:
        return {}
    if not stat.S_ISREG(st.st_mode) or st.st_size > MAX_BYTES["json"]:
        return {}
    try:
        data = json.loads(read_user_file(p, "ledger of written reports", "json").decode("utf-8"))
    except (PlannerError, ValueError):
        return {}  # a damaged ledger only means older reports are not recognised
    if not isinstance(data, dict):
        return {}
    return {k: v for k, v in data.items() if isinstance(k, str) and isinstance(v, str)}


def _sha256_file(path: Path) -> str | None:
    h = hashlib.sha256()
    try:
        with open(path, "rb") as fh:
            for chunk in iter(lambda: fh.read(MB), b""):
                h.update(chunk)
    except OSError:
        return None
    return h.hexdigest()


def check_output(path, force: bool = False, option: str = "--out") -> Path:
    """Check, before any work, that a report may be written to ``path``
    (``~`` expanded); returns the path.

    Refused in one line: a folder, a special file, a missing folder, a
    read-only file (even with ``force``), and an existing file that the
    planner did not write (unless ``force``).  A file the planner wrote is
    recognised by its path and content (SHA-256) in the ledger; a report
    changed since is treated as the user's."""
    p = user_path(path)
    directory = p.parent if str(p.parent) else Path(".")
    if not directory.is_dir():
        blocker = next((q for q in (directory, *directory.parents) if q.exists()), None)
        if blocker is not None and not blocker.is_dir():
            raise PlannerError(f"cannot write {p}: {blocker} is a file, not a folder")
        raise PlannerError(f"cannot write {p}: the folder {directory} does not exist; create it first")
    try:
        st = os.stat(p)
    except FileNotFoundError:
        return p
    except OSError as exc:
        raise InputError(f"{option} {p}: {exc.strerror or exc}") from None
    if stat.S_ISDIR(st.st_mode):
        raise InputError(f"{option} {p} is a directory; give a file name")
    if not stat.S_ISREG(st.st_mode):
        raise InputError(f"{option} {p} is {_kind_of(st.st_mode)}; give the name of a regular file")
    if not st.st_mode & 0o222:
        raise InputError(f"{option} {p} is read-only; it is never replaced (choose another name)")
    if force:
        return p
    ours = _read_ledger().get(_ledger_key(p))
    if ours is None or ours != _sha256_file(p):
        raise InputError(f"{option} {p} exists and was not written by splitplan (or was changed "
                         "since); choose another name, or add --force to replace it")
    return p


def write_output(path, data: bytes, force: bool = False, option: str = "--out") -> Path:
    """Write a report atomically after :func:`check_output`, and remember it
    in the ledger so that a later run may replace it."""
    p = check_output(path, force=force, option=option)
    atomic_write_bytes(p, data, make_dirs=False)
    try:
        ledger_file = _ledger_path()
        with locked(ledger_file):
            ledger = _read_ledger()
            key = _ledger_key(p)
            ledger.pop(key, None)
            ledger[key] = hashlib.sha256(data).hexdigest()
            keep = dict(list(ledger.items())[-LEDGER_SIZE:])
            atomic_write_text(ledger_file, json.dumps(keep, indent=0))
    except PlannerError:
        pass  # the report is written; only its later replacement will ask for --force
    return p
