"""A cursor over tokens for the package's small recursive-descent parsers.

Each parser (continued-fraction expressions in :mod:`realquad.cfrac.parser`,
equations in :mod:`realquad.equations.parser`) cuts its text into
``(kind, text, position)`` tokens its own way and words its own errors; the
walk over the tokens is this one.

>>> cursor = TokenCursor("1 + 2", [("int", "1", 0), ("op", "+", 2), ("int", "2", 4)])
>>> cursor.take(), cursor.is_op("-", "+"), cursor.take()[1], cursor.take()
(('int', '1', 0), True, '+', ('int', '2', 4))
>>> cursor.peek()
('end', '', 5)
"""

from __future__ import annotations

Token = tuple[str, str, int]


class TokenCursor:
    """The tokens of ``text``, the position ``i`` of the next one, and the parenthesis ``depth``."""

    def __init__(self, text: str, tokens: list[Token] | None = None) -> None:
        self.text = text
        self.tokens: list[Token] = [] if tokens is None else tokens
        self.i = 0
        self.depth = 0

    def peek(self) -> Token:
        """The next token, or ``("end", "", len(text))`` past the last one."""
        if self.i < len(self.tokens):
            return self.tokens[self.i]
        return ("end", "", len(self.text))

    def take(self) -> Token:
        """The next token, consumed."""
        tok = self.peek()
        self.i += 1
        return tok

    def is_op(self, *values: str) -> bool:
        """Whether the next token is one of the operators ``values``."""
        kind, tok, _ = self.peek()
        return kind == "op" and tok in values
