"""infoscope.frame: tidy pandas results, ``ProfileSession`` and the ``df.info_profile`` accessor.

Names are imported lazily (PEP 562) so that registering the accessor at
``import infoscope`` stays cheap.
"""
from __future__ import annotations

import importlib

_PUBLIC = {
    "ProfileSession": "infoscope.frame.session",
    "PairTable": "infoscope.frame.results",
    "InfoProfileAccessor": "infoscope.frame.accessor",
    "session_for": "infoscope.frame.accessor",
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
