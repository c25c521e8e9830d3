"""The paragraph-markup escape, checked against the standard library's XML escape."""

from __future__ import annotations

import subprocess
import sys
from xml.sax.saxutils import escape as stdlib_escape

from hypothesis import given
from hypothesis import strategies as st

from airway.markup import escape


@given(st.text())
def test_escape_equals_the_standard_library(text: str) -> None:
    # Reference: Python's xml.sax.saxutils.escape (the same three entities, & first).
    assert escape(text) == stdlib_escape(text)


def test_hostile_name_escapes_once() -> None:
    assert escape("A<B & Co> &amp;") == "A&lt;B &amp; Co&gt; &amp;amp;"


def test_pdf_renderers_do_not_import_the_url_libraries() -> None:
    # Start-up: the PDF path must not pay for urllib/http (about 15 ms measured).
    code = (
        "import sys, airway.cli, airway.render_pdf, airway.render_sheets, "
        "airway.render_summary, airway.render_board; "
        "print('urllib.request' in sys.modules or 'http.client' in sys.modules)"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"
