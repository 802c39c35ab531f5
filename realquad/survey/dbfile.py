"""The file under a survey store: which paths may hold one, its header, the writer's lock.

Everything here looks at the file with plain system calls before SQLite ever
opens it, so a name SQLite would treat specially (``""``, ``:memory:``, a
``file:`` URI) or a file that would make it hang (a FIFO) or fail obscurely (a
device, a directory) is refused with one :class:`InputError` line.

:func:`inspect` checks a path and reads the 100-byte SQLite header without
blocking; :func:`classify` decides from that header alone whether the file is
a survey store, an empty file that may become one, or something else — so a
file of another program is refused without SQLite opening it, and never
changed. :class:`WriterLock` is the one-writer-at-a-time lock, an exclusive
``flock`` on the database file itself (no side file); the system releases it
when the process ends, however it ends.

>>> import os, tempfile
>>> path = os.path.join(tempfile.mkdtemp(), "new.sqlite")
>>> inspect(path) is None  # a new path is fine: nothing there yet
True
>>> inspect(":memory:")
Traceback (most recent call last):
...
realquad.errors.InputError: --db must name a file, not ':memory:' (an in-memory database would be lost at the end of the run)
>>> lock = WriterLock.acquire(path)
>>> (lock.created, os.path.exists(path))
(True, True)
>>> lock.release(remove=True)
>>> os.path.exists(path)
False
"""

from __future__ import annotations

import errno
import fcntl
import os
import stat
from dataclasses import dataclass
from typing import Literal
from urllib.parse import quote

from realquad.errors import InputError

#: What SQLite may keep beside a database: WAL, its shared-memory index, the rollback journal.
SIDE_SUFFIXES = ("-wal", "-shm", "-journal")

_MAGIC = b"SQLite format 3\x00"


@dataclass(frozen=True)
class Header:
    """What the first 100 bytes of a database file say (all zero for an empty file)."""

    size: int
    sqlite: bool
    wal: bool
    schema_cookie: int = 0
    user_version: int = 0
    application_id: int = 0

    @property
    def blank(self) -> bool:
        """An empty file, or an SQLite file in which no schema was ever created."""
        return self.size == 0 or (
            self.sqlite
            and self.schema_cookie == 0
            and (self.user_version, self.application_id) == (0, 0)
        )


def _kind_of(mode: int) -> str | None:
    """``None`` for a regular file, otherwise what the file is instead."""
    if stat.S_ISREG(mode):
        return None
    if stat.S_ISDIR(mode):
        return "a directory"
    if stat.S_ISFIFO(mode):
        return "a FIFO"
    if stat.S_ISSOCK(mode):
        return "a socket"
    if stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        return "a device"
    return "not a regular file"


def check_name(path: str) -> None:
    """Refuse names that SQLite does not take as a plain file name."""
    if not path.strip():
        raise InputError("--db needs a file name")
    if path == ":memory:" or path.startswith(":memory:"):
        raise InputError(
            f"--db must name a file, not {path!r} (an in-memory database would be lost at the end of the run)"
        )
    if path.lower().startswith("file:"):
        raise InputError(f"--db must name a file, not the URI {path!r}")
    if "\x00" in path:
        raise InputError("--db must not contain a NUL character")


def inspect(path: str) -> Header | None:
    """The header of the regular file at ``path``, or ``None`` if nothing is there yet.

    Raises :class:`InputError` for a name SQLite would not take as a file, for
    anything but a regular file (FIFO, device, directory, socket), for a
    broken symbolic link.
    """
    check_name(path)
    try:
        info = os.stat(path)
    except FileNotFoundError:
        if os.path.lexists(path):
            raise InputError(f"{path!r} is a broken symbolic link") from None
        return None
    except OSError as exc:
        raise InputError(f"cannot use {path!r}: {exc.strerror}") from None
    kind = _kind_of(info.st_mode)
    if kind is not None:
        raise InputError(f"{path!r} is {kind}, not a survey database")
    try:
        fd = os.open(path, os.O_RDONLY | os.O_NONBLOCK | os.O_CLOEXEC)
    except OSError as exc:
        raise InputError(f"cannot read {path!r}: {exc.strerror}") from None
    try:
        return read_header(fd, path)
    finally:
        os.close(fd)


def read_header(fd: int, path: str) -> Header:
    """The header of the open file ``fd`` (checked to be a regular file: the name may have changed)."""
    kind = _kind_of(os.fstat(fd).st_mode)
    if kind is not None:
        raise InputError(f"{path!r} is {kind}, not a survey database")
    try:
        head = os.pread(fd, 100, 0)
    except OSError as exc:
        raise InputError(f"cannot read {path!r}: {exc.strerror}") from None
    size = os.fstat(fd).st_size
    if not head.startswith(_MAGIC) or len(head) < 100:
        return Header(size=size, sqlite=False, wal=False)

    def word(offset: int) -> int:
        return int.from_bytes(head[offset : offset + 4], "big", signed=True)

    return Header(
        size=size,
        sqlite=True,
        wal=head[18] == 2,
        schema_cookie=word(40),
        user_version=word(60),
        application_id=word(68),
    )


def classify(
    header: Header | None, path: str, application_id: int, versions: tuple[int, ...]
) -> Literal["new", "blank", "store"]:
    """``new`` (no file), ``blank`` (may become a store) or ``store`` (of one of ``versions``);
    anything else is refused."""
    if header is None:
        return "new"
    if header.blank:
        return "blank"
    if not header.sqlite:
        raise InputError(f"{path!r} is not a survey database (not an SQLite file)")
    if header.application_id != application_id:
        raise InputError(f"{path!r} is not a survey database (it has another schema)")
    if header.user_version not in versions:
        raise InputError(
            f"{path!r} is a survey database of schema version {header.user_version}; "
            f"this realquad reads versions {versions[0]} to {versions[-1]} only"
        )
    return "store"


def writable(path: str) -> bool:
    """Whether this process may write ``path`` and create files beside it (SQLite's journals)."""
    directory = os.path.dirname(os.path.abspath(path))
    return os.access(path, os.W_OK) and os.access(directory, os.W_OK)


def holds_data(path: str) -> bool:
    """Whether a journal beside ``path`` (``-wal`` or ``-journal``) holds data not yet in the file."""
    for suffix in ("-wal", "-journal"):
        try:
            if os.stat(path + suffix).st_size > 0:
                return True
        except OSError:
            pass
    return False


def uri(path: str, **params: str) -> str:
    """An SQLite URI naming exactly ``path`` (every special character escaped)."""
    query = "&".join(f"{k}={v}" for k, v in params.items())
    return f"file:{quote(os.path.abspath(path))}" + (f"?{query}" if query else "")


class WriterLock:
    """An exclusive ``flock`` on the database file itself, held while a run writes it.

    The lock's descriptor must be closed only after SQLite's own connection
    (closing any descriptor of a file drops the process's POSIX locks on it,
    which SQLite uses), so :meth:`release` comes last.
    """

    def __init__(self, fd: int, path: str, created: bool) -> None:
        self.fd = fd
        self.path = path
        self.created = created

    @classmethod
    def acquire(cls, path: str) -> WriterLock:
        """Open (or create, remembering it) the file at ``path`` and lock it, or raise :class:`InputError`."""
        flags = os.O_RDWR | os.O_NONBLOCK | os.O_CLOEXEC
        created = False
        try:
            try:
                fd = os.open(path, flags | os.O_CREAT | os.O_EXCL, 0o644)
                created = True
            except FileExistsError:
                fd = os.open(path, flags)
        except OSError as exc:
            verb = "create" if exc.errno == errno.ENOENT else "write"
            raise InputError(f"cannot {verb} {path!r}: {exc.strerror}") from None
        lock = cls(fd, path, created)
        try:
            read_header(fd, path)  # a regular file still (the name may have been replaced)
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except OSError:
            lock.release(remove=created)
            raise InputError(
                f"{path!r} is being written by another survey run; wait for it to finish or use another --db"
            ) from None
        except BaseException:
            lock.release(remove=created)
            raise
        return lock

    def release(self, remove: bool = False) -> None:
        """Drop the lock; with ``remove`` delete the file and SQLite's side files first."""
        if self.fd < 0:
            return
        if remove:
            for name in (self.path, *(self.path + s for s in SIDE_SUFFIXES)):
                try:
                    os.unlink(name)
                except FileNotFoundError:
                    pass
                except OSError:  # pragma: no cover - the directory changed under the run
                    pass
        os.close(self.fd)
        self.fd = -1
