"""A small, pure, iterative s-expression reader for KiCad files.

The whole text is split into tokens by one regular expression; an explicit
stack (no recursion) turns them into nested :class:`Node` lists, so a
million-deep nesting costs memory, never a ``RecursionError``.

Atoms are plain ``str``: a bare symbol and a quoted string are the same thing
to KiCad (``(layer F.Cu)`` == ``(layer "F.Cu")``), and numbers stay text until
a handler asks for one (pad numbers and net names often look like numbers).

Positions are kept cheaply: each list remembers the index of its opening
token; :class:`Locator` turns a token index into a 1-based line and column
only when a message needs one.
"""

from __future__ import annotations

import gc
import re
from bisect import bisect_right
from collections.abc import Iterator
from contextlib import contextmanager
from itertools import chain
from pathlib import Path

from auditor.errors import BoardFileError

#: One token: a paren, a complete quoted string, a lone quote (an unterminated
#: string, reported as an error) or a run of anything else but whitespace.
_TOKEN = re.compile(r'[()]|"(?:[^"\\]|\\.)*"|"|[^\s()"]+')
_ESCAPE = re.compile(r"\\(.)", re.DOTALL)
_ESCAPES = {"n": "\n", "t": "\t", "r": "\r"}
#: Control characters that never appear in a text board (tab, LF, CR excepted).
_BINARY = re.compile(r"[\x00-\x08\x0b\x0c\x0e-\x1f\x7f]")

#: KiCad boards nest about 10 deep; far beyond this the file is not a board.
MAX_DEPTH = 512


class Node(list):  # type: ignore[type-arg]
    """A parenthesised list; ``token`` is the index of its ``(`` token."""

    __slots__ = ("token",)

    token: int

    @property
    def head(self) -> str:
        """The first atom (the list's keyword), or ``""``."""
        first = self[0] if self else ""
        return first if isinstance(first, str) else ""


def _unescape(body: str) -> str:
    return _ESCAPE.sub(lambda m: _ESCAPES.get(m.group(1), m.group(1)), body)


class Locator:
    """Maps token indexes and character offsets of one text to line:column.

    :func:`iter_top` tells it where each run of tokens starts, so finding a
    token re-scans only its run, not the file.
    """

    def __init__(self, text: str) -> None:
        self._text = text
        self._run_tokens: list[int] = []
        self._run_starts: list[int] = []
        #: (run, token, offset) of the last token found: items are located in
        #: file order, so the next search resumes there instead of re-scanning
        #: the run (keeps locating every item linear in the file's size).
        self._cursor: tuple[int, int, int] = (-1, 0, 0)
        self._line_cursor: tuple[int, int] = (0, 1)  # (offset, its line)

    def add_run(self, first_token: int, start: int) -> None:
        """Record that token ``first_token`` is the first at or after ``start``."""
        self._run_tokens.append(first_token)
        self._run_starts.append(start)

    def offset_of_token(self, index: int) -> int:
        """Character offset of token ``index`` (clamped to the last token)."""
        k = bisect_right(self._run_tokens, index) - 1
        first, start = (self._run_tokens[k], self._run_starts[k]) if k >= 0 else (0, 0)
        run, token, offset = self._cursor
        if run == k and first <= token <= index:
            first, start = token, offset
        last, count = start, first
        for count, match in enumerate(_TOKEN.finditer(self._text, start), first):
            last = match.start()
            if count >= index:
                break
        self._cursor = (k, count, last)
        return last

    def line_column(self, offset: int) -> tuple[int, int]:
        """1-based line and column of a character offset."""
        line_offset, line = self._line_cursor
        if offset >= line_offset:  # items come in file order: count on from the last one
            line += self._text.count("\n", line_offset, offset)
        else:
            line = self._text.count("\n", 0, offset) + 1
        self._line_cursor = (offset, line)
        return line, offset - (self._text.rfind("\n", 0, offset) + 1) + 1

    def of_token(self, index: int) -> tuple[int, int]:
        """1-based line and column of token ``index``."""
        return self.line_column(self.offset_of_token(index))


def decode(data: bytes, path: str | Path) -> str:
    """UTF-8 text of a board file, or :class:`BoardFileError` naming the bad byte."""
    if data.startswith(b"\xef\xbb\xbf"):
        data = data[3:]
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as exc:
        head = data[: exc.start].decode("utf-8", "replace")
        loc = Locator(head)
        line, col = loc.line_column(len(head))
        raise BoardFileError(path, f"not UTF-8 text (byte 0x{data[exc.start]:02x})",
                             line, col) from None
    return text


def parse(text: str, path: str | Path = "<string>") -> Node:
    """Parse one top-level list into a tree.

    Parameters
    ----------
    text:
        The whole file.
    path:
        Used in error messages only.

    Returns
    -------
    Node
        The top-level list (``kicad_pcb ...``).

    Raises
    ------
    BoardFileError
        Empty text, stray or missing parentheses, an unterminated string,
        binary content, nesting deeper than :data:`MAX_DEPTH`, or text after
        the top-level list.

    Examples
    --------
    >>> tree = parse('(kicad_pcb (version 4) (layer "F.Cu"))')
    >>> tree.head, tree[2]
    ('kicad_pcb', ['layer', 'F.Cu'])
    """
    with gc_paused():
        root = Node(iter_top(text, path))
    root.token = 0
    return root


@contextmanager
def gc_paused() -> Iterator[None]:
    """Pause the cyclic garbage collector: building a tree creates millions
    of lists and no cycles, and each collector pass would walk them all."""
    enabled = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if enabled:
            gc.enable()


#: Characters tokenized per step; steps end at a newline so no token is cut
#: (a string with a raw newline makes the step longer, see :func:`_token_runs`).
CHUNK_CHARS = 1 << 16


def _token_runs(text: str, locator: Locator) -> Iterator[list[str]]:
    """Tokens in runs of about :data:`CHUNK_CHARS`, so the token strings of
    the whole file never exist at once (peak memory)."""
    start, size, count = 0, len(text), 0
    while start < size:
        end = text.find("\n", start + CHUNK_CHARS)
        while True:
            stop = size if end < 0 else end + 1
            tokens = _TOKEN.findall(text, start, stop)
            if stop >= size or '"' not in tokens:
                break
            end = text.find("\n", stop + (stop - start))  # a string spans the cut: widen
        locator.add_run(count, start)
        count += len(tokens)
        yield tokens
        start = stop


def iter_top(text: str, path: str | Path = "<string>",
             locator: Locator | None = None) -> Iterator[str | Node]:
    """The children of the top-level list, each yielded once it is complete.

    A reader can handle and drop each top-level item in turn, so the tree of
    the whole file never has to exist. Errors are those of :func:`parse`;
    they are raised when the parser reaches them.
    """
    binary = _BINARY.search(text)
    if binary:
        line, col = Locator(text).line_column(binary.start())
        raise BoardFileError(path, f"binary content (character 0x{ord(binary.group()):02x})",
                             line, col)
    where = locator if locator is not None else Locator(text)
    tokens = chain.from_iterable(_token_runs(text, where))
    first = next(tokens, None)
    if first is None:
        raise BoardFileError(path, "empty file")
    if first != "(":
        raise _fail(where, path, 0, "not an s-expression (expected '(')")
    stack: list[Node] = []
    current = Node()
    for index, tok in enumerate(tokens, 1):
        lead = tok[0]
        if lead == "(":
            child = Node()
            child.token = index
            if stack:
                current.append(child)
            stack.append(current)
            current = child
            if len(stack) > MAX_DEPTH:
                raise _fail(where, path, index, f"nesting deeper than {MAX_DEPTH} levels")
        elif lead == ")":
            if not stack:
                if next(tokens, None) is not None:
                    raise _fail(where, path, index + 1,
                                "unexpected text after the end of the top-level list")
                return
            closed = current
            current = stack.pop()
            if not stack:
                yield closed
        else:
            if lead == '"':
                if len(tok) == 1:
                    raise _fail(where, path, index, "unterminated string")
                tok = tok[1:-1]
                if "\\" in tok:
                    tok = _unescape(tok)
            if stack:
                current.append(tok)
            else:
                yield tok
    line, col = where.line_column(len(text))
    raise BoardFileError(path, f"truncated: {len(stack) + 1} unclosed '(' at end of file",
                         line, col)


def _fail(locator: Locator, path: str | Path, index: int, message: str) -> BoardFileError:
    line, col = locator.of_token(index)
    return BoardFileError(path, message, line, col)
