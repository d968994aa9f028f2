"""The one import of numba in infoscope.

While numba compiles, it formats its internal typing messages with colorama, and
colorama's ``init()``/``deinit()`` replace ``sys.stdout`` and ``sys.stderr`` for the
whole process.  infoscope compiles its kernels on background threads, so a stream
that the main thread puts in place meanwhile (a doctest, a notebook's output
capture, a test runner) would be swapped back to the old one under it.  numba's
switch ``NUMBA_DISABLE_ERROR_MESSAGE_HIGHLIGHTING`` turns that colouring off; numba
reads it at its first import, so it is set here (unless the user set it) before
that import.  If numba was imported before infoscope, its setting stands.
"""
from __future__ import annotations

import os

os.environ.setdefault("NUMBA_DISABLE_ERROR_MESSAGE_HIGHLIGHTING", "1")

import numba  # noqa: E402  (after the switch above)
from numba import njit, prange, uint64  # noqa: E402

__all__ = ["njit", "numba", "prange", "uint64"]
