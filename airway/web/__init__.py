"""``airway serve``: the clinic and the ward in a web browser, on the same engine.

Imported only by the ``serve`` command: the command line's start-up never loads
the web stack (tests/test_layering.py).
"""
