"""infoscope.frame: tidy pandas results and ``ProfileSession`` (the accessor is :mod:`infoscope.accessor`).

Names are imported lazily (PEP 562) so that registering the accessor at
``import infoscope`` stays cheap.
"""
from __future__ import annotations

import importlib

_PUBLIC = {
    "ProfileSession": "infoscope.frame.session",
    "PairTable": "infoscope.frame.results",
    "session_for": "infoscope.frame.sessions",
    "drift_table": "infoscope.frame.drift",
}
__all__ = sorted(_PUBLIC)


def __getattr__(name: str):
    module_name = _PUBLIC.get(name)
    if module_name is None:
        raise AttributeError(f"module 'infoscope.frame' has no attribute {name!r}")
    value = getattr(importlib.import_module(module_name), name)
    globals()[name] = value
    return value


def __dir__():
    return __all__
