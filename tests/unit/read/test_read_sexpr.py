"""The s-expression tokenizer: valid and invalid corpora, exact positions,
and a cross-check against sexpdata (a general-purpose PyPI s-expression
parser) on every format fixture."""

from __future__ import annotations

import pytest
import sexpdata
from conftest import FORMATS, VERSION_KEYS
from hypothesis import given, settings
from hypothesis import strategies as st

from auditor.errors import BoardFileError
from auditor.read.sexpr import MAX_DEPTH, Node, decode, parse

VALID = [
    ("(a)", ["a"]),
    ('(a "b c" d)', ["a", "b c", "d"]),
    ('(layer F.Cu)', ["layer", "F.Cu"]),
    ('(layer "F.Cu")', ["layer", "F.Cu"]),  # bare == quoted (kicad-format.md §1)
    ('(s "say \\"hi\\"" "back\\\\slash")', ["s", 'say "hi"', "back\\slash"]),
    ('(s "")', ["s", ""]),
    ("(rect_delta 1 0 )", ["rect_delta", "1", "0"]),  # sloppy KiCad 5 spacing
    ("(a\t(b\n1)\r\n(c))", ["a", ["b", "1"], ["c"]]),
    ('(net 4 "/sense/SLIDER{slash}A")', ["net", "4", "/sense/SLIDER{slash}A"]),
    ("(u \"µm ε\")", ["u", "µm ε"]),
]


@pytest.mark.parametrize(("text", "expected"), VALID)
def test_valid_corpus(text: str, expected: list[object]) -> None:
    assert parse(text) == expected


# (text, message fragment, line, column): positions are 1-based and hand-counted.
INVALID = [
    ("", "empty file", None, None),
    ("   \n  ", "empty file", None, None),
    ("kicad_pcb", "not an s-expression", 1, 1),
    ("(a (b)", "truncated", 1, 7),
    ("(a\n (b 1)\n", "truncated", 3, 1),
    ("(a))", "after the end", 1, 4),
    ("(a) (b)", "after the end", 1, 5),
    ('(a\n  "open)', "unterminated string", 2, 3),
    ("(a \x00)", "binary content", 1, 4),
    ("(a\n (b \x07))", "binary content", 2, 5),
]


@pytest.mark.parametrize(("text", "fragment", "line", "column"), INVALID)
def test_invalid_corpus_positions(text: str, fragment: str, line: int | None,
                                  column: int | None) -> None:
    with pytest.raises(BoardFileError) as info:
        parse(text, "x.kicad_pcb")
    err = info.value
    assert fragment in err.message
    assert (err.line, err.column) == (line, column)
    assert str(err).startswith("x.kicad_pcb")


def test_not_utf8_names_byte_and_position() -> None:
    with pytest.raises(BoardFileError) as info:
        decode(b"(a\n  (b \xff))", "x.kicad_pcb")
    assert (info.value.line, info.value.column) == (2, 6)
    assert "0xff" in info.value.message


def test_bom_is_dropped() -> None:
    assert decode("\ufeff(a)".encode(), "x") == "(a)"


def test_million_deep_nesting_is_an_error_not_recursion() -> None:
    text = "(" * 1_000_000 + ")" * 1_000_000
    with pytest.raises(BoardFileError) as info:
        parse(text)
    assert str(MAX_DEPTH) in info.value.message
    assert (info.value.line, info.value.column) == (1, MAX_DEPTH + 2)


def test_depth_up_to_the_limit_parses() -> None:
    deep = parse("(" * MAX_DEPTH + ")" * MAX_DEPTH)
    depth = 0
    node: object = deep
    while isinstance(node, Node) and node:
        node = node[0]
        depth += 1
    assert depth == MAX_DEPTH - 1


def test_nodes_remember_their_token() -> None:
    tree = parse("(a (b) (c (d)))")
    assert [tree.token, tree[1].token, tree[2].token, tree[2][1].token] == [0, 2, 5, 7]


def _normalised(item: object) -> object:
    """sexpdata's tree with atoms as text (it turns numbers into int/float and
    bare words into Symbol; ours keeps text for both)."""
    if isinstance(item, list):
        return [_normalised(x) for x in item]
    if isinstance(item, sexpdata.Symbol):
        return str(item)
    if isinstance(item, bool):
        return "t" if item else "nil"
    return item


def _ours_as_sexpdata(item: object, reference: object) -> object:
    if isinstance(item, list) and isinstance(reference, list):
        return [_ours_as_sexpdata(a, b) for a, b in zip(item, reference, strict=True)]
    if isinstance(reference, int | float) and isinstance(item, str):
        return type(reference)(item)
    return item


@pytest.mark.parametrize("key", VERSION_KEYS)
def test_tree_matches_sexpdata_on_fixtures(key: str) -> None:
    text = (FORMATS / f"{key}.kicad_pcb").read_text(encoding="utf-8")
    reference = _normalised(sexpdata.loads(text, true=None, false=None))
    ours = parse(text)
    assert _ours_as_sexpdata(ours, reference) == reference


def test_tokens_in_small_runs_match_one_run(monkeypatch: pytest.MonkeyPatch) -> None:
    import auditor.read.sexpr as sexpr

    text = (FORMATS / "v8.kicad_pcb").read_text(encoding="utf-8")
    text = text.replace('"All_Pad_Shapes"', '"All\nPad\nShapes"', 1)  # raw newlines in a string
    whole = parse(text)
    monkeypatch.setattr(sexpr, "CHUNK_CHARS", 7)
    assert parse(text) == whole
    with pytest.raises(BoardFileError, match="unterminated"):
        parse(text[:200] + '"' + text[200:])


_WORDS = st.text(alphabet="abcXYZ_.:*&+", min_size=1, max_size=6)
_STRINGS = st.text(alphabet='ab ()"\\\tµ', max_size=6)
_TREES = st.recursive(
    st.one_of(_WORDS.map(lambda w: ("sym", w)), _STRINGS.map(lambda s: ("str", s))),
    lambda inner: st.lists(inner, max_size=5).map(lambda items: ("list", items)),
    max_leaves=40)


def _write(tree: tuple[str, object]) -> str:
    kind, value = tree
    if kind == "sym":
        return str(value)
    if kind == "str":
        return '"' + str(value).replace("\\", "\\\\").replace('"', '\\"') + '"'
    return "(" + " ".join(_write(t) for t in value) + ")"  # type: ignore[attr-defined]


@pytest.mark.slow
@settings(max_examples=150, deadline=None)
@given(st.lists(_TREES, max_size=6))
def test_random_trees_parse_like_sexpdata(items: list[tuple[str, object]]) -> None:
    """Property: on any well-formed text, our tree equals sexpdata's (the
    PyPI reference parser) with atoms as text."""
    text = "(root " + " ".join(_write(t) for t in items) + ")"
    reference = _normalised(sexpdata.loads(text, true=None, false=None))
    assert parse(text) == reference
