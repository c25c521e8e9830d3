"""Escaping text for reportlab's paragraph markup.

Every piece of text from the user or the plan goes through `escape` before it is
set in a Paragraph, so a name such as "A<B & Co" prints as written. Written here
rather than taken from ``xml.sax.saxutils``, whose import pulls in the URL and
HTTP libraries and costs about 15 ms at every start of a PDF command.
"""

from __future__ import annotations


def escape(text: str) -> str:
    """Escape &, < and > (in that order, so an escaped & is not escaped twice)."""
    return text.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")
