"""Out-of-core encoding: mergeable summaries of row batches decide each column's alphabet.

The in-memory encoder (:func:`~infoscope.encode.encode_column`) decides a column's
alphabet from all its values at once.  A table that does not fit in memory is read
in row batches instead, twice:

* **pass 1** summarises every batch (:func:`summarize`), adds the summaries up
  (:func:`merge`: associative, so partitions of a cluster can be reduced in a tree;
  not commutative, ``merge(a, b)`` means a's rows come before b's) and decides each
  column's :class:`Alphabet` from the total (:class:`Pass1`) by the encoder's own
  rules (:mod:`.levels`, :mod:`.numeric`, :mod:`.temporal`, :mod:`.encoder` expose
  them as functions of counts);
* **pass 2** turns every batch into codes with the fixed alphabets
  (:func:`encode_batch`), which the engine counts chunk by chunk.

What a summary holds per column: rows, missing rows, infinities, the range, the
whole-number test, strict monotonicity in row order (the ID-like rule) and the
exact value counts while the column has at most :data:`LEVEL_CAP` distinct
values.  A binned column with more distinct values gets its quantile edges from
exact order statistics found by a radix selection over the order-preserving
integer keys of its values: each further round counts the values of the key
ranges that hold a wanted rank in :data:`SELECT_BUCKETS` sub-ranges, until a range
is small enough to collect its values (:data:`COLLECT_MAX`).  The order statistics
are exact, so the edges are numpy's to the bit (:func:`~infoscope.encode.binning.lerp_quantiles`).

Two facts need the whole column and come from the source itself (a
:class:`SourceQuery`, e.g. a DuckDB ``GROUP BY``): the levels of a text column
with more than :data:`LEVEL_CAP` distinct values (the kept levels, the distinct
count and the counts of counts), and the exact distinct count of a whole-number
column beyond the cap when the ID-like rule depends on it.  Otherwise the distinct
count of a binned column beyond the cap is not counted: ``n_distinct`` then holds
the lower bound ``LEVEL_CAP + 1`` and :attr:`Alphabet.n_distinct_exact` is False
(no table, flag or label depends on it).

The parts, by subject: :mod:`.batch_specs` (column specs, a batch's values),
:mod:`.batch_summaries` (:func:`summarize`, :func:`merge`), :mod:`.batch_pass1`
(the rounds, the source queries and the alphabet decisions of :class:`Pass1`) and
:mod:`.batch_alphabet` (:class:`Alphabet`, :func:`encode_batch`).  This module is
the home of their public names: import them from here.
"""
from __future__ import annotations

from infoscope.encode.batch_alphabet import Alphabet, encode_batch
from infoscope.encode.batch_pass1 import COLLECT_MAX, SELECT_BUCKETS, Pass1, SourceQuery
from infoscope.encode.batch_specs import FAMILIES, LEVEL_CAP, ColumnSpec, OutOfCoreError, column_specs, family_of
from infoscope.encode.batch_summaries import Request, Summary, merge, summarize

__all__ = [
    "LEVEL_CAP", "SELECT_BUCKETS", "COLLECT_MAX", "FAMILIES", "ColumnSpec", "column_specs", "Request",
    "Summary", "summarize", "merge", "SourceQuery", "Pass1", "Alphabet", "encode_batch", "family_of",
    "OutOfCoreError",
]
