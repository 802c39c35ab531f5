"""The survey store: one SQLite file, one row per field, committed chunk by chunk.

Schema (version :data:`SCHEMA_VERSION`, also in ``PRAGMA user_version``; the
file is marked with ``PRAGMA application_id`` = :data:`APPLICATION_ID`):

``meta(key TEXT PRIMARY KEY, value TEXT)``
    ``schema_version``, ``created`` (UTC time), ``realquad_version``.
``fields``
    one row per field, keyed by the squarefree radicand ``d`` (``d < 0`` for
    imaginary fields): ``d``, ``discriminant`` (unique), ``class_number``,
    ``narrow_class_number``, ``class_group`` and ``narrow_class_group``
    (invariant factors as a JSON list), ``roots_of_unity`` (``w``: 2, 4 or 6),
    ``unit_norm`` (±1), ``regulator`` (decimal text, 17 significant digits),
    ``period_length``, ``unit_digits`` (the four unit columns ``NULL``
    exactly for imaginary fields), ``method_id`` (see ``methods``),
    ``proof``, ``chunk`` (the chunk that wrote it).
``methods(id INTEGER PRIMARY KEY, method TEXT UNIQUE)``
    the method descriptions, stored once each.
``field_rows`` (a view)
    ``fields`` joined with ``methods``: the columns of
    :class:`~realquad.survey.compute.FieldRecord`, with ``method`` as text.
``chunks``
    one row per completed chunk: ``id``, ``kind`` (``'d'`` or ``'D'``),
    ``lo``, ``hi`` (inclusive bounds), ``fields``, ``seconds``,
    ``finished`` (UTC time).
``ranges``
    the ranges runs were asked to compute (``kind``, ``lo``, ``hi``), each
    recorded with the run's first saved chunk; :meth:`SurveyStore.missing`
    compares them with ``chunks``. Stores written before this table existed
    get it from their next run.

Version 2 added ``roots_of_unity`` and let the unit columns be empty (for
imaginary fields). A store of version 1 is read as it is (its fields are all
real, ``w = 2``) and upgraded to version 2 by the next run that writes to
it, in one transaction (the rows are copied into the new table).

A chunk's rows and its ``chunks`` row are written in one transaction, so a
run killed at any instant leaves each chunk either complete or absent; the
primary key on ``d`` makes a duplicate row impossible. While a run writes,
the journal is in WAL mode, so ``query`` and ``report`` can read meanwhile;
the run leaves WAL mode when it ends, so no ``-wal`` or ``-shm`` file stays
beside the store (after a ``kill -9`` they hold SQLite's recovery data,
which the next run or reader replays and removes). One writer at a time:
:meth:`SurveyStore.open_for_writing` takes an exclusive ``flock`` on the
database file itself (released by the system when the process dies, even by
``kill -9``) and refuses when another run holds it. A store a run created
and never saved a chunk to is removed when the run ends.

>>> import os, tempfile
>>> from realquad.survey.compute import survey_chunk
>>> from realquad.survey.ranges import Chunk, SurveyRange
>>> path = os.path.join(tempfile.mkdtemp(), "demo.sqlite")
>>> with SurveyStore.open_for_writing(path) as store:
...     store.begin_run(SurveyRange("d", 2, 30))
...     store.save_chunk(Chunk("d", 2, 9), survey_chunk(Chunk("d", 2, 9)), 0.0)
5
>>> with SurveyStore.open_for_reading(path) as store:
...     (store.count(), store.is_done(Chunk("d", 2, 9)), store.missing())
(5, True, [('d', 10, 30)])
>>> sorted(os.listdir(os.path.dirname(path)))  # no side files once the run is over
['demo.sqlite']
"""

from __future__ import annotations

import json
import operator
import os
import sqlite3
import time
from collections.abc import Iterable, Iterator
from contextlib import contextmanager
from dataclasses import dataclass, fields
from decimal import Decimal
from typing import Any

from realquad._version import __version__
from realquad.errors import InputError
from realquad.survey import dbfile
from realquad.survey.compute import FieldRecord, RowColumns
from realquad.survey.conditions import (
    invariant_factors,
    parse_decimal,
    parse_group,
    parse_p_rank,
    register_functions,
)
from realquad.survey.ranges import (
    Chunk,
    Interval,
    SurveyRange,
    clip_intervals,
    has_fields,
    subtract_intervals,
)

SCHEMA_VERSION = 2
#: Versions this realquad reads (older ones are upgraded by the next run).
READABLE_VERSIONS = (1, 2)
#: ``PRAGMA application_id`` of a survey store ("RQSV").
APPLICATION_ID = 0x52515356

COLUMNS = [f.name for f in fields(FieldRecord)]
#: A row's values but its method, in one call (a survey writes hundreds of thousands).
_VALUES = operator.attrgetter(*(c for c in COLUMNS if c != "method"))
_INSERT_FIELDS = (
    f"INSERT OR IGNORE INTO fields ({', '.join(c for c in COLUMNS if c != 'method')}, method_id, chunk) "
    f"VALUES ({', '.join('?' for _ in range(len(COLUMNS) + 1))})"
)
#: Rows of imaginary fields sent in columns (:class:`~realquad.survey.compute.RowColumns`): the
#: repeated and empty columns are filled here (half the cost of binding all of them).
_INSERT_IMAGINARY = (
    "INSERT OR IGNORE INTO fields (d, discriminant, class_number, narrow_class_number, "
    "class_group, narrow_class_group, roots_of_unity, proof, method_id, chunk) "
    "VALUES (?1, ?2, ?3, ?3, ?4, ?4, ?5, 'unconditional', ?6, ?7)"
)

#: The ranges runs were asked to compute (added to older stores by their next run).
_RANGES_TABLE = """CREATE TABLE IF NOT EXISTS ranges (
    kind TEXT NOT NULL CHECK (kind IN ('d', 'D')),
    lo INTEGER NOT NULL,
    hi INTEGER NOT NULL,
    PRIMARY KEY (kind, lo, hi)
)"""

#: The table of rows (``{name}``: ``fields``, or a new table while a store is upgraded).
_FIELDS_TABLE = """CREATE TABLE {name} (
    d INTEGER PRIMARY KEY,
    discriminant INTEGER NOT NULL UNIQUE,
    class_number INTEGER NOT NULL,
    narrow_class_number INTEGER NOT NULL,
    class_group TEXT NOT NULL,
    narrow_class_group TEXT NOT NULL,
    roots_of_unity INTEGER NOT NULL DEFAULT 2 CHECK (roots_of_unity IN (2, 4, 6)),
    unit_norm INTEGER CHECK (unit_norm IN (-1, 1)),
    regulator TEXT,
    period_length INTEGER,
    unit_digits INTEGER,
    method_id INTEGER NOT NULL REFERENCES methods (id),
    proof TEXT NOT NULL CHECK (proof IN ('unconditional', 'GRH')),
    chunk INTEGER NOT NULL REFERENCES chunks (id),
    CHECK ((d > 0) = (unit_norm IS NOT NULL AND regulator IS NOT NULL
                      AND period_length IS NOT NULL AND unit_digits IS NOT NULL))
)"""

#: The index on ``h`` (queries by class number). A run of a million fields or more drops it
#: while it writes (its random inserts cost more than the rows) and builds it again at the end;
#: opening a store for writing builds it if a killed run left it missing.
_CLASS_NUMBER_INDEX = "CREATE INDEX IF NOT EXISTS fields_class_number ON fields (class_number)"
#: Fields a run computes from which it drops the index on ``h`` while it writes.
BULK_FIELDS = 10**6

#: The index and the view over ``fields``.
_FIELDS_EXTRAS = f"""{_CLASS_NUMBER_INDEX};
CREATE VIEW field_rows AS
    SELECT {", ".join("methods.method" if c == "method" else "fields." + c for c in COLUMNS)}
    FROM fields JOIN methods ON methods.id = fields.method_id"""

_VERSION_1_COLUMNS = [
    {"method": "methods.method", "roots_of_unity": "2 AS roots_of_unity"}.get(c, "fields." + c)
    for c in COLUMNS
]
#: Version 1 had no ``roots_of_unity`` (every field real, ``w = 2``): the view a reader uses.
_VERSION_1_VIEW = f"""CREATE TEMP VIEW field_rows AS
    SELECT {", ".join(_VERSION_1_COLUMNS)}
    FROM main.fields JOIN main.methods ON methods.id = fields.method_id"""

_SCHEMA = f"""
CREATE TABLE meta (key TEXT PRIMARY KEY, value TEXT NOT NULL);
CREATE TABLE chunks (
    id INTEGER PRIMARY KEY,
    kind TEXT NOT NULL CHECK (kind IN ('d', 'D')),
    lo INTEGER NOT NULL,
    hi INTEGER NOT NULL,
    fields INTEGER NOT NULL,
    seconds REAL NOT NULL,
    finished TEXT NOT NULL,
    UNIQUE (kind, lo, hi)
);
CREATE TABLE methods (id INTEGER PRIMARY KEY, method TEXT NOT NULL UNIQUE);
{_FIELDS_TABLE.format(name="fields")};
{_RANGES_TABLE};
{_FIELDS_EXTRAS};
PRAGMA user_version = {SCHEMA_VERSION};
PRAGMA application_id = {APPLICATION_ID};
"""


@dataclass(frozen=True)
class RowFilter:
    """Conditions on survey rows, all combined with "and"; ``None`` (or empty) means no condition.

    * ``class_number``, ``narrow_class_number``, ``unit_norm``: equal to the value;
      ``d_min``, ``d_max``: bounds on ``d`` (inclusive);
    * ``class_group``, ``narrow_class_group``: the structure of Cl (or Cl⁺), as
      invariant factors or as text that :func:`~realquad.survey.conditions.parse_group`
      reads (``"C2 x C2"``, ``"2,2"``, ``"Z/2 x Z/2"``); normalised to invariant factors;
    * ``p_ranks``, ``narrow_p_ranks``: pairs ``(p, r)``: the ``p``-rank of Cl (of
      Cl⁺), the number of its invariant factors divisible by the prime ``p``, is ``r``;
    * ``prime_d``: ``d`` is prime; ``prime_discriminant``: the discriminant ``D``
      is prime (so ``D = d ≡ 1 (mod 4)``, the fields of the report's Cohen–Lenstra
      line; ``D = 8``, a prime discriminant in the wider sense, is not included);
    * ``regulator_min``, ``regulator_max``: bounds on the regulator (inclusive),
      compared exactly with the stored 17-digit decimal text (not through
      floating point); text, ``int``, ``Decimal`` or ``float`` (its exact binary value).

    >>> RowFilter(class_group="C2 x C2", p_ranks=((2, 2),)).class_group
    (2, 2)
    >>> RowFilter(regulator_min="2.5", prime_d=True).where()
    (' WHERE rq_is_prime(d) AND rq_decimal_cmp(regulator, ?) >= 0', ['2.5'])
    """

    class_number: int | None = None
    narrow_class_number: int | None = None
    unit_norm: int | None = None
    d_min: int | None = None
    d_max: int | None = None
    class_group: tuple[int, ...] | str | None = None
    narrow_class_group: tuple[int, ...] | str | None = None
    p_ranks: tuple[tuple[int, int], ...] = ()
    narrow_p_ranks: tuple[tuple[int, int], ...] = ()
    prime_d: bool = False
    prime_discriminant: bool = False
    regulator_min: Decimal | str | int | float | None = None
    regulator_max: Decimal | str | int | float | None = None

    def __post_init__(self) -> None:
        for name in ("class_group", "narrow_class_group"):
            value = getattr(self, name)
            if value is not None:
                group = parse_group(value) if isinstance(value, str) else invariant_factors(value)
                object.__setattr__(self, name, group)
        for name in ("p_ranks", "narrow_p_ranks"):
            pairs = tuple(
                parse_p_rank(f"{p}={r}") for p, r in getattr(self, name)
            )  # the same checks as on the command line
            object.__setattr__(self, name, pairs)
        for name in ("regulator_min", "regulator_max"):
            value = getattr(self, name)
            if value is not None:
                object.__setattr__(self, name, parse_decimal(value, name))

    def where(self) -> tuple[str, list[Any]]:
        """The SQL ``WHERE`` clause (possibly empty) and its parameters.

        The clause calls the functions that :func:`~realquad.survey.conditions.register_functions`
        gives every connection of a :class:`SurveyStore`.
        """
        terms: list[str] = []
        params: list[Any] = []
        for column in ("class_number", "narrow_class_number", "unit_norm"):
            value = getattr(self, column)
            if value is not None:
                terms.append(f"{column} = ?")
                params.append(value)
        if self.d_min is not None:
            terms.append("d >= ?")
            params.append(self.d_min)
        if self.d_max is not None:
            terms.append("d <= ?")
            params.append(self.d_max)
        for column, group, ranks in (
            ("class_group", self.class_group, self.p_ranks),
            ("narrow_class_group", self.narrow_class_group, self.narrow_p_ranks),
        ):
            if group is not None:
                terms.append(f"rq_same_group({column}, ?)")
                params.append(json.dumps(list(group)))
            for p, r in ranks:
                terms.append(f"rq_p_rank({column}, ?) = ?")
                params += [p, r]
        if self.prime_d:
            terms.append("rq_is_prime(d)")
        if self.prime_discriminant:
            terms.append("rq_is_prime(discriminant)")
        for bound, test in ((self.regulator_min, ">= 0"), (self.regulator_max, "<= 0")):
            if bound is not None:
                terms.append(f"rq_decimal_cmp(regulator, ?) {test}")
                params.append(str(bound))
        return (" WHERE " + " AND ".join(terms)) if terms else "", params


def order_by(sort: str | None = None, descending: bool = False) -> str:
    """The SQL ``ORDER BY`` clause of a query sorted by ``sort`` (any of :data:`COLUMNS`).

    Ties, and the default, go by increasing ``d``. The regulator is compared by
    value (its text through ``REAL``, equal doubles by exact decimal value), the
    group structures by group order (``h``, ``h⁺``) and then invariant factors
    lexicographically.

    >>> order_by("regulator", descending=True)
    ' ORDER BY CAST(regulator AS REAL) DESC, regulator COLLATE rq_decimal DESC, d'
    """
    way = " DESC" if descending else ""
    if sort is None or sort == "d":
        return f" ORDER BY d{way}"
    if sort not in COLUMNS:
        raise InputError(f"cannot sort by {sort!r}; the columns are {', '.join(COLUMNS)}")
    if sort == "regulator":
        keys = [f"CAST(regulator AS REAL){way}", f"regulator COLLATE rq_decimal{way}"]
    elif sort in ("class_group", "narrow_class_group"):
        order = "class_number" if sort == "class_group" else "narrow_class_number"
        keys = [f"{order}{way}", f"{sort} COLLATE rq_invariants{way}"]
    else:
        keys = [f"{sort}{way}"]
    return " ORDER BY " + ", ".join([*keys, "d"])


def _utc_now() -> str:
    return time.strftime("%Y-%m-%dT%H:%M:%SZ", time.gmtime())


def _is_empty(connection: sqlite3.Connection) -> bool:
    """Whether the database holds nothing at all (a new file, or one whose creation was cut short)."""
    header = (
        connection.execute("PRAGMA application_id").fetchone()[0],
        connection.execute("PRAGMA user_version").fetchone()[0],
    )
    objects = connection.execute("SELECT COUNT(*) FROM sqlite_master").fetchone()[0]
    return header == (0, 0) and objects == 0


def _check_schema(connection: sqlite3.Connection, path: str) -> int:
    """The schema version of the survey store ``connection``; :class:`InputError` if not readable.

    :func:`~realquad.survey.dbfile.classify` has read the file's header
    already; this asks SQLite, which also sees what a journal holds.
    """
    app = connection.execute("PRAGMA application_id").fetchone()[0]
    version = connection.execute("PRAGMA user_version").fetchone()[0]
    if app != APPLICATION_ID:
        raise InputError(f"{path!r} is not a survey database (it has another schema)")
    if version not in READABLE_VERSIONS:
        raise InputError(
            f"{path!r} is a survey database of schema version {version}; "
            f"this realquad reads versions {READABLE_VERSIONS[0]} to {READABLE_VERSIONS[-1]} only"
        )
    return int(version)


def _upgrade(connection: sqlite3.Connection) -> None:
    """Bring a version-1 store to version 2, in one transaction (nothing changes if it fails)."""
    columns = ", ".join(c for c in COLUMNS if c not in ("method", "roots_of_unity"))
    connection.execute("BEGIN IMMEDIATE")
    try:
        connection.execute(_FIELDS_TABLE.format(name="fields_upgraded"))
        connection.execute(
            f"INSERT INTO fields_upgraded ({columns}, roots_of_unity, method_id, chunk) "
            f"SELECT {columns}, 2, method_id, chunk FROM fields"
        )
        connection.execute("DROP VIEW field_rows")
        connection.execute("DROP TABLE fields")
        connection.execute("ALTER TABLE fields_upgraded RENAME TO fields")
        for statement in _FIELDS_EXTRAS.split(";"):
            connection.execute(statement)
        connection.execute(
            "UPDATE meta SET value = ? WHERE key = 'schema_version'", (str(SCHEMA_VERSION),)
        )
        connection.execute(f"PRAGMA user_version = {SCHEMA_VERSION}")
        connection.execute("COMMIT")
    except BaseException:
        if connection.in_transaction:
            connection.execute("ROLLBACK")
        raise


def _inspect(path: str) -> str:
    """Check ``path`` with :mod:`~realquad.survey.dbfile` and say what is there (``new``, ``blank``, ``store``)."""
    return dbfile.classify(dbfile.inspect(path), path, APPLICATION_ID, READABLE_VERSIONS)


def _connect_for_reading(path: str) -> sqlite3.Connection:
    """A connection that only reads ``path``, which :func:`_inspect` found to be a store.

    When this process may write the file and its directory, the connection
    is an ordinary one with ``PRAGMA query_only``: it can recover what a
    killed run left in the journal and, if it is the last to close, remove
    the ``-wal`` and ``-shm`` files. Otherwise it opens the file with
    ``immutable=1``, which takes no locks and creates no side files — safe
    here because no journal beside the file holds data (every committed
    chunk is in the file itself) and no run of this user can be writing a
    file this user cannot write. Only when a journal does hold data (a run
    killed on a read-only copy) is SQLite's read-only mode used, which reads
    the journal if SQLite can.
    """
    if dbfile.writable(path):
        connection = sqlite3.connect(dbfile.uri(path, mode="rw"), uri=True, timeout=30)
        connection.execute("PRAGMA query_only = ON")
    elif not dbfile.holds_data(path):
        connection = sqlite3.connect(dbfile.uri(path, mode="ro", immutable="1"), uri=True)
    else:
        connection = sqlite3.connect(dbfile.uri(path, mode="ro"), uri=True, timeout=30)
    return connection


class SurveyStore:
    """An open survey database; use :meth:`open_for_reading` or :meth:`open_for_writing`.

    Inside ``with store:`` every SQLite error (a damaged file, a full disk)
    becomes one :class:`InputError` naming the file.
    """

    def __init__(
        self,
        connection: sqlite3.Connection,
        path: str,
        lock: dbfile.WriterLock | None = None,
    ) -> None:
        self.connection = connection
        self.path = path
        self._lock = lock
        #: chunks this connection has written (a store created for a run that wrote none is removed)
        self.chunks_written = 0
        self._run_range: SurveyRange | None = None
        register_functions(connection)

    @classmethod
    def open_for_reading(cls, path: str) -> SurveyStore:
        """Open an existing store read-only (fails with :class:`InputError` if it is not one)."""
        found = _inspect(path)
        if found == "new":
            raise InputError(f"no survey database {path!r} (run 'realquad survey run' first)")
        if found == "blank" and not dbfile.holds_data(path):
            raise InputError(f"{path!r} is not a survey database (it is empty)")
        connection: sqlite3.Connection | None = None
        try:
            connection = _connect_for_reading(path)
            if _check_schema(connection, path) == 1:  # a view in this connection's temp schema
                only = connection.execute("PRAGMA query_only").fetchone()[0]
                connection.execute("PRAGMA query_only = OFF")
                connection.execute(_VERSION_1_VIEW)
                connection.execute(f"PRAGMA query_only = {int(only)}")
        except sqlite3.Error as exc:
            if connection is not None:
                connection.close()
            raise _store_error(path, "read", exc) from None
        except BaseException:
            if connection is not None:
                connection.close()
            raise
        return cls(connection, path)

    @staticmethod
    def check_writable(path: str) -> None:
        """Raise :class:`InputError` unless ``path`` is a survey store or can become one (nothing is changed)."""
        found = _inspect(path)
        directory = os.path.dirname(os.path.abspath(path))
        if found == "new" and not os.path.isdir(directory):
            raise InputError(f"cannot create {path!r}: no such directory")
        if found != "new" and not os.access(path, os.W_OK):
            raise InputError(f"cannot write {path!r}: permission denied")
        if not os.access(directory, os.W_OK):
            verb = "create" if found == "new" else "write"
            raise InputError(
                f"cannot {verb} {path!r}: its directory is not writable "
                "(SQLite keeps its journal beside the file)"
            )

    @classmethod
    def open_for_writing(cls, path: str) -> SurveyStore:
        """Open or create a store for one writer; refuse if another run is writing it.

        An existing file is classified from its header before SQLite opens it,
        so a file of another kind is never modified. The store is created in
        rollback mode (so its header is on disk from the first commit) and
        written in WAL mode, so readers can read while the run writes.
        """
        cls.check_writable(path)
        lock = dbfile.WriterLock.acquire(path)
        connection: sqlite3.Connection | None = None
        try:
            dbfile.classify(
                dbfile.read_header(lock.fd, path), path, APPLICATION_ID, READABLE_VERSIONS
            )
            connection = sqlite3.connect(
                dbfile.uri(path, mode="rw"), uri=True, timeout=30, isolation_level=None
            )
            if _is_empty(connection):
                _create(connection)
            if _check_schema(connection, path) == 1:
                _upgrade(connection)
            connection.execute("PRAGMA journal_mode = WAL")
            connection.execute("PRAGMA synchronous = NORMAL")
            # up to 256 MB of pages in memory: the indexes of a survey of millions of
            # fields stay cached instead of being read back for every chunk
            connection.execute("PRAGMA cache_size = -262144")
            connection.execute(_CLASS_NUMBER_INDEX)
        except BaseException as exc:
            if connection is not None:
                connection.close()
            lock.release(remove=lock.created)
            if isinstance(exc, sqlite3.Error):
                raise _store_error(path, "write", exc) from None
            raise
        return cls(connection, path, lock)

    def __enter__(self) -> SurveyStore:
        return self

    def __exit__(
        self, kind: type[BaseException] | None, error: BaseException | None, _tb: object
    ) -> None:
        verb = "read" if self._lock is None else "write"
        try:
            self.close()
        except sqlite3.Error as exc:
            if error is None:
                raise _store_error(self.path, verb, exc) from None
        if isinstance(error, sqlite3.Error):
            raise _store_error(self.path, verb, error) from None

    def close(self) -> None:
        """Close the store; a writer leaves the file in rollback mode, without side files.

        Leaving WAL mode needs the file to itself: while a reader still has it
        open the file stays in WAL mode, and that reader, closing last, removes
        the ``-wal`` and ``-shm`` files. A store this run created and never
        wrote a chunk to is removed.
        """
        lock, self._lock = self._lock, None
        remove = lock is not None and lock.created and self.chunks_written == 0
        try:
            if lock is not None and not remove:
                try:
                    self.connection.execute("PRAGMA busy_timeout = 500")
                    self.connection.execute("PRAGMA journal_mode = DELETE")
                except sqlite3.OperationalError:  # a reader has it open: it cleans up
                    pass
        finally:
            self.connection.close()
            if lock is not None:
                lock.release(remove=remove)

    # -- chunks -----------------------------------------------------------------

    @contextmanager
    def bulk_writes(self) -> Iterator[None]:
        """Write many chunks without the index on ``h``, built again at the end; after an
        interrupt or a kill, by the next :meth:`open_for_writing` (so Ctrl-C stops at once)."""
        self.connection.execute("DROP INDEX IF EXISTS fields_class_number")
        yield
        # sort with helper threads (SQLite's own): 3·10⁷ rows in about 43 s instead of 60
        self.connection.execute(f"PRAGMA threads = {min(4, os.cpu_count() or 1)}")
        self.connection.execute(_CLASS_NUMBER_INDEX)

    def is_done(self, chunk: Chunk) -> bool:
        """Whether completed chunks of the same kind cover ``chunk`` (whatever their size)."""
        overlapping = self.connection.execute(
            "SELECT lo, hi FROM chunks WHERE kind = ? AND hi >= ? AND lo <= ? ORDER BY lo",
            (chunk.kind, chunk.lo, chunk.hi),
        )
        needed = chunk.lo
        for lo, hi in overlapping:
            if lo > needed:
                return False
            needed = max(needed, hi + 1)
            if needed > chunk.hi:
                return True
        return False

    def save_chunk(
        self, chunk: Chunk, rows: Iterable[FieldRecord] | RowColumns, seconds: float
    ) -> int:
        """Write the rows of ``chunk`` and mark it complete, in one transaction; return the row count."""
        if not isinstance(rows, RowColumns):
            rows = list(rows)
        c = self.connection
        c.execute("BEGIN IMMEDIATE")
        try:
            if self.is_done(chunk):
                c.execute("ROLLBACK")
                return 0
            cursor = c.execute(
                "INSERT INTO chunks (kind, lo, hi, fields, seconds, finished) VALUES (?, ?, ?, ?, ?, ?)",
                (chunk.kind, chunk.lo, chunk.hi, len(rows), seconds, _utc_now()),
            )
            chunk_id = int(cursor.lastrowid or 0)
            if self._run_range is not None:
                self._record_range(self._run_range)
            if isinstance(rows, RowColumns):  # sent in columns
                method_ids = self._method_ids(rows.methods())
                c.executemany(_INSERT_IMAGINARY, rows.store_values(method_ids, chunk_id))
            else:
                method_ids = self._method_ids({r.method for r in rows})
                c.executemany(
                    _INSERT_FIELDS, [(*_VALUES(r), method_ids[r.method], chunk_id) for r in rows]
                )
            c.execute("COMMIT")
        except BaseException:
            if c.in_transaction:
                c.execute("ROLLBACK")
            raise
        self.chunks_written += 1
        self._run_range = None  # recorded with this first chunk
        return len(rows)

    def begin_run(self, survey_range: SurveyRange) -> None:
        """Remember the range of this run; it is recorded in table ``ranges`` with the first chunk saved."""
        self._run_range = survey_range

    def _record_range(self, survey_range: SurveyRange) -> None:
        """Add ``survey_range`` to table ``ranges`` (inside the caller's transaction)."""
        self.connection.execute(_RANGES_TABLE)
        self.connection.execute(
            "INSERT OR IGNORE INTO ranges (kind, lo, hi) VALUES (?, ?, ?)",
            (survey_range.kind, survey_range.lo, survey_range.hi),
        )

    def missing(self, d_min: int | None = None, d_max: int | None = None) -> list[Interval]:
        """The parts of the requested ranges that no completed chunk covers, as ``(kind, lo, hi)``.

        The requested ranges are those of the runs recorded in table
        ``ranges`` (for a store written before that table existed: from the
        first to the last completed chunk of each kind), cut to ``d_min ≤ d ≤
        d_max``; for ranges of discriminants that means ``d_min ≤ D ≤ 4·d_max``,
        where the discriminants of those fields lie. Gaps holding no field at
        all are left out.
        """
        c = self.connection
        has_ranges = c.execute(
            "SELECT COUNT(*) FROM sqlite_master WHERE type = 'table' AND name = 'ranges'"
        ).fetchone()[0]
        source = (
            "ranges"
            if has_ranges
            else "(SELECT kind, MIN(lo) AS lo, MAX(hi) AS hi FROM chunks GROUP BY kind)"
        )
        requested = c.execute(f"SELECT kind, lo, hi FROM {source}").fetchall()
        completed = c.execute("SELECT kind, lo, hi FROM chunks").fetchall()
        found: list[Interval] = []
        for kind in ("d", "D"):
            lo_cap, hi_cap = d_min, d_max
            if kind == "D":  # D lies between d and 4d
                lo_cap = None if d_min is None else min(d_min, 4 * d_min)
                hi_cap = None if d_max is None else max(d_max, 4 * d_max)
            wanted = clip_intervals(
                [(lo, hi) for k, lo, hi in requested if k == kind], lo_cap, hi_cap
            )
            done = [(lo, hi) for k, lo, hi in completed if k == kind]
            found.extend(
                (kind, lo, hi)
                for lo, hi in subtract_intervals(wanted, done)
                if has_fields(kind, lo, hi)
            )
        return found

    def _method_ids(self, methods: set[str]) -> dict[str, int]:
        """The ids of ``methods`` in table ``methods``, adding new ones (inside the caller's transaction)."""
        ids = {}
        for text in methods:
            self.connection.execute("INSERT OR IGNORE INTO methods (method) VALUES (?)", (text,))
            ids[text] = self.connection.execute(
                "SELECT id FROM methods WHERE method = ?", (text,)
            ).fetchone()[0]
        return ids

    # -- rows -------------------------------------------------------------------

    def count(self, where: RowFilter | None = None) -> int:
        clause, params = (where or RowFilter()).where()
        return int(
            self.connection.execute(f"SELECT COUNT(*) FROM field_rows{clause}", params).fetchone()[
                0
            ]
        )

    def rows(
        self,
        where: RowFilter | None = None,
        limit: int | None = None,
        sort: str | None = None,
        descending: bool = False,
    ) -> Iterator[dict[str, Any]]:
        """Matching rows as dictionaries with the :data:`COLUMNS` keys.

        In increasing ``d``, or sorted by the column ``sort`` (see :func:`order_by`).
        """
        clause, params = (where or RowFilter()).where()
        sql = f"SELECT {', '.join(COLUMNS)} FROM field_rows{clause}{order_by(sort, descending)}"
        if limit is not None:
            sql += f" LIMIT {int(limit)}"
        for values in self.connection.execute(sql, params):
            yield dict(zip(COLUMNS, values, strict=True))

    def column_values(
        self, columns: list[str], where: RowFilter | None = None
    ) -> list[tuple[Any, ...]]:
        """Selected columns of every matching row, in increasing ``d``."""
        unknown = [c for c in columns if c not in COLUMNS]
        if unknown:
            raise InputError(f"unknown column {unknown[0]!r}")
        clause, params = (where or RowFilter()).where()
        sql = f"SELECT {', '.join(columns)} FROM field_rows{clause} ORDER BY d"
        return list(self.connection.execute(sql, params))


def _store_error(path: str, verb: str, exc: sqlite3.Error) -> InputError:
    """One line for an SQLite error on the store at ``path`` (``verb``: read or write)."""
    detail = " ".join(str(exc).split()) or type(exc).__name__
    if "malformed" in detail or "not a database" in detail:
        return InputError(f"{path!r} is a damaged survey database ({detail})")
    return InputError(f"cannot {verb} the survey database {path!r}: {detail}")


def _create(connection: sqlite3.Connection) -> None:
    connection.execute("BEGIN IMMEDIATE")
    try:
        for statement in _SCHEMA.split(";"):
            if statement.strip():
                connection.execute(statement)
        connection.executemany(
            "INSERT INTO meta (key, value) VALUES (?, ?)",
            [
                ("schema_version", str(SCHEMA_VERSION)),
                ("created", _utc_now()),
                ("realquad_version", __version__),
            ],
        )
        connection.execute("COMMIT")
    except BaseException:
        if connection.in_transaction:
            connection.execute("ROLLBACK")
        raise
