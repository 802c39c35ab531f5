"""A file of relations: a long relation search killed at any moment resumes where it stopped.

SQLite, one row per relation (the polynomial ``(a, b)``, the point ``x``,
the large prime, the exponents as text ``p:e p:e …``) and one per family of
polynomials already sieved (its ``a``), written by the one process that
collects, one transaction per finished batch: a batch is in the file
completely or not at all. The file names the discriminant and the factor
base bound it belongs to; opening it for another field is refused.

>>> import tempfile, os
>>> path = os.path.join(tempfile.mkdtemp(), "rel.sqlite")
>>> with RelationStore(path, -(10**20 + 3), 8483) as store:
...     store.add([Relation({3: 1, 7: -1}, 15, 7, 2)], [15])
>>> with RelationStore(path, -(10**20 + 3), 8483) as store:
...     [r.exponents for r in store.relations()], store.families()
([{3: 1, 7: -1}], {15})
"""

from __future__ import annotations

import sqlite3
from pathlib import Path

from realquad.errors import InputError
from realquad.relations.smooth import Relation

_SCHEMA = """
CREATE TABLE IF NOT EXISTS meta (key TEXT PRIMARY KEY, value TEXT NOT NULL);
CREATE TABLE IF NOT EXISTS relations (
    a TEXT NOT NULL, b TEXT NOT NULL, x TEXT NOT NULL, large TEXT NOT NULL, exponents TEXT NOT NULL
);
CREATE TABLE IF NOT EXISTS families (a TEXT PRIMARY KEY);
"""


def _exponents_text(exponents: dict[int, int]) -> str:
    return " ".join(f"{p}:{e}" for p, e in exponents.items())


def _exponents(text: str) -> dict[int, int]:
    out = {}
    for item in text.split():
        p, e = item.split(":")
        out[int(p)] = int(e)
    return out


class RelationStore:
    """The relations of one field and factor base in a SQLite file (module notes)."""

    def __init__(self, path: str | Path, discriminant: int, bound: int) -> None:
        self.path = Path(path)
        try:
            self._db = sqlite3.connect(self.path, isolation_level=None)
            self._db.executescript(_SCHEMA)
            rows = dict(self._db.execute("SELECT key, value FROM meta").fetchall())
        except sqlite3.DatabaseError as exc:
            raise InputError(f"{self.path} is not a relation file: {exc}") from None
        wanted = {"discriminant": str(discriminant), "bound": str(bound)}
        if not rows:
            with self._db:
                self._db.execute("BEGIN")
                self._db.executemany("INSERT INTO meta VALUES (?, ?)", list(wanted.items()))
        elif {k: rows.get(k) for k in wanted} != wanted:
            self._db.close()
            raise InputError(
                f"the relation file {self.path} belongs to D = {rows.get('discriminant')} with the "
                f"factor base to {rows.get('bound')}, not D = {discriminant} with {bound}"
            )

    def add(self, relations: list[Relation], families: list[int]) -> None:
        """Save one finished batch: its relations and the ``a`` of its families, in one transaction."""
        with self._db:
            self._db.execute("BEGIN")
            self._db.executemany(
                "INSERT INTO relations VALUES (?, ?, ?, ?, ?)",
                [
                    (str(r.a), str(r.b), str(r.x), str(r.large), _exponents_text(r.exponents))
                    for r in relations
                ],
            )
            self._db.executemany(
                "INSERT OR IGNORE INTO families VALUES (?)", [(str(a),) for a in families]
            )

    def relations(self) -> list[Relation]:
        rows = self._db.execute("SELECT a, b, x, large, exponents FROM relations").fetchall()
        return [
            Relation(_exponents(e), int(a), int(b), int(x), int(large))
            for a, b, x, large, e in rows
        ]

    def families(self) -> set[int]:
        return {int(a) for (a,) in self._db.execute("SELECT a FROM families")}

    def close(self) -> None:
        self._db.close()

    def __enter__(self) -> RelationStore:
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()
