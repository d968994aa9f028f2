"""Reading a data file for the command line: CSV (with its delimiter, encoding
and stray fields worked out and said) and Parquet.

A CSV file carries no types and no declaration of its delimiter or encoding, and
exports often add stray fields.  :func:`read_table` is the one reader the
``infoscope`` subcommands share.  What it decided is returned with the frame, in
``frame.attrs["read_notes"]`` (one sentence each), so that the command can say it:

* **delimiter** — ``sep`` if given, a tab for ``.tsv`` files, otherwise sniffed
  from the first lines with the standard library's :class:`csv.Sniffer` among
  ``,``, ``;``, tab and ``|`` (a comma when nothing else fits);
* **encoding** — ``encoding`` if given, else UTF-8 (a leading byte-order mark is
  skipped); a file that is not valid in it is an error that names the option;
* **decimal comma** — in a file separated by ``;``, tab or ``|`` whose numbers
  are written ``2,5`` and never ``2.5``, ``,`` is read as the decimal mark;
* **fields beyond the header** — counted on the first lines with :mod:`csv`.
  pandas would silently turn the first columns into the row index
  (``index_col=None``) and shift every column; infoscope reads the header's
  columns where they are (pandas' documented ``index_col=False``) and then:
  extra fields that are empty on every line (a trailing delimiter, a common
  export artefact) are dropped; extra fields only on the first data row are
  dropped, naming their values; extra fields with values on other rows are kept
  as columns named ``(unnamed field N)``.  A line with more fields than any of the
  first lines is an error naming the line.
* **dates and times** — text columns that read as dates or times are converted
  (:func:`parse_datetime_columns`).
"""
from __future__ import annotations

import codecs
import csv
import io
import re
import warnings
from pathlib import Path

import pandas as pd

__all__ = ["ReadError", "read_table", "sniff_csv", "delimiter_name", "parse_datetime_columns",
           "DATETIME_PARSE_SHARE", "SNIFF_DELIMITERS", "SNIFF_BYTES", "check_sep", "check_encoding"]

#: Delimiters the sniffer chooses among (common practice for delimited text).
SNIFF_DELIMITERS = ",;\t|"
#: Bytes read from the start of a CSV file to sniff its delimiter and count its fields.
SNIFF_BYTES = 64 * 1024

_PARQUET = (".parquet", ".pq")
_CSV = (".csv", ".csv.gz", ".csv.bz2", ".csv.zip", ".csv.xz", ".txt")
_TSV = (".tsv", ".tsv.gz", ".tsv.bz2", ".tsv.zip", ".tsv.xz", ".tab")
_DELIMITER_NAMES = {",": "','", ";": "';'", "\t": "tab", "|": "'|'"}
_DECIMAL_COMMA = re.compile(r"^\s*[+-]?\d+,\d+\s*$")
_DECIMAL_POINT = re.compile(r"^\s*[+-]?\d*\.\d+\s*$")


class ReadError(ValueError):
    """The file cannot be read as asked; the message is one line for the user.

    References
    ----------
    .. [1] pandas.read_csv (the errors it raises are turned into this one).

    Examples
    --------
    >>> str(ReadError("no such file: 'x.csv'"))
    "no such file: 'x.csv'"
    """


def delimiter_name(sep: str) -> str:
    """How a delimiter is written in messages: ``';'``, ``tab``, ...

    Parameters
    ----------
    sep : str
        One character.

    Returns
    -------
    str

    References
    ----------
    .. [1] Python documentation, ``csv`` (dialect delimiters).

    Examples
    --------
    >>> delimiter_name("\\t"), delimiter_name(";")
    ('tab', "';'")
    """
    return _DELIMITER_NAMES.get(sep, repr(sep))


def check_sep(sep):
    """The one-character delimiter a ``--sep`` / ``sep=`` option names, or None when not given.

    Parameters
    ----------
    sep : str or None
        One character, or ``tab``, ``comma``, ``semicolon``, ``pipe`` (any case).

    Returns
    -------
    str or None

    Raises
    ------
    ReadError
        Not one character (nor a name of one), or a line break or quote.

    Examples
    --------
    >>> check_sep("tab"), check_sep(";")
    ('\\t', ';')
    """
    if sep is None:
        return None
    if not isinstance(sep, str):
        raise ReadError(f"--sep must be one character, got {sep!r}")
    named = {"tab": "\t", "\\t": "\t", "comma": ",", "semicolon": ";", "pipe": "|"}.get(sep.lower(), sep)
    if len(named) != 1 or named in "\r\n\"":
        raise ReadError(f"--sep must be one character (or 'tab'), got {sep!r}")
    return named


def check_encoding(encoding):
    """The codec name of an ``--encoding`` / ``encoding=`` option (UTF-8 when not given).

    Parameters
    ----------
    encoding : str or None

    Returns
    -------
    str
        Python's canonical name of the codec.

    Raises
    ------
    ReadError
        Python knows no such encoding.

    Examples
    --------
    >>> check_encoding("latin-1")
    'iso8859-1'
    """
    if encoding is None:
        return "utf-8"
    try:
        return codecs.lookup(encoding).name
    except (LookupError, TypeError):
        raise ReadError(f"--encoding {encoding!r} is not an encoding Python knows "
                        "(for example utf-8, latin-1, cp1252, utf-16)") from None


def _head_bytes(file: Path, name: str, size: int) -> tuple[bytes, bool]:
    """The first ``size`` bytes of the (decompressed) file and whether that is all of it."""
    import bz2
    import gzip
    import lzma
    import zipfile

    if name.endswith(".gz"):
        opener = gzip.open
    elif name.endswith(".bz2"):
        opener = bz2.open
    elif name.endswith(".xz"):
        opener = lzma.open
    elif name.endswith(".zip"):
        with zipfile.ZipFile(file) as archive:
            members = [m for m in archive.namelist() if not m.endswith("/")]
            if len(members) != 1:
                raise ReadError(f"{str(file)!r} is a zip archive of {len(members)} files; "
                                "it must hold exactly one")
            with archive.open(members[0]) as handle:
                head = handle.read(size + 1)
        return head[:size], len(head) <= size
    else:
        opener = open
    with opener(file, "rb") as handle:
        head = handle.read(size + 1)
    return head[:size], len(head) <= size


def _decode_head(head: bytes, encoding: str, path: str) -> str:
    codec = "utf-8-sig" if encoding == "utf-8" else encoding
    try:
        # incremental: a character cut at the end of the sample is not an error
        return codecs.getincrementaldecoder(codec)().decode(head, final=False)
    except UnicodeDecodeError as exc:
        raise ReadError(
            f"cannot read {path!r} as {encoding}: byte {head[exc.start:exc.start + 1]!r} at position "
            f"{exc.start} is not valid in it; pass --encoding (for example --encoding latin-1 "
            "or cp1252)") from None


def sniff_csv(text: str, *, complete: bool = True, sep: str | None = None) -> dict:
    """Delimiter, decimal mark and field counts of the start of a CSV file.

    Parameters
    ----------
    text : str
        The first lines of the file (decoded).
    complete : bool, default=True
        Whether ``text`` is the whole file (else its last, possibly cut, line is
        not used).
    sep : str, optional
        The delimiter, if known; otherwise :class:`csv.Sniffer` chooses among
        :data:`SNIFF_DELIMITERS` (a comma when it cannot tell, or when its choice
        would leave the header as one field).

    Returns
    -------
    dict
        ``sep``, ``sniffed`` (bool), ``decimal``, ``header`` (list of the header's
        fields), ``header_lines`` (physical lines up to the end of the header,
        blank lines before it included), ``rows`` (``(line, fields)`` of the data
        records read) and ``width`` (the most fields on any of those lines,
        the header's included).

    References
    ----------
    .. [1] Python documentation, ``csv.Sniffer`` and ``csv.reader``.
    .. [2] Shafranovich, Y. (2005). RFC 4180, Common Format and MIME Type for
       Comma-Separated Values (CSV) Files (records, fields, quoting).

    Examples
    --------
    >>> info = sniff_csv("a;b;c\\n1;x;2,5\\n2;y;3,5\\n")
    >>> info["sep"], info["decimal"], info["width"]
    (';', ',', 3)
    >>> sniff_csv("id,city\\n1,Oslo,\\n")["rows"]
    [(2, ['1', 'Oslo', ''])]
    """
    lines = text.splitlines(keepends=True)
    if not complete and len(lines) > 1:
        lines = lines[:-1]
    body = "".join(lines)
    sniffed = False
    if sep is None:
        sep = ","
        try:
            guess = csv.Sniffer().sniff(body, delimiters=SNIFF_DELIMITERS).delimiter
        except csv.Error:
            guess = None
        if guess and guess != ",":
            first = next((ln for ln in lines if ln.strip()), "")
            if len(next(csv.reader([first], delimiter=guess), [])) >= 2:
                sep, sniffed = guess, True
        elif guess == ",":
            sniffed = True
    reader = csv.reader(io.StringIO(body), delimiter=sep)
    header: list = []
    header_lines = 0
    rows: list = []
    try:
        for fields in reader:
            if not fields or (len(fields) == 1 and not fields[0].strip()):
                if not header:
                    header_lines = reader.line_num
                continue  # blank lines: pandas skips them (skip_blank_lines=True)
            if not header:
                header, header_lines = fields, reader.line_num
                continue
            rows.append((reader.line_num, fields))
    except csv.Error:  # a quoted field cut at the end of the sample
        pass
    width = max([len(header)] + [len(f) for _, f in rows])
    decimal = "."
    if sep != ",":
        cells = [c for _, f in rows for c in f]
        if any(_DECIMAL_COMMA.match(c) for c in cells) and not any(_DECIMAL_POINT.match(c) for c in cells):
            decimal = ","
    return {"sep": sep, "sniffed": sniffed, "decimal": decimal, "header": header,
            "header_lines": header_lines, "rows": rows, "width": width}


def _first_line(exc: BaseException) -> str:
    text = str(exc).strip()
    return text.splitlines()[0] if text else type(exc).__name__


def _read_csv(file: Path, path: str, name: str, sep, encoding) -> tuple[pd.DataFrame, list[str]]:
    sep = check_sep(sep)
    if sep is None and name.endswith(_TSV):
        sep = "\t"
        told = "tab (a .tsv file)"
    else:
        told = None if sep is None else f"{delimiter_name(sep)} (--sep)"
    enc = check_encoding(encoding)
    head, complete = _head_bytes(file, name, SNIFF_BYTES)
    text = _decode_head(head, enc, path)
    if not text.strip():
        raise ReadError(f"{path!r} holds no data (the file is empty)")
    info = sniff_csv(text, complete=complete, sep=sep)
    sep = info["sep"]
    if told is None:
        told = f"{delimiter_name(sep)} ({'sniffed from the first lines' if info['sniffed'] else 'the default'}; --sep sets it)"
    notes = [f"read as delimited text: delimiter {told}, encoding "
             + (f"{encoding} (--encoding)" if encoding is not None else f"{enc} (--encoding sets it)")]
    options = dict(sep=sep, encoding="utf-8-sig" if enc == "utf-8" else enc, index_col=False)
    if info["decimal"] == ",":
        options["decimal"] = ","
        notes.append("numbers are written with a decimal comma (2,5) and read as numbers")
    n_header = len(info["header"])
    extra = info["width"] - n_header
    with warnings.catch_warnings():
        # pandas' "Length of header or names does not match" notice: said below in our words
        warnings.simplefilter("ignore", pd.errors.ParserWarning)
        if extra <= 0:
            frame = pd.read_csv(file, **options)
        else:
            names = list(pd.read_csv(file, nrows=0, **options).columns)[:n_header]
            frame = pd.read_csv(file, header=None, skiprows=info["header_lines"],
                                names=list(range(info["width"])), **options)
            frame.columns = names + [f"(unnamed field {n_header + i + 1})" for i in range(extra)]
    if extra > 0:
        frame, more = _stray_fields(frame, info, n_header)
        notes.extend(more)
    return frame, notes


def _stray_fields(frame: pd.DataFrame, info: dict, n_header: int) -> tuple[pd.DataFrame, list[str]]:
    """Drop or keep the columns beyond the header (see the module's notes)."""
    stray = list(frame.columns[n_header:])
    present = frame[stray].notna()
    empty = [c for c in stray if not present[c].any()]
    first_only = [c for c in stray if present[c].any() and not present[c].iloc[1:].any()]
    kept = [c for c in stray if c not in empty and c not in first_only]
    sep = delimiter_name(info["sep"])
    notes = []
    if empty:
        lines = sum(1 for _, f in info["rows"] if len(f) > n_header)
        notes.append(
            f"the data lines end with {len(empty)} empty field(s) more than the header's {n_header} "
            f"(a trailing {sep}; {lines} of the first {len(info['rows'])} lines): read with the "
            "header's columns, the empty fields dropped")
    if first_only:
        values = ", ".join(repr(str(frame[c].iloc[0])) for c in first_only)
        notes.append(
            f"the first data line has {n_header + len(first_only)} fields, the header {n_header}: "
            f"read with the header's columns, its extra field(s) {values} dropped")
    if kept:
        rows = int(present[kept].any(axis=1).sum())
        notes.append(
            f"{rows} line(s) have more fields than the header's {n_header}: the extra fields are "
            f"profiled as {', '.join(map(repr, kept))} (the header names no column for them)")
    return frame.drop(columns=empty + first_only), notes


def read_table(path, *, sep: str | None = None, encoding: str | None = None) -> pd.DataFrame:
    """Read a CSV or Parquet file for the ``infoscope`` command; one clear error otherwise.

    Parameters
    ----------
    path : str or path-like
        A ``.csv`` / ``.txt`` (optionally ``.gz``, ``.bz2``, ``.zip``, ``.xz``),
        ``.tsv`` / ``.tab`` or ``.parquet`` / ``.pq`` file.
    sep : str, optional
        The delimiter of a text file (one character, or ``"tab"``); sniffed when
        not given (see the module's notes).
    encoding : str, optional
        The text encoding of a text file (default UTF-8).

    Returns
    -------
    pandas.DataFrame
        The table.  ``attrs["read_notes"]``: what the reader decided, one sentence
        each (delimiter and encoding, stray fields dropped or kept, decimal
        comma); ``attrs["parsed_datetimes"]``: the text columns read as dates.

    Raises
    ------
    ReadError
        The file is missing, unreadable, empty, of an unknown kind, not valid in
        the encoding, or has a line with more fields than the first lines.

    References
    ----------
    .. [1] pandas.read_csv (``index_col=False``: "force pandas to not use the first
       column as the index, e.g. when you have a malformed file with delimiters at
       the end of each line"), pandas.read_parquet (Apache Parquet format).
    .. [2] Python documentation, ``csv.Sniffer``.

    Examples
    --------
    >>> read_table("no-such-file.csv")
    Traceback (most recent call last):
    ...
    infoscope.reading.ReadError: no such file: 'no-such-file.csv'
    """
    path = str(path)
    file = Path(path)
    if not file.exists():
        raise ReadError(f"no such file: {path!r}")
    if file.is_dir():
        raise ReadError(f"{path!r} is a folder, not a data file")
    name = file.name.lower()
    notes: list[str] = []
    try:
        if name.endswith(_PARQUET):
            if sep is not None or encoding is not None:
                raise ReadError("--sep and --encoding apply to text files; a Parquet file declares its own")
            frame = pd.read_parquet(file)
        elif name.endswith(_CSV + _TSV):
            frame, notes = _read_csv(file, path, name, sep, encoding)
        else:
            raise ReadError(f"cannot tell the format of {path!r}: name it .csv, .tsv or .parquet")
    except ReadError:
        raise
    except ImportError as exc:
        raise ReadError(f"reading {path!r} needs a package that is missing ({exc}); "
                        "pip install pyarrow") from None
    except pd.errors.EmptyDataError as exc:
        raise ReadError(f"{path!r} holds no data ({exc})") from None
    except UnicodeDecodeError as exc:
        raise ReadError(f"cannot read {path!r}: {_first_line(exc)}; pass --encoding "
                        "(for example --encoding latin-1 or cp1252)") from None
    except pd.errors.ParserError as exc:
        raise ReadError(f"cannot read {path!r}: {_first_line(exc)} (a line with more fields "
                        "than the header and the first lines; quote fields that hold the delimiter)") from None
    except Exception as exc:  # OSError, ValueError, pyarrow's own errors on a damaged file
        raise ReadError(f"cannot read {path!r}: {_first_line(exc)}") from None
    if frame.shape[1] == 0 or len(frame) == 0:
        raise ReadError(f"{path!r} has no rows or no columns")
    if not name.endswith(_PARQUET):  # Parquet keeps its own types
        frame, parsed = parse_datetime_columns(frame)
    else:
        parsed = []
    frame.attrs["read_notes"] = notes
    frame.attrs["parsed_datetimes"] = parsed
    return frame


#: Share of a text column's non-missing values that must read as dates / times
#: for :func:`parse_datetime_columns` to convert it (our choice: a few stray
#: entries such as "unknown" do not block it, a mixed column stays text).
DATETIME_PARSE_SHARE = 0.95
_DATE_LIKE = re.compile(r"^\s*(\d{4}[-/.]\d{1,2}[-/.]\d{1,2}|\d{1,2}[-/.]\d{1,2}[-/.]\d{4})"
                        r"([ T]\d{1,2}:\d{2}(:\d{2}(\.\d+)?)?)?\s*(Z|[+-]\d{2}:?\d{2})?\s*$")


def _to_datetime(values: pd.Series, fmt):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # pandas' "could not infer format" notices
        try:
            return pd.to_datetime(values, format=fmt, errors="coerce")
        except (ValueError, TypeError, OverflowError):
            try:  # mixed UTC offsets: one time line in UTC
                return pd.to_datetime(values, format=fmt, errors="coerce", utc=True)
            except (ValueError, TypeError, OverflowError):
                return None


def parse_datetime_columns(frame: pd.DataFrame, *, sample: int = 200) -> tuple[pd.DataFrame, list]:
    """Convert the text columns of a CSV that hold dates or times to datetimes.

    A CSV has no types: a timestamp column arrives as text, and as text every
    distinct instant is its own level.  A text column is converted when its first
    ``sample`` non-missing values all look like dates (``2024-03-01``,
    ``2024-03-01 08:15:00``, ``01/03/2024``, optional time zone) and at least
    :data:`DATETIME_PARSE_SHARE` of the sample and of the whole column parse
    (``pandas.to_datetime``, ISO 8601 first, else the format pandas infers).
    Numeric and boolean columns are never touched; the input frame is not
    changed.

    Parameters
    ----------
    frame : pandas.DataFrame
        As read by :func:`pandas.read_csv`.
    sample : int, default=200
        How many leading non-missing values decide.

    Returns
    -------
    (pandas.DataFrame, list of str)
        The frame (a copy when a column was converted) and the names of the
        converted columns.

    References
    ----------
    .. [1] ISO 8601:2019, Date and time -- Representations for information
       interchange.
    .. [2] pandas.to_datetime (``format="ISO8601"``, ``errors="coerce"``).

    Examples
    --------
    >>> df = pd.DataFrame({"when": ["2024-03-01 08:15", "2024-03-02 09:00"], "n": [1, 2]})
    >>> out, names = parse_datetime_columns(df)
    >>> names, str(out["when"].dtype).startswith("datetime64")
    (['when'], True)
    """
    parsed: list = []
    result = frame
    for column in frame.columns:
        values = frame[column]
        if not (values.dtype == object or pd.api.types.is_string_dtype(values.dtype)):
            continue
        present = values.dropna()
        if present.empty:
            continue
        head = present.iloc[:sample]
        if not all(isinstance(v, str) and _DATE_LIKE.match(v) for v in head):
            continue
        for fmt in ("ISO8601", None):
            trial = _to_datetime(head, fmt)
            if trial is None or trial.notna().mean() < DATETIME_PARSE_SHARE:
                continue
            full = _to_datetime(values, fmt)
            if full is None or full[values.notna()].notna().mean() < DATETIME_PARSE_SHARE:
                continue
            if result is frame:
                result = frame.copy()
            result[column] = full
            parsed.append(str(column))
            break
    return result, parsed
