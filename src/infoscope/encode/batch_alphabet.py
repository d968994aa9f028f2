"""Out-of-core alphabets: a column's fixed alphabet and pass 2, the codes of a row batch under it.

An :class:`Alphabet` (decided by :class:`~infoscope.encode.batch_pass1.Pass1`)
carries the fields of an :class:`~infoscope.encode.EncodedColumn` and how to
code values with them; :func:`encode_batch` gives the codes the in-memory encoder
gives the same rows.  The two-pass design is described in
:mod:`infoscope.encode.summaries`.
"""
from __future__ import annotations

import dataclasses
from collections.abc import Sequence

import numpy as np
import pandas as pd

from infoscope.encode import binning
from infoscope.encode.batch_specs import ColumnSpec, OutOfCoreError, _instants, _numbers, _same_family
from infoscope.encode.encoded import EncodedColumn, MISSING_LABEL, codes_dtype

__all__ = ["Alphabet", "encode_batch"]


@dataclasses.dataclass(frozen=True, eq=False)
class Alphabet:
    """A column's fixed alphabet and how to code a batch with it (picklable).

    Attributes
    ----------
    name, kind, k, labels, edges, flags, n, n_missing, n_distinct, level_counts, settings
        As in :class:`~infoscope.encode.EncodedColumn`.
    n_distinct_exact : bool
        False when ``n_distinct`` is the lower bound ``LEVEL_CAP + 1`` of a binned
        column whose distinct values were not counted (nothing depends on it).
    messages : tuple of str
        The warnings the in-memory encoder would give, naming the column.
    spec : ColumnSpec
    mapping : tuple
        How :func:`encode_batch` codes values: ``("sorted", values, new_index)``,
        ``("edges", edges)``, ``("offsets", origin, edge_offsets)``,
        ``("labels", kept labels, other_code)``, ``("index", new_index)``.
    """

    name: str
    kind: str
    k: int
    labels: tuple
    edges: np.ndarray | None
    flags: tuple
    n: int
    n_missing: int
    n_distinct: int
    level_counts: np.ndarray | None
    settings: tuple
    n_distinct_exact: bool
    messages: tuple
    spec: ColumnSpec
    mapping: tuple

    @property
    def missing_code(self) -> int:
        """Code of a missing row: ``k`` under ``missing="drop"``, else the ``"(missing)"`` symbol (or ``k``)."""
        if self.spec.missing == "category" and self.n_missing and self.labels and self.labels[-1] == MISSING_LABEL:
            return self.k - 1
        return self.k

    def column(self) -> EncodedColumn:
        """The :class:`~infoscope.encode.EncodedColumn` of this alphabet, without codes (an empty array)."""
        return EncodedColumn(
            name=self.name, codes=np.zeros(0, dtype=codes_dtype(self.k)), k=self.k, labels=self.labels,
            kind=self.kind, n=self.n, n_missing=self.n_missing, edges=self.edges, flags=self.flags,
            settings=self.settings, n_distinct=self.n_distinct, level_counts=self.level_counts)



# ----------------------------------------------------------------------------- pass 2
def _code_values(a: Alphabet, v: np.ndarray) -> np.ndarray:
    how = a.mapping[0]
    if how == "edges":
        return binning.assign_bins(v, a.mapping[1])
    if how == "offsets":
        origin, edges_off = a.mapping[1], a.mapping[2]
        return np.searchsorted(edges_off[1:-1], v.astype(np.uint64) - np.uint64(origin % 2**64), side="right")
    values, new_index = a.mapping[1], a.mapping[2]
    if v.size == 0:
        return np.zeros(0, dtype=np.int64)
    idx = np.searchsorted(values, v)
    idx = np.minimum(idx, max(values.size - 1, 0))
    if values.size == 0 or not np.array_equal(values[idx], v):
        raise OutOfCoreError(f"column {a.name!r}: a value was not seen in pass 1; did the source change "
                             "between the two passes?")
    return new_index[idx]


def encode_batch(batch: pd.DataFrame, alphabets: Sequence[Alphabet]) -> list:
    """Pass 2: the codes of one row batch under fixed alphabets.

    Parameters
    ----------
    batch : pandas.DataFrame
        Rows holding every alphabet's column (by key), with the planned dtypes.
    alphabets : sequence of Alphabet
        From :meth:`Pass1.alphabets`, in the order the codes are wanted.

    Returns
    -------
    list of numpy.ndarray
        One code array per alphabet (``0 .. k-1``; ``k`` for a missing row under
        ``missing="drop"``), dtype :func:`~infoscope.encode.codes_dtype` of ``k``:
        the codes the in-memory encoder gives these rows.

    Raises
    ------
    OutOfCoreError
        A column missing from the batch, another type, or a value pass 1 did not see.

    Examples
    --------
    >>> import pandas as pd
    >>> from infoscope.encode.summaries import Pass1, column_specs, summarize
    >>> frame = pd.DataFrame({"c": ["a", "b", "a", None]})
    >>> p = Pass1(column_specs(frame.dtypes))
    >>> p.absorb(summarize(frame, p.request()))
    >>> encode_batch(frame, [p.alphabets()["c"]])[0].tolist()
    [0, 1, 0, 2]
    """
    out = []
    for a in alphabets:
        spec = a.spec
        if spec.name not in batch.columns:
            raise OutOfCoreError(f"column {spec.name!r}: not in this part of the source")
        series = batch[spec.name]
        _same_family(series, spec)
        n = len(series)
        missing_code = a.missing_code
        dtype = codes_dtype(a.k)
        how = a.mapping[0]
        if how == "index":
            if spec.family == "boolean":
                na = series.isna().to_numpy(dtype=bool)
                raw = series.to_numpy(dtype=bool, na_value=False).astype(np.intp)
            else:
                raw = series.cat.codes.to_numpy().astype(np.intp)
                na = raw < 0
            new_index = a.mapping[1]
            codes = new_index.astype(dtype)[np.where(na, new_index.size - 1, raw)]
            out.append(np.ascontiguousarray(codes))
            continue
        if how == "labels":
            index, new_index, other = a.mapping[1], a.mapping[2], a.mapping[3]
            if isinstance(series.dtype, pd.CategoricalDtype):
                cats = index.get_indexer(series.cat.categories.to_numpy(dtype=object))
                raw_codes = series.cat.codes.to_numpy()
                na = raw_codes < 0
                idx = np.where(na, -1, cats[np.maximum(raw_codes, 0)]) if cats.size else np.full(n, -1)
            else:
                na = series.isna().to_numpy(dtype=bool)
                idx = index.get_indexer(series.to_numpy(dtype=object))
            unknown = (idx < 0) & ~na
            if unknown.any() and other is None:
                raise OutOfCoreError(f"column {spec.name!r}: a value was not seen in pass 1; did the source change "
                                     "between the two passes?")
            table = np.append(new_index, other if other is not None else 0).astype(dtype)
            codes = table[np.where(idx < 0, new_index.size, idx)]
            codes[na] = missing_code
            out.append(np.ascontiguousarray(codes, dtype=dtype))
            continue
        if spec.family in ("datetime", "timedelta"):
            v, na = _instants(series)
        else:
            v, na, _, _ = _numbers(series, spec)
        codes = np.full(n, missing_code, dtype=dtype)
        if na.any():
            codes[~na] = _code_values(a, v[~na])
        else:
            codes[:] = _code_values(a, v)
        out.append(codes)
    return out

