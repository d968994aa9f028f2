"""The result tables of a :class:`~infoscope.frame.session.ProfileSession`, one module each.

Each module holds one part of the session class (a mixin that
:class:`~infoscope.frame.session.ProfileSession` inherits): :mod:`.entropy`
(``entropy()``), :mod:`.pairs` (``pairs()``, ``matrix()``, ``pair()`` and the pair
cache), :mod:`.relevance` (``relevance()``), :mod:`.drift` (``drift()``, the session
side of :mod:`infoscope.frame.drift`) and :mod:`.estimates` (MI, NMI and the
G-test of many count tables at once, shared by pairs and relevance).  The mixins
read the session's state (``_settings``, ``_encoded``, ``_engine``, the caches);
they are not meant to be used on their own.
"""
