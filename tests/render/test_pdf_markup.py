"""The paragraph-markup escape, checked against the standard library's XML escape."""

from __future__ import annotations

from xml.sax.saxutils import escape as stdlib_escape

from hypothesis import given
from hypothesis import strategies as st

from airway.render.pdf.markup import escape


@given(st.text())
def test_escape_equals_the_standard_library(text: str) -> None:
    # Reference: Python's xml.sax.saxutils.escape (the same three entities, & first).
    assert escape(text) == stdlib_escape(text)


def test_hostile_name_escapes_once() -> None:
    assert escape("A<B & Co> &amp;") == "A&lt;B &amp; Co&gt; &amp;amp;"
