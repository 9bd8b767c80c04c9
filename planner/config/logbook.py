"""The observation log: what you tried, with what, and how it went, in a local SQLite file.

One file, ``observations.sqlite3`` in the user data directory
(:func:`planner.config.storage.user_dir` ``('data')``; ``SPLITPLAN_HOME``
moves it), opened through the standard library :mod:`sqlite3`:

* **recognised**: the file carries an application id (``PRAGMA application_id``,
  :data:`APPLICATION_ID`, the bytes ``SPLg``) and a schema version
  (``PRAGMA user_version``, :data:`SCHEMA_VERSION`).  A file that is not an
  SQLite database, belongs to another program, was written by a newer
  splitplan or fails ``PRAGMA quick_check`` is reported in one line
  (:class:`~planner.errors.CorruptFileError`, exit 1) with how to recover, and
  is left exactly as it was: nothing is written to it, it is never replaced.
* **safe with several processes**: write-ahead logging (``journal_mode=WAL``),
  a busy timeout (:data:`BUSY_TIMEOUT_S`) and every change in one
  ``BEGIN IMMEDIATE`` transaction, so processes adding at once all keep
  their entries.
* **migrations**: :data:`MIGRATIONS` lists the schema steps; opening a file of
  an older version applies the missing steps in one transaction.
* **undo**: every change (add, edit, remove, import) is written to a change
  journal in the same transaction, with the entries as they were before;
  :meth:`Logbook.undo` puts back the state before the last change.

Each entry holds the observation (:data:`OBSERVATION_COLUMNS`) and the
circumstances the planner computed for that moment (:data:`CIRCUMSTANCE_COLUMNS`:
rho, theta, altitude, airmass, seeing used, the model's limit, margin and
chance, the model version), so that a later model can re-score the same log.
The fitted calibrations are kept in the same file (:meth:`Logbook.save_fit`).

This module is at the bottom of the package: it imports only the standard
library, :mod:`planner.errors` and :mod:`planner.config.storage`.  The
columns are documented in docs/log.md.
"""

from __future__ import annotations

import json
import math
import os
import re
import sqlite3
import uuid
from dataclasses import dataclass
from datetime import datetime, timezone
from pathlib import Path

from planner.errors import CorruptFileError, InputError, PlannerError

#: ``PRAGMA application_id`` of a splitplan log: the ASCII bytes "SPLg".
APPLICATION_ID = 0x53504C67
#: the schema version this code writes (``PRAGMA user_version``)
SCHEMA_VERSION = 1
#: seconds a writer waits for another process's transaction before giving up
BUSY_TIMEOUT_S = 30.0

#: the fixed result scale, best first, with what each word means
RESULTS = {
    "clean": "split with a dark gap between the stars",
    "split": "resolved, the discs touching",
    "notched": "a notch in the image, not resolved",
    "elongated": "an elongated image, not resolved",
    "round": "a round image: not split",
    "unseen": "the companion was not seen",
}
#: results that count as a split in the calibration
SPLIT_RESULTS = ("clean", "split")


@dataclass(frozen=True)
class Column:
    name: str
    sql: str            # SQLite type: TEXT, REAL, INTEGER
    required: bool
    meaning: str


#: what the observer saw and with what (typed in or taken from profiles)
OBSERVATION_COLUMNS = (
    Column("uid", "TEXT", True, "identifier kept across export and import (random, 32 hex digits)"),
    Column("wds_id", "TEXT", True, "WDS identifier of the pair, e.g. 18055+0230"),
    Column("components", "TEXT", False, "components, e.g. AB"),
    Column("discoverer", "TEXT", False, "discoverer designation from the catalogue, e.g. STF2272"),
    Column("name_typed", "TEXT", True, "the name as the observer typed it"),
    Column("when_utc", "TEXT", True, "time of the observation, UTC, YYYY-MM-DDTHH:MM:SSZ"),
    Column("tz", "TEXT", True, "IANA time zone of the site (for showing local times)"),
    Column("scope", "TEXT", False, "saved telescope name, if one was used"),
    Column("aperture_mm", "REAL", True, "clear aperture, mm"),
    Column("obstruction", "REAL", True, "central obstruction, diameter ratio"),
    Column("site", "TEXT", False, "saved site name, if one was used"),
    Column("lat_deg", "REAL", True, "site latitude, deg north"),
    Column("lon_deg", "REAL", True, "site longitude, deg east"),
    Column("elevation_m", "REAL", True, "site height above sea level, m"),
    Column("seeing_arcsec", "REAL", False, "seeing FWHM at the zenith as given, arcsec"),
    Column("steadiness", "REAL", False, "steadiness 1-10 as given"),
    Column("power", "REAL", False, "magnification used"),
    Column("result", "TEXT", True, "clean, split, notched, elongated, round or unseen"),
    Column("note", "TEXT", True, "free text (may be empty)"),
)
#: what the planner computed for that moment (empty where it could not)
CIRCUMSTANCE_COLUMNS = (
    Column("rho_arcsec", "REAL", False, "separation at that moment, arcsec"),
    Column("theta_deg", "REAL", False, "position angle at that moment, deg"),
    Column("alt_deg", "REAL", False, "altitude of the pair, deg"),
    Column("airmass", "REAL", False, "airmass of the pair"),
    Column("seeing_used_arcsec", "REAL", False, "seeing FWHM at the zenith the model used, arcsec"),
    Column("limit_arcsec", "REAL", False, "separation the model needed, arcsec"),
    Column("margin", "REAL", False, "rho / limit"),
    Column("chance", "REAL", False, "the model's chance of a split, 0-1"),
    Column("mag_limit", "REAL", False, "faintest star the model thought visible, mag"),
    Column("mag_faint", "REAL", False, "magnitude of the fainter star, mag"),
    Column("model_version", "TEXT", False, "splitplan version and model that computed these"),
)
#: bookkeeping
RECORD_COLUMNS = (
    Column("created_utc", "TEXT", True, "when the entry was written, UTC"),
    Column("modified_utc", "TEXT", False, "when it was last edited, UTC"),
)
ENTRY_COLUMNS = ("id",) + tuple(c.name for c in OBSERVATION_COLUMNS + CIRCUMSTANCE_COLUMNS + RECORD_COLUMNS)
_BY_NAME = {c.name: c for c in OBSERVATION_COLUMNS + CIRCUMSTANCE_COLUMNS + RECORD_COLUMNS}
#: columns an edit may change (the rest identify the entry or are bookkeeping)
EDITABLE = tuple(c.name for c in OBSERVATION_COLUMNS + CIRCUMSTANCE_COLUMNS if c.name != "uid")


def _schema_v1() -> list[str]:
    cols = ",\n  ".join(f"{c.name} {c.sql}{' NOT NULL' if c.required else ''}"
                        for c in OBSERVATION_COLUMNS + CIRCUMSTANCE_COLUMNS + RECORD_COLUMNS)
    results = ", ".join(f"'{r}'" for r in RESULTS)
    return [
        f"CREATE TABLE entry (\n  id INTEGER PRIMARY KEY AUTOINCREMENT,\n  {cols},\n"
        f"  UNIQUE (uid),\n  CHECK (result IN ({results}))\n)",
        "CREATE INDEX entry_pair ON entry (wds_id, components)",
        "CREATE INDEX entry_when ON entry (when_utc)",
        # one row per change; change_row keeps each touched entry as it was before (NULL: it did not exist)
        "CREATE TABLE change (id INTEGER PRIMARY KEY AUTOINCREMENT, at_utc TEXT NOT NULL, "
        "action TEXT NOT NULL, summary TEXT NOT NULL, undone INTEGER NOT NULL DEFAULT 0)",
        "CREATE TABLE change_row (change_id INTEGER NOT NULL REFERENCES change(id), "
        "entry_id INTEGER NOT NULL, before TEXT)",
        "CREATE TABLE fit (id INTEGER PRIMARY KEY AUTOINCREMENT, created_utc TEXT NOT NULL, "
        "scope TEXT NOT NULL, body TEXT NOT NULL)",
    ]


#: schema steps: MIGRATIONS[k] takes a file from version k to k + 1
MIGRATIONS: tuple = (_schema_v1,)


def default_path() -> Path:
    """Where the log lives: ``observations.sqlite3`` in the user data directory."""
    from planner.config.storage import log_path

    return log_path()


def utc_now_text() -> str:
    return datetime.now(timezone.utc).strftime("%Y-%m-%dT%H:%M:%SZ")


_UTC_RE = re.compile(r"^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}Z$")


def check_utc_text(value, what: str = "when_utc") -> str:
    """An instant as ``YYYY-MM-DDTHH:MM:SSZ`` (the one form stored)."""
    s = str(value).strip()
    if not _UTC_RE.match(s):
        raise InputError(f"{what} {value!r} is not a UTC time YYYY-MM-DDTHH:MM:SSZ")
    try:
        datetime.strptime(s, "%Y-%m-%dT%H:%M:%SZ")
    except ValueError:
        raise InputError(f"{what} {value!r} is not a real date and time") from None
    return s


#: allowed ranges of the numeric observation fields (inclusive)
_RANGES = {"aperture_mm": (1.0, 20000.0), "obstruction": (0.0, 0.9), "lat_deg": (-90.0, 90.0),
           "lon_deg": (-180.0, 180.0), "elevation_m": (-500.0, 9000.0), "seeing_arcsec": (0.0, 60.0),
           "steadiness": (1.0, 10.0), "power": (1.0, 10000.0)}


def _clean_value(name: str, value):
    col = _BY_NAME[name]
    if value is None or (isinstance(value, str) and value == "" and col.sql != "TEXT"):
        if col.required:
            raise InputError(f"an entry needs {name} ({col.meaning})")
        return None
    if col.sql == "REAL":
        try:
            v = float(value)
        except (TypeError, ValueError):
            raise InputError(f"{name} {value!r} is not a number ({col.meaning})") from None
        if not math.isfinite(v):
            if col.required or name in _RANGES:
                raise InputError(f"{name} {value!r} is not a finite number")
            return None
        lo_hi = _RANGES.get(name)
        if lo_hi and not lo_hi[0] <= v <= lo_hi[1]:
            raise InputError(f"{name} {v:g} is outside {lo_hi[0]:g}-{lo_hi[1]:g} ({col.meaning})")
        return v
    if col.sql == "TEXT":
        if not isinstance(value, str):
            raise InputError(f"{name} {value!r} is not text ({col.meaning})")
        if name == "note":
            if len(value) > 4000:
                raise InputError("a note is at most 4000 characters")
            return value
        if value == "":
            if col.required:
                raise InputError(f"an entry needs {name} ({col.meaning})")
            return None
        if len(value) > 200 or any(ord(ch) < 32 or ord(ch) == 127 for ch in value):
            raise InputError(f"{name} {value!r} must be at most 200 printable characters")
        if name == "result" and value not in RESULTS:
            raise InputError(f"result {value!r} is not one of {', '.join(RESULTS)}")
        if name in ("when_utc", "created_utc", "modified_utc"):
            return check_utc_text(value, name)
        return value
    raise AssertionError(col.sql)  # pragma: no cover


def clean_entry(fields: dict, partial: bool = False) -> dict:
    """Check an entry's fields; returns a new dict (unknown names refused).

    ``partial``: only the fields given (an edit); otherwise every required
    field must be there and missing optional ones become ``None``."""
    unknown = [k for k in fields if k not in _BY_NAME and k != "id"]
    if unknown:
        raise InputError(f"unknown log field {unknown[0]!r}; fields: {', '.join(ENTRY_COLUMNS)}")
    if partial:
        return {k: _clean_value(k, v) for k, v in fields.items() if k != "id"}
    out = {}
    for name, col in _BY_NAME.items():
        if name in ("uid", "created_utc", "modified_utc") and fields.get(name) in (None, ""):
            continue
        out[name] = _clean_value(name, fields.get(name, "" if name == "note" else None))
    return out


class Logbook:
    """The observation log in one SQLite file (see the module docstring).

    Open it with ``Logbook()`` (the default file) or ``Logbook(path)``; use it
    as a context manager or call :meth:`close`.  Every method that changes
    entries runs in one transaction and records the change for :meth:`undo`.
    """

    def __init__(self, path: str | os.PathLike | None = None, create: bool = True):
        self.path = Path(path) if path is not None else default_path()
        if self.path.is_dir():
            raise InputError(f"the observation log {self.path} is a folder; give a file")
        if not create and not self.path.exists():
            raise InputError(f"there is no observation log at {self.path}")
        self._con = None
        try:
            self._con = sqlite3.connect(str(self.path), timeout=BUSY_TIMEOUT_S, isolation_level=None)
            self._con.row_factory = sqlite3.Row
            self._open_retrying()
        except sqlite3.DatabaseError as exc:
            self.close()
            raise self._damaged(str(exc)) from None
        except BaseException:
            self.close()
            raise

    # -- opening -------------------------------------------------------------

    def _damaged(self, why: str) -> CorruptFileError:
        return CorruptFileError(
            f"the observation log {self.path} is damaged or not a splitplan log ({why}); it was left "
            f"untouched: restore a copy made with 'splitplan log backup', or move the file aside to "
            f"start a new log")

    def _open_retrying(self) -> None:
        """:meth:`_open`, tried again while another process holds the file (switching a new
        file to WAL needs it alone, and SQLite answers 'locked' at once there, without
        waiting for the busy timeout)."""
        import time

        deadline = time.monotonic() + BUSY_TIMEOUT_S
        while True:
            try:
                return self._open()
            except sqlite3.OperationalError as exc:
                text = str(exc).lower()
                if ("locked" not in text and "busy" not in text) or time.monotonic() > deadline:
                    raise
                if self._con.in_transaction:
                    self._con.execute("ROLLBACK")
                time.sleep(0.02)

    def _open(self) -> None:
        con = self._con
        con.execute(f"PRAGMA busy_timeout = {int(BUSY_TIMEOUT_S * 1000)}")
        # Read-only checks first: nothing is written to a file that is not ours.
        # One read transaction, so the three reads see one state of the file even while
        # another process is creating it (separate autocommit reads could straddle its commit).
        con.execute("BEGIN")
        try:
            app_id = con.execute("PRAGMA application_id").fetchone()[0]
            version = con.execute("PRAGMA user_version").fetchone()[0]
            n_objects = con.execute("SELECT count(*) FROM sqlite_master").fetchone()[0]
        finally:
            con.execute("COMMIT")
        fresh = app_id == 0 and version == 0 and n_objects == 0
        if not fresh:
            if app_id != APPLICATION_ID:
                raise CorruptFileError(
                    f"{self.path} is an SQLite database of another program (application id {app_id:#x}), "
                    f"not a splitplan observation log; it was left untouched: move it elsewhere or give "
                    f"another log file")
            if version > SCHEMA_VERSION:
                raise CorruptFileError(
                    f"the observation log {self.path} was written by a newer splitplan (schema {version}, "
                    f"this one knows {SCHEMA_VERSION}); it was left untouched: upgrade splitplan")
            check = con.execute("PRAGMA quick_check").fetchall()
            if [tuple(r) for r in check] != [("ok",)]:
                raise self._damaged(f"integrity check: {check[0][0]}")
        if not fresh and version == SCHEMA_VERSION:
            mode = con.execute("PRAGMA journal_mode").fetchone()[0]
            if mode.lower() != "wal":  # e.g. a copy restored by hand: ours, so set it once
                con.execute("PRAGMA journal_mode = WAL")
            return
        con.execute("PRAGMA journal_mode = WAL")
        self._migrate()

    def _migrate(self) -> None:
        con = self._con
        con.execute("BEGIN IMMEDIATE")
        try:
            app_id = con.execute("PRAGMA application_id").fetchone()[0]
            version = con.execute("PRAGMA user_version").fetchone()[0]
            n_objects = con.execute("SELECT count(*) FROM sqlite_master").fetchone()[0]
            if app_id not in (0, APPLICATION_ID) or (app_id == 0 and n_objects):
                raise CorruptFileError(f"{self.path} is not a splitplan observation log; left untouched")
            for step in MIGRATIONS[version:SCHEMA_VERSION]:  # another process may have done it meanwhile
                for sql in step():
                    con.execute(sql)
            con.execute(f"PRAGMA application_id = {APPLICATION_ID}")
            con.execute(f"PRAGMA user_version = {SCHEMA_VERSION}")
            con.execute("COMMIT")
        except BaseException:
            con.execute("ROLLBACK")
            raise

    def close(self) -> None:
        if self._con is not None:
            self._con.close()
            self._con = None

    def __enter__(self):
        return self

    def __exit__(self, *exc):
        self.close()

    # -- transactions ----------------------------------------------------------

    def _write(self, action: str, summary: str, work):
        """Run ``work(con, record)`` in one immediate transaction, journalled as one change.

        ``record(entry_id, before_row_or_None)`` notes an entry touched by the change."""
        con = self._con
        try:
            con.execute("BEGIN IMMEDIATE")
        except sqlite3.OperationalError as exc:
            raise PlannerError(f"the observation log {self.path} is busy ({exc}); try again") from None
        try:
            cur = con.execute("INSERT INTO change (at_utc, action, summary) VALUES (?, ?, ?)",
                              (utc_now_text(), action, summary))
            change_id = cur.lastrowid

            def record(entry_id, before):
                con.execute("INSERT INTO change_row (change_id, entry_id, before) VALUES (?, ?, ?)",
                            (change_id, entry_id, None if before is None else json.dumps(dict(before))))

            out = work(con, record)
            con.execute("COMMIT")
            return out
        except sqlite3.DatabaseError as exc:
            con.execute("ROLLBACK")
            if isinstance(exc, sqlite3.IntegrityError):
                raise InputError(f"the log refused the change: {exc}") from None
            raise PlannerError(f"the observation log {self.path} could not be written: {exc}") from None
        except BaseException:
            con.execute("ROLLBACK")
            raise

    @staticmethod
    def _insert(con, entry: dict, keep_id: bool = False) -> int:
        names = [n for n in ENTRY_COLUMNS if n != "id" or keep_id]
        cur = con.execute(f"INSERT INTO entry ({', '.join(names)}) VALUES ({', '.join('?' * len(names))})",
                          [entry.get(n) for n in names])
        return cur.lastrowid

    # -- entries ---------------------------------------------------------------

    def add(self, fields: dict) -> int:
        """Add one entry; returns its number."""
        entry = clean_entry(fields)
        entry["uid"] = entry.get("uid") or uuid.uuid4().hex
        entry["created_utc"] = entry.get("created_utc") or utc_now_text()

        def work(con, record):
            new_id = self._insert(con, entry)
            record(new_id, None)
            return new_id

        return self._write("add", f"add {entry['name_typed']} ({entry['result']})", work)

    def get(self, entry_id: int) -> dict:
        row = self._con.execute("SELECT * FROM entry WHERE id = ?", (int(entry_id),)).fetchone()
        if row is None:
            raise InputError(f"there is no log entry {entry_id}; see 'splitplan log list'")
        return dict(row)

    def entries(self, wds_ids=None, scope=None, aperture_mm=None, result=None, since_utc=None,
                until_utc=None) -> list[dict]:
        """Entries, oldest first, filtered: ``wds_ids`` (list), ``scope`` name,
        ``aperture_mm``, ``result`` (one or a list), UTC text bounds ``since_utc`` <= when < ``until_utc``."""
        where, args = [], []
        if wds_ids is not None:
            ids = list(wds_ids)
            where.append(f"wds_id IN ({', '.join('?' * len(ids))})" if ids else "0")
            args += ids
        if scope is not None:
            where.append("scope = ?")
            args.append(scope)
        if aperture_mm is not None:
            where.append("abs(aperture_mm - ?) < 0.05")
            args.append(float(aperture_mm))
        if result is not None:
            res = [result] if isinstance(result, str) else list(result)
            for r in res:
                _clean_value("result", r)
            where.append(f"result IN ({', '.join('?' * len(res))})")
            args += res
        if since_utc is not None:
            where.append("when_utc >= ?")
            args.append(check_utc_text(since_utc, "from"))
        if until_utc is not None:
            where.append("when_utc < ?")
            args.append(check_utc_text(until_utc, "to"))
        sql = "SELECT * FROM entry" + (" WHERE " + " AND ".join(where) if where else "") + \
            " ORDER BY when_utc, id"
        return [dict(r) for r in self._con.execute(sql, args)]

    def count(self) -> int:
        return self._con.execute("SELECT count(*) FROM entry").fetchone()[0]

    def edit(self, entry_id: int, changes: dict) -> dict:
        """Change fields of one entry; returns the entry as it is now."""
        bad = [k for k in changes if k not in EDITABLE]
        if bad:
            raise InputError(f"log field {bad[0]!r} cannot be edited; editable: {', '.join(EDITABLE)}")
        clean = clean_entry(changes, partial=True)
        if not clean:
            raise InputError("nothing to change: give at least one field")

        def work(con, record):
            row = con.execute("SELECT * FROM entry WHERE id = ?", (int(entry_id),)).fetchone()
            if row is None:
                raise InputError(f"there is no log entry {entry_id}; see 'splitplan log list'")
            record(int(entry_id), row)
            sets = dict(clean, modified_utc=utc_now_text())
            con.execute(f"UPDATE entry SET {', '.join(f'{k} = ?' for k in sets)} WHERE id = ?",
                        [*sets.values(), int(entry_id)])
            return dict(con.execute("SELECT * FROM entry WHERE id = ?", (int(entry_id),)).fetchone())

        return self._write("edit", f"edit entry {entry_id}: {', '.join(clean)}", work)

    def remove(self, entry_id: int) -> dict:
        """Remove one entry; returns it as it was."""
        def work(con, record):
            row = con.execute("SELECT * FROM entry WHERE id = ?", (int(entry_id),)).fetchone()
            if row is None:
                raise InputError(f"there is no log entry {entry_id}; see 'splitplan log list'")
            record(int(entry_id), row)
            con.execute("DELETE FROM entry WHERE id = ?", (int(entry_id),))
            return dict(row)

        return self._write("remove", f"remove entry {entry_id}", work)

    def import_entries(self, entries: list[dict]) -> tuple[int, int]:
        """Add entries read from an export; returns (added, already present).

        An entry whose ``uid`` is already in the log is skipped (importing the
        same file twice adds nothing); entry numbers are kept where free."""
        cleaned = []
        for i, e in enumerate(entries, 1):
            try:
                c = clean_entry(e)
            except InputError as exc:
                raise InputError(f"entry {i} of the import: {exc}") from None
            c["uid"] = c.get("uid") or uuid.uuid4().hex
            c["created_utc"] = c.get("created_utc") or utc_now_text()
            try:
                c["id"] = int(e["id"]) if e.get("id") not in (None, "") else None
            except (TypeError, ValueError):
                raise InputError(f"entry {i} of the import: id {e.get('id')!r} is not a number") from None
            cleaned.append(c)

        def work(con, record):
            added = skipped = 0
            for c in cleaned:
                if con.execute("SELECT 1 FROM entry WHERE uid = ?", (c["uid"],)).fetchone():
                    skipped += 1
                    continue
                free = c["id"] is not None and c["id"] > 0 and not con.execute(
                    "SELECT 1 FROM entry WHERE id = ?", (c["id"],)).fetchone()
                new_id = self._insert(con, c, keep_id=free)
                record(new_id, None)
                added += 1
            return added, skipped

        return self._write("import", f"import {len(cleaned)} entries", work)

    def undo(self) -> str | None:
        """Undo the last change not yet undone; returns what it was (None: nothing to undo)."""
        def work(con, record):
            ch = con.execute("SELECT * FROM change WHERE undone = 0 AND action != 'undo' "
                             "ORDER BY id DESC LIMIT 1").fetchone()
            if ch is None:
                return None
            rows = con.execute("SELECT entry_id, before FROM change_row WHERE change_id = ? "
                               "ORDER BY rowid DESC", (ch["id"],)).fetchall()
            for r in rows:
                current = con.execute("SELECT * FROM entry WHERE id = ?", (r["entry_id"],)).fetchone()
                record(r["entry_id"], current)
                con.execute("DELETE FROM entry WHERE id = ?", (r["entry_id"],))
                if r["before"] is not None:
                    self._insert(con, json.loads(r["before"]), keep_id=True)
            con.execute("UPDATE change SET undone = 1 WHERE id = ?", (ch["id"],))
            return str(ch["summary"])

        return self._write("undo", "undo", work)

    def changes(self, limit: int = 20) -> list[dict]:
        """The latest changes, newest first."""
        return [dict(r) for r in self._con.execute(
            "SELECT * FROM change ORDER BY id DESC LIMIT ?", (int(limit),))]

    # -- fits ------------------------------------------------------------------

    def save_fit(self, scope: str, body: dict) -> int:
        """Keep a fitted calibration (``scope``: a telescope key, '' for pooled)."""
        text = json.dumps(body, sort_keys=True, allow_nan=False)
        con = self._con
        con.execute("BEGIN IMMEDIATE")
        try:
            cur = con.execute("INSERT INTO fit (created_utc, scope, body) VALUES (?, ?, ?)",
                              (utc_now_text(), str(scope), text))
            con.execute("COMMIT")
        except BaseException:
            con.execute("ROLLBACK")
            raise
        return cur.lastrowid

    def latest_fit(self, scope: str | None = None) -> dict | None:
        """The newest stored fit for ``scope`` (None: the newest of any)."""
        if scope is None:
            row = self._con.execute("SELECT * FROM fit ORDER BY id DESC LIMIT 1").fetchone()
        else:
            row = self._con.execute("SELECT * FROM fit WHERE scope = ? ORDER BY id DESC LIMIT 1",
                                    (str(scope),)).fetchone()
        if row is None:
            return None
        body = json.loads(row["body"])
        body.update(fit_id=row["id"], fitted_utc=row["created_utc"], scope_key=row["scope"])
        return body

    # -- copies ----------------------------------------------------------------

    def backup(self, dest: str | os.PathLike) -> Path:
        """A consistent copy of the whole log (SQLite online backup API) at ``dest``.

        ``dest`` must not exist yet (a backup never overwrites a file)."""
        dest = Path(dest)
        if dest.exists():
            raise InputError(f"{dest} exists; a backup is written to a new file only")
        if not dest.parent.is_dir():
            raise InputError(f"folder {dest.parent} does not exist")
        tmp = dest.with_name(f".{dest.name}.{uuid.uuid4().hex[:8]}.tmp")
        try:
            target = sqlite3.connect(str(tmp))
            try:
                self._con.backup(target)
                target.execute("PRAGMA journal_mode = DELETE")  # one self-contained file
            finally:
                target.close()
            if dest.exists():
                raise InputError(f"{dest} appeared meanwhile; a backup is written to a new file only")
            os.replace(tmp, dest)
        except sqlite3.DatabaseError as exc:
            raise PlannerError(f"cannot write the backup {dest}: {exc}") from None
        except OSError as exc:
            raise PlannerError(f"cannot write the backup {dest}: {exc.strerror or exc}") from None
        finally:
            if tmp.exists():
                tmp.unlink()
        return dest


# -- export and import ---------------------------------------------------------

#: columns of an export, in order (CSV header and JSON keys)
EXPORT_COLUMNS = ENTRY_COLUMNS
EXPORT_FORMAT = "splitplan-log"
_FORMULA = ("=", "+", "-", "@", "\t", "\r")
_QUOTED = re.compile(r"^'+[=+\-@\t\r]")


def _csv_text(s: str) -> str:
    """Text cell a spreadsheet will not run as a formula; reversed exactly by :func:`_csv_untext`."""
    if s.startswith(_FORMULA) or _QUOTED.match(s):
        return "'" + s
    return s


def _csv_untext(s: str) -> str:
    return s[1:] if _QUOTED.match(s) else s


def export_text(entries: list[dict], fmt: str) -> str:
    """The entries as CSV or JSON text (every column of :data:`EXPORT_COLUMNS`).

    Numbers are written with :func:`repr` (shortest exact form), so an import
    reads back the very same values."""
    if fmt == "json":
        doc = {"format": EXPORT_FORMAT, "schema_version": SCHEMA_VERSION,
               "columns": list(EXPORT_COLUMNS),
               "entries": [{k: e.get(k) for k in EXPORT_COLUMNS} for e in entries]}
        return json.dumps(doc, indent=1, ensure_ascii=False, allow_nan=False) + "\n"
    if fmt == "csv":
        import csv
        import io

        buf = io.StringIO()
        w = csv.writer(buf, lineterminator="\n")
        w.writerow(EXPORT_COLUMNS)
        for e in entries:
            row = []
            for k in EXPORT_COLUMNS:
                v = e.get(k)
                if v is None:
                    row.append("")
                elif isinstance(v, float):
                    row.append(repr(v))
                elif isinstance(v, str):
                    row.append(_csv_text(v))
                else:
                    row.append(str(v))
            w.writerow(row)
        return buf.getvalue()
    raise InputError(f"export format {fmt!r} is not csv or json")


def parse_export(text: str, fmt: str) -> list[dict]:
    """Entries from export text (CSV or JSON); the values are checked on import."""
    if fmt == "json":
        try:
            doc = json.loads(text)
        except json.JSONDecodeError as exc:
            raise InputError(f"not a JSON log export ({exc.msg}, line {exc.lineno})") from None
        if not isinstance(doc, dict) or doc.get("format") != EXPORT_FORMAT or \
                not isinstance(doc.get("entries"), list):
            raise InputError(f"not a splitplan log export (expected \"format\": \"{EXPORT_FORMAT}\" "
                             "and a list of entries)")
        if not all(isinstance(e, dict) for e in doc["entries"]):
            raise InputError("a splitplan log export holds one object per entry")
        return [dict(e) for e in doc["entries"]]
    if fmt == "csv":
        import csv
        import io

        rows = list(csv.reader(io.StringIO(text)))
        if not rows or "wds_id" not in rows[0] or "result" not in rows[0]:
            raise InputError("not a splitplan log export: the first CSV line must name the columns "
                             "(wds_id, result, ...; see docs/log.md)")
        head = rows[0]
        out = []
        for n, r in enumerate(rows[1:], 2):
            if not r:
                continue
            if len(r) != len(head):
                raise InputError(f"CSV line {n} has {len(r)} cells, the header {len(head)}")
            e = {}
            for k, v in zip(head, r):
                col = _BY_NAME.get(k)
                if col is None:
                    e[k] = v if k != "id" else (v or None)
                elif col.sql == "TEXT":
                    v = _csv_untext(v)
                    e[k] = v if (v != "" or k == "note") else None
                else:
                    e[k] = v if v != "" else None
            out.append(e)
        return out
    raise InputError(f"import format {fmt!r} is not csv or json")
