"""Free-text checks at the input boundary (Unicode categories per the Unicode Character
Database, read through Python's unicodedata)."""

import pytest

from rfcheck.text import for_terminal, shorten, text_problem


@pytest.mark.parametrize("ch", ["\x00", "\x01", "\x0b", "\t", "\x1b", "\x7f", "\x85",
                                "\u2028", "\u2029", "\ufeff", "\u202e", "\u2066", "\u200d",
                                "\ue000"])
def test_control_and_format_characters_are_refused(ch):
    msg = text_problem(f"Bench{ch}reactor")
    assert msg is not None and f"U+{ord(ch):04X}" in msg and "position 6" in msg


def test_printable_text_in_any_script_is_accepted():
    for ok in ("Bench ECR reactor", "Réacteur d'essai", "試験炉 2", "Ω-probe ± 2 %"):
        assert text_problem(ok) is None


def test_newlines_only_where_the_field_allows_them():
    assert text_problem("line one\nline two") is not None
    assert text_problem("line one\nline two", allow_newlines=True) is None


def test_length_limit_names_both_lengths():
    assert text_problem("x" * 10, max_length=10) is None
    msg = text_problem("x" * 11, max_length=10)
    assert "11 characters" in msg and "at most 10" in msg


def test_terminal_escaping_leaves_no_escape_sequence():
    shown = for_terminal("name\x1b[2J\u202eevil\nnext")
    assert "\x1b" not in shown and "\u202e" not in shown
    assert shown == "name\\x1b[2J\\u202eevil\nnext"


def test_shorten():
    assert shorten("abc", 5) == "abc"
    assert shorten("abcdefgh", 5) == "abcd…"
