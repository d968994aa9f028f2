"""Messy input at the frame level (issue 13): a correct result or one clear
message naming the column or parameter, never a raw traceback from inside numpy
or pandas, and never a stale or silently wrong number.

Expected numbers are closed forms (common practice) or ``scipy.stats.entropy``
of the counts that the values imply.
"""
from __future__ import annotations

import copy
import importlib
import warnings
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
import scipy.stats

import infoscope  # noqa: F401  (registers df.info_profile)
from infoscope.encode.cache import content_key


def quiet(func, *args, **kwargs):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return func(*args, **kwargs)


def test_numbers_beside_tuples_in_an_object_column():
    # pandas' hashing raises ValueError ("setting an array element with a sequence")
    # on tuples beside numbers; the column is then encoded without the cache
    cells = [1, (1, 2), 2.5, (3,)] * 10
    df = pd.DataFrame({"m": pd.Series(cells, dtype=object), "y": [0, 1] * 20})
    before = copy.deepcopy(df)
    assert content_key(df["m"]) is None
    with pytest.warns(infoscope.DataQualityWarning, match=r"column 'm': values of several types"):
        row = df.info_profile.entropy(estimator="plugin", n_boot=0).set_index("column").loc["m"]
    # four distinct cells, ten rows each: scipy.stats.entropy([10] * 4, base=2) = 2 bits
    assert row["k"] == 4 and row["entropy"] == pytest.approx(scipy.stats.entropy([10] * 4, base=2))
    pair = quiet(df.info_profile.pair, "m", "y")
    assert pair.n == 40
    pd.testing.assert_frame_equal(df, before)


def test_profiles_are_not_reused_across_1_and_the_text_1():
    # pandas hashes object cells through their text: 1 and "1" collided, and the
    # second frame got the first one's session (its mixed_types flag)
    mixed = pd.DataFrame({"m": pd.Series([1, "x", 2, "y"] * 10, dtype=object)})
    text = pd.DataFrame({"m": pd.Series(["1", "x", "2", "y"] * 10, dtype=object)})
    assert "mixed_types" in quiet(mixed.info_profile.entropy).loc[0, "flags"]
    assert "mixed_types" not in quiet(text.info_profile.entropy).loc[0, "flags"]


# ------------------------------------------------------------------ settings, one validation
SMALL = pd.DataFrame({"a": [0, 1] * 20, "b": [0, 0, 1, 1] * 10})


@pytest.mark.parametrize("seed", [-1, -(2**40)])
def test_negative_seed_is_named_before_any_work(seed):
    # numpy's "expected non-negative integer" came from the bootstrap's child seeds
    from infoscope.frame.session import ProfileSession

    with pytest.raises(ValueError, match=rf"seed={seed} must be an integer >= 0"):
        SMALL.info_profile.entropy(seed=seed)
    with pytest.raises(ValueError, match="seed=-1 must be an integer >= 0"):
        ProfileSession(SMALL).update(seed=-1)
    with pytest.raises(ValueError, match="seed=-1"):
        SMALL.info_profile(seed=-1)  # the widget: at the call, not in its worker thread
    import polars as pl
    importlib.import_module("infoscope.polars")
    with pytest.raises(ValueError, match="seed=-1 must be an integer >= 0"):
        pl.from_pandas(SMALL).info_profile.entropy(seed=-1)
    with pytest.raises(ValueError, match="alpha=-1 is invalid"):
        pl.from_pandas(SMALL).info_profile.entropy(alpha=-1)


@pytest.mark.parametrize("estimator", ["plugin", "miller_madow", "chao_shen", "james_stein", "dirichlet",
                                       "grassberger", "nsb"])
@pytest.mark.parametrize(("alpha", "exc", "match"), [
    (-1, ValueError, "alpha=-1 is invalid"),
    (float("nan"), ValueError, "alpha=nan is invalid"),
    (0, ValueError, "alpha=0 is invalid"),
    ("x", ValueError, "alpha='x' is not valid"),
    ([1], TypeError, "alpha must be a number"),
])
def test_bad_alpha_is_refused_for_every_estimator(estimator, alpha, exc, match):
    with pytest.raises(exc, match=match):
        SMALL.info_profile.entropy(estimator=estimator, alpha=alpha)


def test_alpha_unused_by_the_estimator_is_said_once():
    from infoscope import InfoscopeWarning
    from infoscope.frame.session import ProfileSession

    with pytest.warns(InfoscopeWarning, match=r"alpha=0.5 is not used: only estimator='dirichlet'"):
        session = ProfileSession(SMALL, alpha=0.5)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        session.update(bins=4)  # nothing new about alpha: no second note
    # with dirichlet it is used: 2 symbols x 20 rows, alpha 0.5 -> (20.5 / 41) each, 1 bit
    dirichlet = ProfileSession(SMALL, alpha=0.5, estimator="dirichlet", n_boot=0).entropy()
    assert dirichlet["entropy"].tolist() == pytest.approx([scipy.stats.entropy([20.5, 20.5], base=2)] * 2)


def test_multiindex_target_is_a_tuple_like_in_pair():
    columns = pd.MultiIndex.from_tuples([("g", "c"), ("g", "d"), ("h", "e")])
    df = pd.DataFrame(np.arange(120).reshape(40, 3) % 4, columns=columns)
    df[("g", "d")] = df[("g", "c")] * 2  # a copy of the target, relabelled
    by_tuple = quiet(df.info_profile.relevance, ("g", "c"), n_boot=0)
    by_key = quiet(df.info_profile.relevance, "g / c", n_boot=0)
    pd.testing.assert_frame_equal(by_tuple, by_key)
    assert by_tuple.attrs["target"] == "g / c"
    assert by_tuple.set_index("column").loc["g / d", "leakage"]
    with pytest.raises(KeyError, match=r"target=\('g', 'x'\) is not a column"):
        df.info_profile.relevance(("g", "x"))
    numbered = pd.DataFrame({0: [0, 1] * 20, 1: [0, 1] * 20})
    assert quiet(numbered.info_profile.relevance, 0, n_boot=0)["column"].tolist() == ["1"]



def test_multiindex_columns_with_an_empty_level_work_end_to_end():
    # ('a', '') is keyed "a" (the empty level left out), ('b', 'x') "b / x"; ('', 'a')
    # also reads "a" and is keyed "a (2)", and its tuple still names it, not the first.
    # References: pandas.crosstab (the counts), scipy.stats.entropy (the entropies),
    # sklearn.metrics.mutual_info_score (the plug-in MI, nats).
    from sklearn.metrics import mutual_info_score

    rng = np.random.default_rng(12)
    a = rng.integers(0, 3, 400)
    b = (a + rng.integers(0, 2, 400)) % 4
    c = rng.integers(0, 2, 400)
    columns = pd.MultiIndex.from_tuples([("a", ""), ("b", "x"), ("", "a")])
    df = pd.DataFrame(np.column_stack([a, b, c]), columns=columns)
    before = copy.deepcopy(df)
    settings = {"estimator": "plugin", "n_boot": 0}

    e = quiet(df.info_profile.entropy, **settings)
    assert e["column"].tolist() == ["a", "b / x", "a (2)"]
    for values, h in zip((a, b, c), e["entropy"]):
        assert h == pytest.approx(scipy.stats.entropy(np.bincount(values), base=2))

    p = quiet(df.info_profile.pairs, **settings).set_index(["a", "b"])
    assert p.loc[("a", "b / x"), "mi"] == pytest.approx(mutual_info_score(a, b) / np.log(2))
    assert p.loc[("a", "a (2)"), "mi"] == pytest.approx(mutual_info_score(a, c) / np.log(2))

    t = quiet(df.info_profile.pair, ("a", ""), ("b", "x"), **settings)
    assert np.array_equal(t.counts.to_numpy(dtype=np.int64), pd.crosstab(a, b).to_numpy())
    assert t.mi == pytest.approx(mutual_info_score(a, b) / np.log(2))
    # the tuple of the third column is that column, though its text is the first's
    t = quiet(df.info_profile.pair, ("", "a"), ("a", ""), **settings)
    assert np.array_equal(t.counts.to_numpy(dtype=np.int64), pd.crosstab(c, a).to_numpy())
    assert quiet(df.info_profile.relevance, ("", "a"), n_boot=0).attrs["target"] == "a (2)"
    pd.testing.assert_frame_equal(df, before)


# ------------------------------------------------------------------ integers beyond 2**53
BIG = 2**60


@pytest.mark.parametrize("dtype", ["int64", "uint64", "Int64", "int64[pyarrow]", "uint64[pyarrow]"])
@pytest.mark.parametrize("bins", [4, 16, "fd"])
def test_large_integers_are_binned_as_integers(dtype, bins):
    # 2**60 + i: float64 holds these as a handful of values, so float bins collapsed
    # (k = 0, entropy NaN, "no non-missing values").  Reference: the same offsets i
    # binned by numpy (np.quantile / np.histogram_bin_edges, then np.histogram),
    # where every integer is exact; binning is shift-invariant.
    offsets = np.random.default_rng(7).integers(0, 5_000, 1_000)
    df = pd.DataFrame({"x": pd.Series([BIG + int(i) for i in offsets], dtype=dtype)})
    before = df.copy()
    col = infoscope.encode_column(df["x"], name="x", bins=bins)
    if bins == "fd":
        edges = np.histogram_bin_edges(offsets, bins="fd")
    else:
        edges = np.quantile(offsets, np.linspace(0, 1, bins + 1))
    expected, _ = np.histogram(offsets, bins=edges)
    assert np.bincount(col.codes, minlength=col.k).tolist() == expected.tolist()
    assert col.labels[0].startswith(f"[{BIG + int(offsets.min())}, ")
    assert col.labels[-1].endswith(f", {BIG + int(offsets.max())}]")
    row = quiet(df.info_profile.entropy, bins=bins, estimator="plugin", n_boot=0).iloc[0]
    assert row["k"] == len(expected) and row["n"] == 1_000
    assert row["entropy"] == pytest.approx(scipy.stats.entropy(expected, base=2), rel=1e-12)
    pd.testing.assert_frame_equal(df, before)


def test_large_integers_in_pairs_and_drift():
    df = pd.DataFrame({"x": [BIG + i for i in range(100)], "y": np.arange(100) % 3})
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # no false "no non-missing values"
        pair = df.info_profile.pair("x", "y", bins=4)
    assert pair.n == 100 and pair.counts.to_numpy().sum() == 100
    later = pd.DataFrame({"x": [BIG + i for i in range(50, 150)], "y": np.arange(100) % 3})
    drift = quiet(later.info_profile.drift, df, bins=4).set_index("column")
    # the later batch on the reference's edges: 25 in the third bin, 25 in the fourth,
    # 50 above the last edge (counted in the end bin) -> PSI of (0, 0, .25, .75) vs .25 each
    # (pseudocount 0.5, the session's default): checked against the closed form below
    ref = np.array([25, 25, 25, 25]) + 0.5
    cur = np.array([0, 0, 25, 75]) + 0.5
    p, q = cur / cur.sum(), ref / ref.sum()
    assert drift.loc["x", "psi"] == pytest.approx(float(np.sum((p - q) * np.log(p / q))), rel=1e-9)


def test_extreme_integers_keep_their_order():
    values = [-(2**63), 2**63 - 1] * 30 + list(range(-40, 40))
    col = infoscope.encode_column(pd.Series(values), name="x", bins=4)
    # numpy on exact Python integers (object array) gives the same quantile split:
    # 35 rows per bin, the extremes in the end bins
    assert np.bincount(col.codes).tolist() == [35, 35, 35, 35]
    assert col.labels[0] == f"[{-(2**63)}, -35)" and col.labels[-1] == f"[35, {2**63 - 1}]"
    top = np.array([2**64 - 1, 2**64 - 2, 0, 5] * 20, dtype=np.uint64)
    col = infoscope.encode_column(top, name="u", bins=3, categorical_threshold=2)
    assert col.labels[-1].endswith(f"{2**64 - 1}]") and np.bincount(col.codes).sum() == 80


def test_polars_integers_with_nulls_stay_exact():
    import polars as pl
    importlib.import_module("infoscope.polars")  # registers pl.DataFrame.info_profile

    frame = pl.DataFrame({"x": [BIG + i for i in range(99)] + [None], "u": pl.Series([2**63 + i for i in range(100)],
                                                                                    dtype=pl.UInt64)})
    table = quiet(frame.info_profile.entropy, bins=4, estimator="plugin", n_boot=0).set_index("column")
    # 99 present values in 4 quantile bins: np.histogram(range(99), np.quantile(range(99), ...))
    expected, _ = np.histogram(np.arange(99), bins=np.quantile(np.arange(99), np.linspace(0, 1, 5)))
    assert table.loc["x", "missing"] == 1 and table.loc["x", "k"] == 4
    assert table.loc["x", "entropy"] == pytest.approx(scipy.stats.entropy(expected, base=2), rel=1e-12)
    assert table.loc["u", "entropy"] == pytest.approx(2.0)  # 25 per bin
    assert frame["x"].null_count() == 1  # unchanged


# ------------------------------------------------------------------ ordered objects
def test_period_columns_are_binned_on_their_start_times():
    months = pd.Series(pd.period_range("2020-01", periods=48, freq="M"))
    df = pd.DataFrame({"month": months, "quarter": pd.Series(pd.period_range("2020Q1", periods=4, freq="Q")).repeat(
        12).reset_index(drop=True)})
    col = infoscope.encode_column(df["month"], name="month", bins=4)
    # the same as binning the start instants: pandas' own start_time, then our datetime encoder
    ref = infoscope.encode_column(months.dt.start_time, name="month", bins=4)
    assert col.kind == "datetime" and col.codes.tolist() == ref.codes.tolist() and col.labels == ref.labels
    quarters = infoscope.encode_column(df["quarter"], name="quarter")
    assert quarters.labels == ("2020Q1", "2020Q2", "2020Q3", "2020Q4")
    row = quiet(df.info_profile.entropy, bins=4, estimator="plugin", n_boot=0).set_index("column")
    assert row.loc["month", "k"] == 4 and row.loc["month", "entropy"] == pytest.approx(2.0)  # 12 per bin
    assert "id_like" not in row.loc["month", "flags"]


def test_interval_columns_are_read_by_their_midpoints():
    iv = pd.Series(pd.interval_range(0, 40, periods=40))
    col = infoscope.encode_column(iv, name="iv", bins=4)
    ref = infoscope.encode_column(pd.Series(np.arange(40) + 0.5), name="iv", bins=4)  # the midpoints
    assert col.kind == "numeric" and col.codes.tolist() == ref.codes.tolist() and col.labels == ref.labels
    few = infoscope.encode_column(pd.Series(list(pd.interval_range(0, 3, periods=3)) * 5), name="few")
    assert few.labels == ("(0, 1]", "(1, 2]", "(2, 3]")
    shared = pd.Series(pd.IntervalIndex.from_tuples([(0, 10), (4, 6), (20, 30)] * 4))
    with pytest.warns(infoscope.DataQualityWarning, match=r"column 'ivs': 1 distinct interval\(s\) share their midpoint"):
        both = infoscope.encode_column(shared, name="ivs")
    assert both.k == 2
    dates = pd.Series(pd.interval_range(pd.Timestamp("2024-01-01"), periods=40, freq="D"))
    assert infoscope.encode_column(dates, name="d", bins=4).kind == "datetime"


@pytest.mark.parametrize("library", ["pandas", "polars"])
def test_times_of_day_are_binned_as_time_since_midnight(library):
    import datetime

    times = [datetime.time(h % 24, (7 * h) % 60, 30) for h in range(96)]
    seconds = np.array([(t.hour * 60 + t.minute) * 60 + t.second for t in times])
    if library == "polars":
        import polars as pl
        importlib.import_module("infoscope.polars")  # registers pl.DataFrame.info_profile

        frame = pl.DataFrame({"t": times + [None]})
    else:
        frame = pd.DataFrame({"t": pd.Series(times + [None], dtype=object)})
    table = quiet(frame.info_profile.entropy, bins=4, estimator="plugin", n_boot=0).iloc[0]
    # reference: numpy's quantile bins of the seconds of the day
    expected, _ = np.histogram(seconds, bins=np.quantile(seconds, np.linspace(0, 1, 5)))
    assert table["kind"] == "timedelta" and table["missing"] == 1 and table["k"] == 4
    assert table["entropy"] == pytest.approx(scipy.stats.entropy(expected, base=2), rel=1e-12)
    col = quiet(infoscope.encode_column, pd.Series(times, dtype=object), name="t", bins=4)
    assert col.labels[0].startswith("[00:00") and "days" not in " ".join(col.labels)


def test_complex_numbers_are_labels_and_say_so():
    df = pd.DataFrame({"z": np.array([1 + 2j, 3j, 1 + 2j, 0j] * 10)})
    with pytest.warns(infoscope.DataQualityWarning, match="column 'z': complex numbers have no order"):
        row = df.info_profile.entropy(estimator="plugin", n_boot=0).iloc[0]
    # counts 20, 10, 10: scipy.stats.entropy([20, 10, 10], base=2) = 1.5 bits
    assert row["k"] == 3 and row["entropy"] == pytest.approx(scipy.stats.entropy([20, 10, 10], base=2))


def test_export_and_widget_take_the_converted_columns(tmp_path):
    import datetime

    from infoscope.frame.session import ProfileSession
    from infoscope.report.html import to_html

    df = pd.DataFrame({"x": [BIG + i for i in range(100)], "p": pd.period_range("2020-01", periods=100, freq="D"),
                       "iv": pd.interval_range(0, 100, periods=100),
                       "t": [datetime.time(i % 24, i % 60) for i in range(100)], "y": np.arange(100) % 3})
    session = quiet(ProfileSession, df, target="y", n_boot=0, bins=4)
    page = Path(quiet(to_html, session, tmp_path / "p.html")).read_text()
    assert f"[{BIG}, {BIG + 25})" in page  # the exact integer edges reach the page
    widget = quiet(df.info_profile, n_boot=0, bins=4)
    assert widget.wait(timeout=60)
    assert widget._status["state"] == "idle", widget._status
    widget.close()


def test_decimals_that_float64_cannot_tell_apart_are_said():
    from decimal import Decimal

    cells = [Decimal("0.1"), Decimal("0.10000000000000000001"), Decimal("2.5")] * 10
    with pytest.warns(infoscope.DataQualityWarning, match=r"column 'd': 1 Decimal value\(s\) differ"):
        col = infoscope.encode_column(pd.Series(cells, dtype=object), name="d")
    assert col.k == 2
    plain = [Decimal("0.1"), Decimal("2.5")] * 10
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        assert infoscope.encode_column(pd.Series(plain, dtype=object), name="d").k == 2
