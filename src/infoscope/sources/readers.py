"""Sources that are not an in-memory frame, as bounded pandas row batches: :func:`open_source`.

Every source reads through an existing engine, never a reader of our own:

* a path, glob or folder of Parquet files, or a :class:`pyarrow.dataset.Dataset`:
  :mod:`pyarrow.dataset`, file by file in path order (fragments), with column
  projection and a bounded batch size;
* CSV files: :mod:`pyarrow.dataset`'s CSV format, with the delimiter and encoding
  rules of :mod:`infoscope.reading` (sniffed delimiter, tab for ``.tsv``, UTF-8);
* a DuckDB relation: DuckDB's own Arrow record-batch reader;
* a Polars LazyFrame: Polars' ``collect_batches`` (its streaming engine).

Batches become pandas with :func:`arrow_to_pandas` (integers as pandas' nullable
integers, exact beyond 2**53; dictionary-encoded text as a Categorical of its
values, read as text).  The facts pass 1 cannot keep in a summary (the levels of a
text column with very many values, an exact distinct count) are one ``GROUP BY``
in DuckDB over the same data (Polars' own ``group_by`` for a LazyFrame).

Files are checked before any pass: a missing path, an empty folder, a file that is
not Parquet or is cut short, schemas that disagree (naming the column, both types
and both files) are one clear error each (:class:`SourceError`).
"""
from __future__ import annotations

import glob
import os
from pathlib import Path

import numpy as np
import pandas as pd

__all__ = ["SourceError", "Source", "open_source", "arrow_to_pandas", "source_kind", "csv_delimiter", "local_files"]

_PARQUET = (".parquet", ".pq", ".parq")
_CSV = (".csv", ".tsv", ".txt", ".tab", ".csv.gz", ".tsv.gz")


class SourceError(ValueError):
    """A source that cannot be read as asked; the message names the file or the column."""


# ----------------------------------------------------------------------------- arrow -> pandas
def _date_dtype():
    import datetime

    return pd.to_datetime(pd.Series([datetime.date(2020, 1, 1)], dtype=object)).dtype


def _supported(name: str, t, where: str) -> None:
    import pyarrow as pa

    if pa.types.is_dictionary(t):
        t = t.value_type
    ok = (pa.types.is_boolean(t) or pa.types.is_integer(t) or pa.types.is_floating(t)
          or pa.types.is_string(t) or pa.types.is_large_string(t) or pa.types.is_string_view(t)
          or pa.types.is_timestamp(t) or pa.types.is_date(t) or pa.types.is_duration(t) or pa.types.is_null(t))
    if not ok:
        raise SourceError(
            f"column {name!r}{where}: Arrow type {t} cannot be profiled out of core; cast it to a number, "
            "text or time type, leave the column out (columns=), or profile a sample (sample=)")


def arrow_to_pandas(data) -> pd.DataFrame:
    """An Arrow table or record batch as the pandas frame both passes (and the in-memory reference) read.

    Integers become pandas' nullable integers (exact beyond 2**53, whether or not
    a batch has missing values), booleans with missing values nullable booleans,
    dates the datetime64 dtype pandas gives ``datetime.date`` values, dictionary-
    encoded text a Categorical of its values, a column of nulls only float NaN;
    everything else is Arrow's own conversion.

    Parameters
    ----------
    data : pyarrow.Table or pyarrow.RecordBatch

    Returns
    -------
    pandas.DataFrame

    Examples
    --------
    >>> import pyarrow as pa
    >>> arrow_to_pandas(pa.table({"n": [2**60 + 1, None]})).dtypes.astype(str).tolist()
    ['Int64']
    """
    import pyarrow as pa
    import pyarrow.compute as pc

    out = {}
    for name, col in zip(data.schema.names, data.columns):
        t = col.type
        if pa.types.is_integer(t):
            series = pd.Series(col.to_pandas(types_mapper=lambda d: pd.api.types.pandas_dtype(
                str(d).replace("uint", "UInt").replace("int", "Int"))))
        elif pa.types.is_boolean(t):
            series = pd.Series(col.to_pandas(types_mapper=lambda d: pd.BooleanDtype()))
        elif pa.types.is_date(t):
            series = pd.Series(pd.to_datetime(pd.Series(col.to_pandas(), dtype=object))).astype(_date_dtype())
        elif pa.types.is_null(t):
            series = pd.Series(np.full(len(col), np.nan))
        elif pa.types.is_dictionary(t) and not (pa.types.is_string(t.value_type) or
                                                pa.types.is_large_string(t.value_type)):
            series = arrow_to_pandas(pa.table({name: pc.cast(col, t.value_type)}))[name]
        else:
            series = pd.Series(col.to_pandas())
        out[name] = series.reset_index(drop=True)
    return pd.DataFrame(out, copy=False)


# ----------------------------------------------------------------------------- sources
class Source:
    """Row batches of one source, in a fixed order; the base of every adapter.

    Attributes
    ----------
    label : str
        What the source is, for messages (a path, a glob, "DuckDB relation").
    names : list of str
        Column keys.
    n_rows : int or None
        Rows, when the source knows them without reading (Parquet metadata).
    """

    label = "the source"
    n_rows: int | None = None
    names: list

    def dtypes(self) -> dict:
        """Column key -> pandas dtype of the batches (from one small batch)."""
        first = next(iter(self.batches(self.names, 1024)), None)
        if first is None:
            raise SourceError(f"{self.label}: the source has no rows: there is nothing to profile")
        return {name: first[name].dtype for name in self.names}

    def bytes_per_row(self, columns) -> int:
        """Rough bytes of one row of ``columns`` as pandas (8 per number, 64 per text value)."""
        dtypes = self.dtypes()
        return sum(64 if dtypes[c] == object or isinstance(dtypes[c], (pd.StringDtype, pd.CategoricalDtype))
                   else 9 for c in columns)

    def batches(self, columns, batch_rows: int):  # pragma: no cover - every adapter defines it
        raise NotImplementedError

    def answer(self, query):
        """The answer to a :class:`~infoscope.encode.summaries.SourceQuery` (a DuckDB ``GROUP BY``)."""
        return _duckdb_answer(self._duckdb_relation(), query)

    def _duckdb_relation(self):  # pragma: no cover - every adapter defines it
        raise NotImplementedError


def _quote(name: str) -> str:
    return '"' + name.replace('"', '""') + '"'


def _duckdb_answer(rel, query):
    col = _quote(query.column)
    valid = rel.filter(f"{col} IS NOT NULL" + (f" AND NOT isnan({col})" if query.kind == "distinct" and
                                               _is_float(rel, query.column) else ""))
    if query.kind == "distinct":
        return int(valid.aggregate(f"count(DISTINCT {col})").fetchall()[0][0])
    counts = valid.aggregate(f"{col} AS v, count(*) AS c", col)
    cc = counts.aggregate("c, count(*) AS m", "c").fetchall()
    n_distinct = int(sum(m for _, m in cc))
    # fetchall on a one-row relation: DuckDB 2 relations have no fetchone
    boundary = counts.order("c DESC").limit(1, offset=max(query.limit - 1, 0)).fetchall()
    top = counts.filter(f"c >= {int(boundary[0][1])}").fetchall() if boundary else counts.fetchall()
    return {"n_distinct": n_distinct, "counts_of_counts": [(int(c), int(m)) for c, m in cc],
            "top": [(str(v), int(c)) for v, c in top]}


def _is_float(rel, name: str) -> bool:
    dtype = str(rel.types[rel.columns.index(name)]).upper()
    return dtype in ("DOUBLE", "FLOAT", "REAL")


class ArrowSource(Source):
    """A :class:`pyarrow.dataset.Dataset` (Parquet or CSV files, or any Arrow dataset)."""

    def __init__(self, dataset, label: str, files=None):
        self.dataset = dataset
        self.label = label
        self.files = list(files or [])
        names = list(dataset.schema.names)
        dup = sorted({n for n in names if names.count(n) > 1})
        if dup:
            raise SourceError(f"{label}: column name(s) {dup} appear more than once")
        for field in dataset.schema:
            _supported(field.name, field.type, "")
        self.names = names
        try:
            self.n_rows = int(dataset.count_rows())
        except Exception:  # noqa: BLE001 - CSV and some datasets cannot count without reading
            self.n_rows = None

    def batches(self, columns, batch_rows: int):
        import pyarrow as pa

        fragments = list(self.dataset.get_fragments()) if hasattr(self.dataset, "get_fragments") else [self.dataset]
        for fragment in fragments:
            where = getattr(fragment, "path", self.label)
            try:
                scanner = fragment.scanner(schema=self.dataset.schema, columns=list(columns),
                                           batch_size=int(batch_rows),
                                           batch_readahead=1, fragment_readahead=1) \
                    if fragment is not self.dataset else self.dataset.scanner(
                        columns=list(columns), batch_size=int(batch_rows), batch_readahead=1, fragment_readahead=1)
                for batch in scanner.to_batches():
                    if batch.num_rows:
                        yield arrow_to_pandas(batch)
            except (pa.ArrowInvalid, pa.ArrowTypeError, OSError) as exc:
                raise SourceError(f"{where}: cannot be read ({str(exc).splitlines()[0]})") from None

    def _duckdb_relation(self):
        import duckdb

        con = duckdb.connect()
        con.execute("SET preserve_insertion_order = false")
        return con.from_arrow(self.dataset)


class DuckDBSource(Source):
    """A DuckDB relation, read with DuckDB's Arrow record-batch reader."""

    def __init__(self, relation):
        self.relation = relation
        self.label = "DuckDB relation"
        self.names = list(relation.columns)
        dup = sorted({n for n in self.names if self.names.count(n) > 1})
        if dup:
            raise SourceError(f"{self.label}: column name(s) {dup} appear more than once")
        self.n_rows = None

    def batches(self, columns, batch_rows: int):
        rel = self.relation.select(", ".join(_quote(c) for c in columns))
        reader = _record_batches(rel, int(batch_rows))
        for batch in reader:
            for field in batch.schema:
                _supported(field.name, field.type, " (DuckDB relation)")
            if batch.num_rows:
                yield arrow_to_pandas(batch)

    def _duckdb_relation(self):
        return self.relation


def _record_batches(rel, rows: int):
    for name in ("to_arrow_reader", "fetch_record_batch", "record_batch"):
        method = getattr(rel, name, None)
        if method is not None:
            try:
                return method(rows)
            except TypeError:
                continue
    return iter(rel.arrow().to_batches(max_chunksize=rows))  # pragma: no cover - old DuckDB


class PolarsSource(Source):
    """A Polars LazyFrame, read in batches by Polars' streaming engine."""

    def __init__(self, lazy):
        self.lazy = lazy
        self.label = "Polars LazyFrame"
        self.names = list(lazy.collect_schema().names())
        self.n_rows = None

    def batches(self, columns, batch_rows: int):
        lazy = self.lazy.select(list(columns))
        for frame in lazy.collect_batches(chunk_size=int(batch_rows)):
            if frame.height:
                table = frame.to_arrow()
                for field in table.schema:
                    _supported(field.name, field.type, " (Polars LazyFrame)")
                yield arrow_to_pandas(table)

    def answer(self, query):
        import polars as pl

        col = pl.col(query.column)
        lazy = self.lazy.select(query.column).filter(col.is_not_null())
        if self.lazy.collect_schema()[query.column].is_float():
            lazy = lazy.filter(~col.is_nan())
        if query.kind == "distinct":
            return int(lazy.select(col.n_unique()).collect().item())
        counts = lazy.group_by(query.column).agg(pl.len().alias("c")).collect()
        cc = counts.group_by("c").agg(pl.len().alias("m")).rows()
        ordered = counts.sort("c", descending=True)
        boundary = int(ordered["c"][max(query.limit - 1, 0)]) if ordered.height else 0
        top = ordered.filter(pl.col("c") >= boundary).rows()
        return {"n_distinct": int(counts.height), "counts_of_counts": [(int(c), int(m)) for c, m in cc],
                "top": [(str(v), int(c)) for v, c in top]}


# ----------------------------------------------------------------------------- files
def _files_of(path) -> tuple[list[str], str]:
    if isinstance(path, (list, tuple)):  # several paths (a shell's expansion of a glob): each one a file
        if not path:
            raise SourceError("no file given")
        files = []
        for one in path:
            files.extend(_files_of(one)[0])
        label = os.fspath(path[0]) + (f" and {len(path) - 1} more" if len(path) > 1 else "")
        return sorted(dict.fromkeys(files)), label
    text = os.fspath(path)
    if any(ch in text for ch in "*?["):
        files = sorted(f for f in glob.glob(text, recursive=True) if os.path.isfile(f))
        if not files:
            raise SourceError(f"{text}: no file matches this pattern")
        return files, text
    p = Path(text)
    if not p.exists():
        raise SourceError(f"{text}: no such file or folder")
    if p.is_dir():
        files = sorted(str(f) for f in p.rglob("*") if f.is_file() and not f.name.startswith((".", "_"))
                       and str(f).lower().endswith(_PARQUET + _CSV))
        if not files:
            raise SourceError(f"{text}: the folder holds no Parquet or CSV files")
        return files, text
    return [str(p)], text


def _format_of(files: list[str], label: str) -> str:
    kinds = {"parquet" if f.lower().endswith(_PARQUET) else "csv" if f.lower().endswith(_CSV) else "?"
             for f in files}
    if kinds == {"?"} or "?" in kinds:
        other = next(f for f in files if not f.lower().endswith(_PARQUET + _CSV))
        raise SourceError(f"{other}: not a Parquet (.parquet) or CSV (.csv, .tsv) file")
    if len(kinds) > 1:
        raise SourceError(f"{label}: mixes Parquet and CSV files; profile one kind at a time")
    return kinds.pop()


def local_files(path) -> tuple[list[str], str]:
    """The files a path, glob, folder or list of paths names, and their format.

    Parameters
    ----------
    path : str, os.PathLike or list of them
        As :func:`open_source` takes it.

    Returns
    -------
    files : list of str
        Sorted; a folder's hidden files (``.*``, ``_*``) and other formats left out.
    format : {"parquet", "csv"}

    Raises
    ------
    SourceError
        A missing path, a pattern no file matches, a folder with no data files,
        a file of another format, or Parquet and CSV files mixed.

    Examples
    --------
    >>> local_files("no/such/*.parquet")
    Traceback (most recent call last):
    ...
    infoscope.sources.readers.SourceError: no/such/*.parquet: no file matches this pattern
    """
    files, label = _files_of(path)
    return files, _format_of(files, label)


def _parquet_dataset(files: list[str], label: str):
    import pyarrow as pa
    import pyarrow.dataset as ds
    import pyarrow.parquet as pq

    first = None
    for f in files:
        try:
            schema = pq.read_schema(f)
            pq.ParquetFile(f).metadata  # noqa: B018 - reads the footer: a cut-short file fails here
        except (pa.ArrowInvalid, OSError) as exc:
            raise SourceError(f"{f}: not a readable Parquet file ({str(exc).splitlines()[0]}); "
                              "was it cut short or is it another format?") from None
        if first is None:
            first = (f, schema)
            continue
        f0, s0 = first
        for field in schema:
            if field.name in s0.names:
                t0 = s0.field(field.name).type
                if t0 != field.type and not pa.types.is_null(field.type) and not pa.types.is_null(t0):
                    raise SourceError(
                        f"column {field.name!r}: the files disagree on its type: {t0} in {f0}, "
                        f"{field.type} in {f}; cast one of them, or profile the files separately")
        missing = [n for n in s0.names if n not in schema.names]
        extra = [n for n in schema.names if n not in s0.names]
        if missing or extra:
            what = (f"lacks column(s) {missing}" if missing else "") + (" and " if missing and extra else "") + \
                (f"has column(s) {extra} that {f0} lacks" if extra else "")
            raise SourceError(f"{f}: {what}; every file of one profile needs the same columns")
    schema = first[1]
    # a column of nulls only in the first file takes its type from another file
    for f in files[1:]:
        other = pq.read_schema(f)
        for i, field in enumerate(schema):
            if pa.types.is_null(field.type) and not pa.types.is_null(other.field(field.name).type):
                schema = schema.set(i, other.field(field.name))
    return ds.dataset(files, format="parquet", schema=schema)


def csv_delimiter(files: list[str], sep=None, encoding=None) -> str:
    """The delimiter of CSV ``files``: ``sep`` if given, a tab for ``.tsv``, else sniffed from the first file.

    Parameters
    ----------
    files : list of str
        The files (all of one delimiter).
    sep, encoding : str, optional
        As given by the user (see :func:`infoscope.reading.read_table`).

    Returns
    -------
    str

    Raises
    ------
    SourceError
        The first file is not valid text in ``encoding`` (UTF-8 by default).

    Examples
    --------
    >>> csv_delimiter(["a.tsv"])
    '\\t'
    """
    from infoscope.reading import SNIFF_BYTES, check_sep, sniff_csv

    if sep is not None:
        return check_sep(sep)
    if files[0].lower().endswith((".tsv", ".tab", ".tsv.gz")):
        return "\t"
    with open(files[0], "rb") as fh:
        head = fh.read(SNIFF_BYTES)
    try:
        text = head.decode(encoding or "utf-8-sig", errors="strict")
    except UnicodeDecodeError:
        raise SourceError(f"{files[0]}: not valid {encoding or 'UTF-8'} text; give the file's encoding "
                          "(encoding=)") from None
    return sniff_csv(text, complete=len(head) < SNIFF_BYTES)["sep"]


def _csv_dataset(files: list[str], label: str, sep=None, encoding=None):
    import pyarrow.csv as pcsv
    import pyarrow.dataset as ds

    sep = csv_delimiter(files, sep, encoding)
    fmt = ds.CsvFileFormat(parse_options=pcsv.ParseOptions(delimiter=sep),
                           read_options=pcsv.ReadOptions(encoding=encoding or "utf8"))
    return ds.dataset(files, format=fmt)


def source_kind(obj) -> str:
    """What kind of source ``obj`` is: "files", "arrow", "duckdb", "polars_lazy", "polars", "dask",
    "pandas" or "unknown"."""
    if isinstance(obj, (str, os.PathLike)) or (
            isinstance(obj, (list, tuple)) and obj and all(isinstance(o, (str, os.PathLike)) for o in obj)):
        return "files"
    module = type(obj).__module__.split(".")[0]
    if isinstance(obj, pd.DataFrame):
        return "pandas"
    if module == "pyarrow" and hasattr(obj, "get_fragments") or module == "pyarrow._dataset":
        return "arrow"
    if module == "pyarrow":
        return "arrow_table" if hasattr(obj, "schema") and hasattr(obj, "column_names") else "unknown"
    if module == "duckdb":
        return "duckdb"
    if module == "polars":
        return "polars_lazy" if hasattr(obj, "collect") and not hasattr(obj, "to_pandas") else "polars"
    if module.startswith("dask"):
        return "dask"
    return "unknown"


def open_source(obj, *, columns=None, sep=None, encoding=None) -> Source:
    """A :class:`Source` of batches for a path / glob / folder, Arrow dataset, DuckDB relation or LazyFrame.

    Parameters
    ----------
    obj : str, os.PathLike, pyarrow.dataset.Dataset, duckdb relation or polars.LazyFrame
    columns : list of str, optional
        Profile only these columns (checked against the source's).
    sep, encoding : str, optional
        For CSV files (see :func:`infoscope.reading.read_table`).

    Returns
    -------
    Source

    Raises
    ------
    SourceError
        A missing path, an empty folder, an unreadable or cut-short file, files whose
        schemas disagree (naming the column and both types), an unsupported column type.

    Examples
    --------
    >>> open_source("no/such/folder")
    Traceback (most recent call last):
    ...
    infoscope.sources.readers.SourceError: no/such/folder: no such file or folder
    """
    kind = source_kind(obj)
    if kind == "files":
        files, label = _files_of(obj)
        fmt = _format_of(files, label)
        dataset = _parquet_dataset(files, label) if fmt == "parquet" else _csv_dataset(files, label, sep, encoding)
        source = ArrowSource(dataset, label, files)
    elif kind == "arrow":
        source = ArrowSource(obj, "pyarrow dataset")
    elif kind == "arrow_table":
        import pyarrow.dataset as ds

        source = ArrowSource(ds.dataset(obj), "pyarrow table")
    elif kind == "duckdb":
        source = DuckDBSource(obj)
    elif kind == "polars_lazy":
        source = PolarsSource(obj)
    else:
        raise TypeError(f"profile: cannot read a {type(obj).__module__.split('.')[0]}.{type(obj).__name__}; give a "
                        "path, glob or folder of Parquet or CSV files, a pyarrow Dataset, a DuckDB relation, "
                        "a Polars LazyFrame or DataFrame, a Dask DataFrame or a pandas DataFrame")
    if columns is not None:
        unknown = [c for c in columns if c not in source.names]
        if unknown:
            raise SourceError(f"{source.label}: no column(s) {unknown}; the columns are {source.names[:12]}")
        source.names = list(columns)
    return source
