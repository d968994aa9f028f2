"""Waiting for a page to reach a state, instead of sleeping a fixed time and hoping.

A fixed ``page.wait_for_timeout(150)`` followed by an assertion passes on a quiet
machine and fails on a loaded one (the CI machines are shared).  ``eventually``
polls a JavaScript expression until it equals the expected value, with a generous
limit; on time-out it fails with the value last seen, so the check is as strict as
the assertion it replaces and independent of the machine's speed.
"""
from __future__ import annotations

from playwright.sync_api import Error as PlaywrightError

#: How long a state may take to appear on a loaded machine (milliseconds).
PATIENCE_MS = 20_000


def eventually(page, expression: str, expected, *, arg=None, message: str = "", timeout: int = PATIENCE_MS) -> None:
    """Wait until the JavaScript ``expression`` (a function body's value) equals ``expected``.

    ``expression`` is evaluated as ``(arg) => (expression)``; values are compared as JSON.
    """
    # both sides serialised by the browser's JSON.stringify (Python's json.dumps spaces
    # and escapes differently, so a non-empty list would never match)
    probe = ("(box) => { const arg = box.arg; "
             f"return JSON.stringify(({expression})) === JSON.stringify(box.expected); }}")
    try:
        page.wait_for_function(probe, arg={"arg": arg, "expected": expected}, timeout=timeout)
    except PlaywrightError:
        seen = page.evaluate(f"(arg) => ({expression})", arg)
        raise AssertionError(f"{message or expression}: expected {expected!r}, still {seen!r} "
                             f"after {timeout / 1000:.0f} s") from None
