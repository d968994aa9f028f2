"""Property test (hypothesis) of every profile method on messy frames.

The frames mix what a new user's data holds: object columns of numbers, text,
tuples, bytes, Decimals and None side by side; integers at the ends of int64 and
beyond 2**53 in narrow ranges; nullable and Arrow dtypes; Period, Interval,
datetime and duration columns with gaps; categoricals; odd and repeated names.
For each frame and each method (``entropy``, ``pairs``, ``matrix``, ``pair``,
``relevance``, ``drift``) the test asserts

* no exception other than infoscope's own errors (ValueError / TypeError /
  KeyError raised in infoscope's code, naming a column or a parameter);
* the frame is not changed (values, dtypes, names, attrs);
* every entropy is in [0, log K] (K the column's alphabet), except where the
  documented excess applies: a bias correction above log K of the levels seen,
  flagged ``exceeds_log_k`` beyond 1.96 standard errors (never for the plug-in estimator, and for
  Miller-Madow at most its correction (K - 1) / 2N nats; Miller, 1955); NaN only
  for a column with no non-missing value.

The examples are derandomized (the project's hypothesis profile in
``tests/conftest.py``), so CI runs the same frames every time.
"""
from __future__ import annotations

import copy
import math
import traceback
import warnings
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import infoscope  # noqa: F401  (registers df.info_profile)
from infoscope.frame.settings import _DEFAULTS

SRC = str(Path(infoscope.__file__).resolve().parent)
ESTIMATORS = ["plugin", "miller_madow", "chao_shen", "james_stein", "dirichlet", "grassberger", "nsb"]

NAMES = st.one_of(
    st.sampled_from(["id", "a", "a", "", " ", "x\u202ey", "名前", "col,with;delims", "<b>&amp;", "a / b"]),
    st.integers(-3, 3),
    st.text(min_size=0, max_size=6),
)

CELLS = st.one_of(
    st.none(),
    st.integers(-(2**70), 2**70),
    st.floats(allow_nan=True, allow_infinity=True),
    st.text(max_size=4),
    st.binary(max_size=3),
    st.tuples(st.integers(0, 3), st.integers(0, 3)),
    st.tuples(st.integers(0, 3)),
    st.decimals(allow_nan=False, allow_infinity=False, places=2, min_value=-100, max_value=100),
    st.booleans(),
)


@st.composite
def columns(draw, n: int) -> pd.Series:
    kind = draw(st.sampled_from([
        "mixed", "extreme_int", "big_narrow", "uint_top", "nullable_int", "nullable_float", "arrow_int",
        "arrow_text", "boolean", "period", "interval", "datetime", "timedelta", "category", "float_mess",
        "few_text",
    ]))
    rng = np.random.default_rng(draw(st.integers(0, 2**16)))
    gaps = rng.random(n) < draw(st.sampled_from([0.0, 0.2, 0.9]))
    if kind == "mixed":
        return pd.Series(draw(st.lists(CELLS, min_size=n, max_size=n)), dtype=object)
    if kind == "extreme_int":
        return pd.Series(rng.choice(np.array([-(2**63), 2**63 - 1, 0, -1, 1], dtype=np.int64), n))
    if kind == "big_narrow":
        base = draw(st.sampled_from([2**53 + 1, 2**60, -(2**62)]))
        return pd.Series([base + int(i) for i in rng.integers(0, draw(st.sampled_from([3, 50, 10**6])), n)])
    if kind == "uint_top":
        return pd.Series((np.uint64(2**64 - 1) - rng.integers(0, 1000, n).astype(np.uint64)))
    if kind == "nullable_int":
        values = pd.array([2**62 + int(v) for v in rng.integers(0, 100, n)], dtype="Int64")
        values[gaps] = pd.NA
        return pd.Series(values)
    if kind == "nullable_float":
        values = pd.array(rng.normal(size=n), dtype="Float64")
        values[gaps] = pd.NA
        return pd.Series(values)
    if kind == "arrow_int":
        return pd.Series([None if g else int(v) for g, v in zip(gaps, rng.integers(-5, 5, n))],
                         dtype="int64[pyarrow]")
    if kind == "arrow_text":
        return pd.Series([None if g else f"t{v}" for g, v in zip(gaps, rng.integers(0, 7, n))],
                         dtype="string[pyarrow]")
    if kind == "boolean":
        return pd.Series([None if g else bool(v) for g, v in zip(gaps, rng.integers(0, 2, n))], dtype="boolean")
    if kind == "period":
        values = pd.Series(pd.period_range("1999-12", periods=n, freq=draw(st.sampled_from(["M", "D", "Q"]))))
        return values.where(~gaps)
    if kind == "interval":
        left = rng.integers(0, 20, n)
        values = pd.Series(pd.IntervalIndex.from_arrays(left, left + rng.integers(1, 5, n)))
        return values.where(~gaps)
    if kind == "datetime":
        values = pd.Series(pd.Timestamp("2024-03-31 01:30", tz="Europe/Oslo")
                           + pd.to_timedelta(rng.integers(0, 10**6, n), unit="s"))
        return values.where(~gaps)
    if kind == "timedelta":
        return pd.Series(pd.to_timedelta(rng.integers(-100, 10**5, n), unit="ms")).where(~gaps)
    if kind == "category":
        return pd.Series(pd.Categorical(rng.choice(["lo", "mid", "hi"], n), categories=["lo", "mid", "hi", "unused"],
                                        ordered=draw(st.booleans()))).where(~gaps)
    if kind == "float_mess":
        values = rng.choice(np.array([0.0, -0.0, 1e308, -1e308, np.inf, -np.inf, np.nan, 5e-324, 1.5]), n)
        return pd.Series(values)
    return pd.Series(rng.choice(["a", "b", "c"], n)).where(~gaps)


@st.composite
def messy_frames(draw):
    n = draw(st.integers(1, 40))
    width = draw(st.integers(1, 4))
    data = [draw(columns(n)) for _ in range(width)]
    names = draw(st.lists(NAMES, min_size=width, max_size=width))
    frame = pd.concat([s.reset_index(drop=True) for s in data], axis=1)
    frame.columns = names
    return frame


PARAMETERS = (*_DEFAULTS, "reference", "pseudocount", "min_count", "frame")


def _ours(exc: BaseException, names) -> bool:
    """An infoscope error: raised in infoscope's code, naming a column or a parameter."""
    if not isinstance(exc, (ValueError, TypeError, KeyError)):
        return False
    frames = traceback.extract_tb(exc.__traceback__)
    if not frames or not frames[-1].filename.startswith(SRC):
        return False
    text = str(exc)
    return "column" in text or any(repr(n) in text for n in names) or any(p in text for p in PARAMETERS)


def _check_entropy(table: pd.DataFrame, estimator: str) -> None:
    unit = {"bits": math.log(2), "nats": 1.0}[table.attrs["unit"]]
    for row in table.itertuples():
        present = row.n - row.missing
        if present == 0:
            assert math.isnan(row.entropy), row
            continue
        assert not math.isnan(row.entropy), f"column {row.column!r}: NaN entropy with {present} values"
        assert row.k >= 1 and row.max_entropy == pytest.approx(math.log(row.k) / unit, abs=1e-9), row
        assert row.entropy >= -1e-12, row
        excess = row.entropy - row.max_entropy
        if excess > 1e-9:
            # above log K only with a bias correction; flagged exceeds_log_k when the
            # excess is beyond 1.96 of its standard errors (issue 10: a smaller one is
            # sampling noise, infoscope.estimators.intervals.entropy_standard_error)
            assert estimator != "plugin", row
            if "exceeds_log_k" not in row.flags:
                assert row.kind in ("integer_categories", "text"), row
            if estimator == "miller_madow":
                assert excess * unit <= (row.k - 1) / (2 * present) + 1e-9, row


def _calls(frame: pd.DataFrame, estimator: str):
    """Every profile method, each as its own call (one refusing does not hide the others)."""
    acc = frame.info_profile
    kw = {"estimator": estimator, "n_boot": 40, "bins": 4}
    names = acc.session(**kw).names
    yield lambda: _check_entropy(acc.entropy(**kw), estimator)
    if len(names) >= 2:
        def pairs():
            table = acc.pairs(**kw)
            assert len(table) == len(names) * (len(names) - 1) // 2
            if estimator == "plugin":
                assert (table.loc[table["n"] > 0, "mi"] >= -1e-12).all()
        yield pairs
        yield lambda: acc.matrix(**kw)
        yield lambda: acc.pair(names[0], names[1], **kw)
        yield lambda: acc.relevance(names[0], **kw)
    yield lambda: acc.drift(frame.iloc[::-1].reset_index(drop=True), **kw)


def _run(call, names) -> None:
    try:
        call()
    except Exception as exc:  # noqa: BLE001 - the property is about which errors escape
        if not _ours(exc, names):
            raise


@settings(max_examples=40)
@given(frame=messy_frames(), estimator=st.sampled_from(ESTIMATORS))
def test_every_method_on_messy_frames(frame, estimator):
    before = copy.deepcopy(frame)
    names = list(frame.columns)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # the warnings are the point of such data; errors are checked
        session = None
        try:
            session = frame.info_profile.session(estimator=estimator)
        except Exception as exc:  # noqa: BLE001
            if not _ours(exc, names):
                raise
        if session is not None:
            for call in _calls(frame, estimator):
                _run(call, names)
    pd.testing.assert_frame_equal(frame, before)
    assert frame.attrs == before.attrs and list(frame.columns) == names
