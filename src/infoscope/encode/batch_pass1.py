"""Out-of-core pass 1: rounds of batch summaries, source queries, then each column's alphabet.

:class:`Pass1` asks for round 0, plans a radix selection (:class:`_Selection`)
for every binned column with more distinct values than its cap, asks for
selection rounds until every wanted order statistic is found, lists the
:class:`SourceQuery` facts only the source can give, and decides each column's
:class:`~infoscope.encode.batch_alphabet.Alphabet` by the in-memory encoder's
rules (:mod:`.levels`, :mod:`.numeric`, :mod:`.temporal`, :mod:`.encoder`).  The
two-pass design is described in :mod:`infoscope.encode.summaries`.
"""
from __future__ import annotations

import dataclasses
from collections.abc import Mapping

import numpy as np
import pandas as pd

from infoscope.encode import binning
from infoscope.encode.batch_alphabet import Alphabet
from infoscope.encode.batch_specs import ColumnSpec, OutOfCoreError, _from_keys, _keys, _time_unit
from infoscope.encode.batch_summaries import Request, Summary, _Column
from infoscope.encode.drafts import (
    HEAVY_TAIL_INDEX,
    HEAVY_TAIL_MIN_ROWS,
    ID_LIKE_MIN_ROWS,
    _format_numbers,
    _is_id_name,
    _Notes,
)
from infoscope.encode.encoded import MISSING_LABEL, OTHER_LABEL
from infoscope.encode.encoder import _column_flags
from infoscope.encode.levels import (
    _category_labels,
    _distinct_labels,
    _fold_message,
    _fold_room,
    _level_alphabet,
    _reserve,
)
from infoscope.encode.numeric import (
    _TAIL_PROBS,
    _id_like_rule,
    _infinite_note,
    _integer_bin_labels,
    _integer_edges,
    _integer_quantile_ranks,
    _outside_note,
    _tail_index_of,
    _value_edges,
)
from infoscope.encode.temporal import _time_bins, _time_texts

__all__ = ["SELECT_BUCKETS", "COLLECT_MAX", "SourceQuery", "Pass1"]

#: Sub-ranges a selection round splits each key range into (the first round: 2**16).
SELECT_BUCKETS = 1 << 12
_FIRST_BUCKETS = 1 << 16
#: A key range with at most this many values is collected (its values with counts).
COLLECT_MAX = 1 << 15


# ----------------------------------------------------------------------------- order statistics
class _Selection:
    """The exact order statistics of one column beyond the cap: radix selection over key ranges."""

    def __init__(self, lo_key: int, hi_key: int, ranks):
        self.wanted = sorted(set(int(r) for r in ranks))
        self.found: dict[int, int] = {}
        # open ranges: (lo, hi, rows below lo, ranks inside)
        self.open = [(lo_key, hi_key + 1, 0, list(self.wanted))]
        self.first = True
        self._sizes: dict = {}

    def ranges(self):
        out = []
        for lo, hi, _, _ in self.open:
            n_keys = hi - lo
            buckets = 0 if not self.first and self._small(lo, hi) else min(_FIRST_BUCKETS if self.first
                                                                          else SELECT_BUCKETS, n_keys)
            out.append((lo, hi, 0 if n_keys == 1 else buckets))
        return tuple(out)

    def _small(self, lo, hi):
        return self._sizes.get((lo, hi), COLLECT_MAX + 1) <= COLLECT_MAX

    def absorb(self, results, ranges) -> None:
        new_open = []
        sizes = {}
        for (lo, hi, below, ranks), (_, _, buckets), res in zip(self.open, ranges, results):
            if not buckets:
                keys, counts = res
                cum = np.cumsum(counts)
                for r in ranks:
                    self.found[r] = int(keys[int(np.searchsorted(cum, r - below, side="right"))])
                continue
            width = -(-(hi - lo) // buckets)
            cum = np.cumsum(res)
            by_bucket: dict[int, list] = {}
            for r in ranks:
                by_bucket.setdefault(int(np.searchsorted(cum, r - below, side="right")), []).append(r)
            for j, rs in sorted(by_bucket.items()):
                b_lo = lo + j * width
                b_hi = min(hi, b_lo + width)
                b_below = below + (int(cum[j - 1]) if j else 0)
                new_open.append((b_lo, b_hi, b_below, rs))
                sizes[(b_lo, b_hi)] = int(res[j])
        self.open = new_open
        self._sizes = sizes
        self.first = False

    @property
    def done(self) -> bool:
        return not self.open



@dataclasses.dataclass(frozen=True)
class SourceQuery:
    """A fact pass 1 asks of the source itself (one column at a time).

    ``kind="distinct"``: the exact number of distinct non-missing values (an int).
    ``kind="levels"``: the levels of a text column beyond the cap: answer with a
    dict ``{"n_distinct": int, "counts_of_counts": [(count, how many levels), ...],
    "top": [(label, count), ...]}`` where ``top`` holds at least every level whose
    count is at least that of the ``limit``-th most frequent level.
    """

    kind: str
    column: str
    limit: int = 0


class Pass1:
    """Pass 1 over a source: rounds of batch summaries, then each column's :class:`Alphabet`.

    Parameters
    ----------
    specs : mapping of str to ColumnSpec
        From :func:`column_specs`, in column order.

    Examples
    --------
    >>> import numpy as np, pandas as pd
    >>> from infoscope.encode import encode_column
    >>> from infoscope.encode.summaries import column_specs, merge, summarize
    >>> frame = pd.DataFrame({"x": np.random.default_rng(0).normal(size=1000)})
    >>> p = Pass1(column_specs(frame.dtypes, bins=8))
    >>> while (req := p.request()) is not None:
    ...     parts = [summarize(frame.iloc[i:i + 300], req) for i in range(0, 1000, 300)]
    ...     total = parts[0]
    ...     for part in parts[1:]:
    ...         total = merge(total, part, p.specs)
    ...     p.absorb(total)
    >>> a = p.alphabets()["x"]
    >>> bool(np.array_equal(a.edges, encode_column(frame["x"], name="x", bins=8, cache=False).edges))
    True
    """

    def __init__(self, specs: Mapping):
        self.specs = dict(specs)
        self._round = 0
        self._columns: dict[str, _Column] | None = None
        self._select: dict[str, _Selection] = {}
        self._ranges: dict = {}
        self._answers: dict = {}
        self._rows = 0

    def request(self) -> Request | None:
        """The next round's :class:`Request`, or None when pass 1 is complete (ask :meth:`queries`)."""
        if self._columns is None:
            return Request(0, tuple(self.specs.values()))
        todo = {name: sel for name, sel in self._select.items() if not sel.done}
        if not todo:
            return None
        self._ranges = {name: sel.ranges() for name, sel in todo.items()}
        return Request(self._round, tuple(self.specs[name] for name in todo), dict(self._ranges))

    def absorb(self, summary: Summary) -> None:
        """Take the merged summary of every row for the current request."""
        if summary.round != self._round:
            raise ValueError(f"Pass1.absorb: expected a summary of round {self._round}, got round {summary.round}")
        if self._round == 0:
            self._columns = dict(summary.columns)
            self._rows = summary.rows
            self._plan_selections()
        else:
            for name, results in summary.columns.items():
                self._select[name].absorb(results, self._ranges[name])
        self._round += 1

    @property
    def rows(self) -> int:
        """Rows summarised in round 0."""
        return self._rows

    def _plan_selections(self) -> None:
        for name, spec in self.specs.items():
            c = self._columns[name]
            if spec.family not in ("integer", "float", "datetime", "timedelta") or c.counts is not None:
                continue
            ranks = self._ranks(spec, c)
            if ranks:
                lo_key, hi_key = (int(k) for k in _keys(np.array([c.lo, c.hi], dtype=np.asarray(c.lo).dtype)))
                self._select[name] = _Selection(lo_key, hi_key, ranks)

    def _ranks(self, spec: ColumnSpec, c: _Column) -> list:
        n = c.n_valid
        explicit = isinstance(spec.bins, np.ndarray)
        bins = binning.rows_bin_count(n) if isinstance(spec.bins, str) else spec.bins
        ranks: list[int] = []
        probs = []
        if spec.family == "integer" and (binning.beyond_float(c.lo, c.hi) or (explicit and spec.bins.dtype.kind in "iu")):
            if not explicit and spec.strategy == "quantile" and c.hi != c.lo:
                ranks += _integer_quantile_ranks(n, bins)
        elif not explicit and spec.strategy == "quantile":
            probs.append(np.linspace(0.0, 1.0, bins + 1))
        if spec.family in ("integer", "float") and n >= HEAVY_TAIL_MIN_ROWS:
            probs.append(np.asarray(_TAIL_PROBS))
        if probs:
            prev_i, next_i, _ = binning.quantile_ranks(n, np.concatenate(probs))
            ranks += prev_i.tolist() + next_i.tolist()
        return ranks

    def queries(self) -> list:
        """The :class:`SourceQuery` list the source must answer (:meth:`answer`) before :meth:`alphabets`."""
        if self._columns is None or self.request() is not None:
            return []
        out = []
        for name, spec in self.specs.items():
            c = self._columns[name]
            if c.counts is not None or name in self._answers:
                continue
            if spec.family == "text":
                if spec.max_categories is None:
                    raise OutOfCoreError(
                        f"column {name!r}: more than {spec.cap:,} distinct values and max_categories=None; out "
                        "of core such a column must be folded: set max_categories, or profile a sample (sample=)")
                with_missing = spec.missing == "category" and c.n_missing > 0
                out.append(SourceQuery("levels", name, _fold_room(name, spec.max_categories, with_missing)))
            elif spec.family in ("integer", "float") and self._needs_distinct(spec, c):
                out.append(SourceQuery("distinct", name))
        return out

    def _needs_distinct(self, spec: ColumnSpec, c: _Column) -> bool:
        integral = spec.family == "integer" or c.whole
        if not integral or c.increasing or c.decreasing or c.n_valid < ID_LIKE_MIN_ROWS:
            return False
        span = (int(c.hi) - int(c.lo) + 1) if spec.family == "integer" else float(c.hi) - float(c.lo) + 1
        return _is_id_name(spec.name) or span <= 2 * c.n_valid

    def answer(self, query: SourceQuery, result) -> None:
        """Record the source's answer to one :class:`SourceQuery`."""
        self._answers[query.column] = result

    def alphabets(self) -> dict:
        """Every column's :class:`Alphabet`, in column order.

        Raises
        ------
        RuntimeError
            Rounds or source queries are still open.
        """
        if self.request() is not None:
            raise RuntimeError("Pass1.alphabets: rounds are still open (call request / absorb until None)")
        missing = [q for q in self.queries() if q.column not in self._answers]
        if missing:
            raise RuntimeError(f"Pass1.alphabets: the source has not answered {missing}")
        return {name: self._alphabet(spec) for name, spec in self.specs.items()}

    # ------------------------------------------------------------------ decisions
    def _stat(self, name: str, c: _Column, dtype):
        """``at(ranks) -> values`` (the column's dtype) of the order statistics of a column."""
        if c.counts is not None:
            values, cum = c.counts.values, np.cumsum(c.counts.counts)

            def at(ranks):
                return values[np.searchsorted(cum, np.asarray(ranks, dtype=np.int64), side="right")]
            return at
        found = self._select[name].found if name in self._select else {}

        def at(ranks):
            keys = np.array([found[int(r)] for r in np.asarray(ranks).ravel()], dtype=np.uint64)
            return _from_keys(keys, np.dtype(dtype)).reshape(np.shape(ranks))
        return at

    def _alphabet(self, spec: ColumnSpec) -> Alphabet:
        c = self._columns[spec.name]
        notes = _Notes(spec.name)
        exact = True
        fam = spec.family
        if fam in ("boolean", "categorical", "text"):
            kind, k, labels, level_counts, n_distinct, mapping = self._levels(spec, c, notes)
            edges = None
        elif fam in ("integer", "float"):
            kind, k, labels, edges, level_counts, n_distinct, exact, mapping = self._numeric(spec, c, notes)
        else:
            kind, k, labels, edges, level_counts, n_distinct, exact, mapping = self._temporal(spec, c, notes)
        flags = _column_flags(notes.flags, kind, c.n, c.n_missing, n_distinct)
        if isinstance(edges, np.ndarray):
            edges.setflags(write=False)
        return Alphabet(spec.name, kind, int(k), tuple(labels), edges, flags, c.n, c.n_missing, int(n_distinct),
                        level_counts, spec.settings, exact, tuple(notes.messages), spec, mapping)

    def _finish_levels(self, spec, c, labels, counts, natural, notes, values):
        new_index, k, out_labels, level_counts = _level_alphabet(labels, counts, natural, c.n_missing, notes,
                                                                 spec.missing, spec.max_categories)
        return k, out_labels, level_counts, new_index

    def _levels(self, spec: ColumnSpec, c: _Column, notes: _Notes):
        if spec.family == "boolean":
            counts = c.counts.counts
            k, labels, lc, new_index = self._finish_levels(spec, c, ["False", "True"], counts, True, notes, None)
            return "boolean", k, labels, lc, int(np.count_nonzero(counts)), ("index", new_index)
        if spec.family == "categorical":
            cat_labels = _category_labels(spec.categories.categories, notes)
            counts = c.counts.counts
            k, labels, lc, new_index = self._finish_levels(spec, c, cat_labels, counts, bool(spec.categories.ordered),
                                                           notes, None)
            return "categorical", k, labels, lc, int(np.count_nonzero(counts)), ("index", new_index)
        if c.counts is not None:
            values, counts = c.counts.values, c.counts.counts
            k, labels, lc, new_index = self._finish_levels(spec, c, values, counts, False, notes, values)
            return "text", k, labels, lc, int(values.size), ("labels", pd.Index(values, dtype=object),
                                                            new_index[:-1], None)
        return self._text_beyond_cap(spec, c, notes)

    def _text_beyond_cap(self, spec: ColumnSpec, c: _Column, notes: _Notes):
        ans = self._answers[spec.name]
        n_distinct = int(ans["n_distinct"])
        with_missing = spec.missing == "category" and c.n_missing > 0
        room = _fold_room(spec.name, spec.max_categories, with_missing)
        top = [(str(label), int(count)) for label, count in ans["top"]]
        # the encoder's order: most frequent first, ties in label order (the labels as shown)
        ranked = sorted(top, key=lambda t: (-t[1], _reserve(t[0])))
        kept = ranked[:room]
        if len(kept) < room or n_distinct + with_missing <= spec.max_categories:
            raise OutOfCoreError(f"column {spec.name!r}: the source's level counts are incomplete "
                                 f"({len(top)} levels for {n_distinct} distinct values)")
        rows_folded = c.n_valid - sum(count for _, count in kept)
        notes.flags.add("levels_folded")
        notes.warn(_fold_message(n_distinct - room, n_distinct, rows_folded, spec.max_categories))
        out_labels = [_reserve(label) for label, _ in kept] + [OTHER_LABEL]
        if with_missing:
            out_labels.append(MISSING_LABEL)
        cc = sorted(((int(a), int(b)) for a, b in ans["counts_of_counts"]), reverse=True)
        level_counts = np.repeat(np.array([a for a, _ in cc], dtype=np.int64), [b for _, b in cc])
        level_counts.setflags(write=False)
        labels = _distinct_labels(out_labels)
        index = pd.Index([label for label, _ in kept], dtype=object)
        return ("text", len(labels), labels, level_counts, n_distinct,
                ("labels", index, np.arange(room, dtype=np.int64), room))

    def _numeric(self, spec: ColumnSpec, c: _Column, notes: _Notes):
        n_valid = c.n_valid
        if c.n_pos_inf + c.n_neg_inf:
            _infinite_note(notes, c.n_pos_inf + c.n_neg_inf, c.n_pos_inf)
        bins = spec.bins
        explicit = isinstance(bins, np.ndarray)
        if explicit and bins.dtype.kind in "mM":
            raise TypeError(f"column {spec.name!r}: datetime bin edges cannot bin a numeric column")
        dtype = spec.dtype if spec.family == "integer" else np.dtype(np.float64)
        known = c.counts is not None
        exact = True
        if known:
            n_distinct = int(c.counts.values.size)
        elif c.increasing or c.decreasing:
            n_distinct = n_valid  # strictly monotone: every value differs
        elif spec.name in self._answers:
            n_distinct = int(self._answers[spec.name])
        else:
            n_distinct, exact = self.specs[spec.name].cap + 1, False
        integral = spec.family == "integer" or (n_valid > 0 and c.whole)
        if integral and n_distinct and _id_like_rule(n_valid, n_distinct, c.lo, c.hi,
                                                     c.increasing or c.decreasing, spec.name):
            notes.flags.add("id_like")
        if n_distinct == 0 or (not explicit and integral and n_distinct <= spec.threshold):
            values, counts = c.counts.values, c.counts.counts
            labels = _format_numbers(values) if n_distinct else []
            kind = "integer_categories" if n_distinct else "numeric"
            k, out_labels, lc, new_index = self._finish_levels(spec, c, labels, counts, True, notes, values)
            return kind, k, out_labels, None, lc, n_distinct, True, ("sorted", values, new_index[:-1])
        n_bins = binning.rows_bin_count(n_valid) if isinstance(bins, str) else bins
        at = self._stat(spec.name, c, dtype)
        tail = n_valid >= HEAVY_TAIL_MIN_ROWS
        if spec.family == "integer" and (binning.beyond_float(c.lo, c.hi) or (explicit and bins.dtype.kind in "iu")):
            origin, edges_off = _integer_edges(n_valid, int(c.lo), int(c.hi), lambda i: int(at([i])[0]), n_bins,
                                               spec.strategy, notes, c.outside)
            if tail:
                prev_i, next_i, gamma = binning.quantile_ranks(n_valid, _TAIL_PROBS)
                a = np.array([float(int(x) - origin) for x in at(prev_i)])
                b = np.array([float(int(x) - origin) for x in at(next_i)])
                if _tail_index_of(*binning.lerp_quantiles(a, b, gamma)) > HEAVY_TAIL_INDEX:
                    notes.flags.add("heavy_tail")
            edges, labels = _integer_bin_labels(origin, edges_off, bins, dtype)
            k = len(labels)
            labels, k, kind = self._bin_missing(spec, c, labels)
            return "numeric", k, labels, edges, None, n_distinct, exact, ("offsets", origin, edges_off)
        edges = _value_edges(c.counts.values, n_valid, n_bins, spec.strategy) if (not explicit and known) else None
        lo, hi = np.asarray(c.lo, dtype=dtype)[()], np.asarray(c.hi, dtype=dtype)[()]
        if edges is None:
            if explicit:
                edges = bins.astype(np.float64)
            else:
                def quantile(probs):
                    prev_i, next_i, gamma = binning.quantile_ranks(n_valid, probs)
                    return binning.lerp_quantiles(at(prev_i), at(next_i), gamma)
                edges, note = binning._edges(np.array([lo, hi], dtype=dtype), n_bins, spec.strategy,
                                             quantile=quantile, lo_hi=(lo, hi))
                if note is not None:
                    notes.warn(note)
        if explicit:
            _outside_note(notes, c.outside, f"{edges[0]:g}", f"{edges[-1]:g}")
        if tail:
            prev_i, next_i, gamma = binning.quantile_ranks(n_valid, _TAIL_PROBS)
            if _tail_index_of(*binning.lerp_quantiles(at(prev_i), at(next_i), gamma)) > HEAVY_TAIL_INDEX:
                notes.flags.add("heavy_tail")
        labels = list(binning.interval_labels(binning.format_edges(edges)))
        labels, k, _ = self._bin_missing(spec, c, labels)
        return "numeric", k, labels, np.asarray(edges, dtype=np.float64), None, n_distinct, exact, ("edges", edges)

    @staticmethod
    def _bin_missing(spec, c, labels):
        labels = list(labels)
        if spec.missing == "category" and c.n_missing:
            labels.append(MISSING_LABEL)
        return _distinct_labels(labels), len(labels), "numeric"

    def _temporal(self, spec: ColumnSpec, c: _Column, notes: _Notes):
        kind = spec.family
        unit = _time_unit(spec)
        tz = getattr(spec.dtype, "tz", None)
        bins = spec.bins
        explicit = isinstance(bins, np.ndarray)
        known = c.counts is not None
        n_distinct, exact = (int(c.counts.values.size), True) if known else (spec.cap + 1, False)
        if known and (n_distinct <= 1 or (not explicit and n_distinct <= spec.threshold)):
            values, counts = c.counts.values, c.counts.counts
            labels = _time_texts(values, unit, kind, tz)
            k, out_labels, lc, new_index = self._finish_levels(spec, c, labels, counts, True, notes, values)
            return kind, k, out_labels, None, lc, n_distinct, True, ("sorted", values, new_index[:-1])
        n_bins = binning.rows_bin_count(c.n_valid) if isinstance(bins, str) else bins
        at = self._stat(spec.name, c, np.int64)

        def quantile(probs):
            prev_i, next_i, gamma = binning.quantile_ranks(c.n_valid, probs)
            return binning.lerp_quantiles(at(prev_i), at(next_i), gamma)
        ends = np.array([c.lo, c.hi], dtype=np.int64)
        edges, labels, edge_arr = _time_bins(int(c.lo), int(c.hi), ends, n_bins, spec.strategy, notes, unit, kind,
                                             tz, c.outside, quantile=quantile)
        labels, k, _ = self._bin_missing(spec, c, labels)
        return kind, k, labels, edge_arr, None, n_distinct, exact, ("edges", edges)

