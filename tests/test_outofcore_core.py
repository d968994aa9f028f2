"""Pass 1 / pass 2 of the out-of-core path give the in-memory encoder's alphabets and codes exactly.

The reference is the project's own in-memory encoder (``encode_column``), whose
quantile edges are checked against ``numpy.quantile`` (method "linear") in
tests/test_binning.py and tests/test_order_stats.py; here the batch summaries must
reproduce its every decision (edges bit for bit, labels, kinds, flags, warnings,
codes) for any split of the rows into batches.
"""
from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from infoscope.encode import batch_pass1, batch_specs
from infoscope.encode.encoder import _encode
from infoscope.encode.summaries import OutOfCoreError, Pass1, column_specs, encode_batch, merge, summarize


def _pass1(frame: pd.DataFrame, batch_rows: int, **settings):
    p = Pass1(column_specs(frame.dtypes.to_dict(), **settings))
    rounds = 0
    while (req := p.request()) is not None:
        total = None
        for i in range(0, len(frame), batch_rows):
            part = summarize(frame.iloc[i:i + batch_rows], req)
            total = part if total is None else merge(total, part, p.specs)
        p.absorb(total)
        rounds += 1
    for q in p.queries():  # the source's answers, here from pandas (what a GROUP BY gives)
        values = frame[q.column].dropna()
        if q.kind == "distinct":
            p.answer(q, int(values.nunique()))
        else:
            vc = values.value_counts()
            cc = vc.value_counts()
            boundary = vc.sort_values(ascending=False).iloc[q.limit - 1]
            p.answer(q, {"n_distinct": int(vc.size), "counts_of_counts": list(cc.items()),
                         "top": [(k, int(v)) for k, v in vc.items() if v >= boundary]})
    return p.alphabets(), rounds


def _codes(frame, alphabets, batch_rows):
    names = list(alphabets)
    parts = [encode_batch(frame.iloc[i:i + batch_rows], [alphabets[n] for n in names])
             for i in range(0, len(frame), batch_rows)]
    return {n: np.concatenate([p[j] for p in parts]) for j, n in enumerate(names)}


def _assert_same(frame, batch_rows, *, exact_distinct=True, **settings):
    enc_settings = {k: v for k, v in settings.items()}
    alphabets, rounds = _pass1(frame, batch_rows, **settings)
    codes = _codes(frame, alphabets, batch_rows)
    for name in frame.columns:
        col, messages = _encode(frame[name], name, enc_settings.get("bins", "rows"),
                                enc_settings.get("strategy", "quantile"), enc_settings.get("missing", "drop"),
                                enc_settings.get("max_categories", 64), enc_settings.get("categorical_threshold", 32),
                                False)
        a = alphabets[name]
        where = f"column {name!r}, batches of {batch_rows}"
        assert a.kind == col.kind, where
        assert a.k == col.k, where
        assert a.labels == col.labels, where
        assert a.flags == col.flags, where
        assert a.n == col.n and a.n_missing == col.n_missing, where
        assert a.settings == col.settings, where
        assert a.messages == messages, where
        if col.edges is None:
            assert a.edges is None, where
        else:
            assert a.edges.dtype == col.edges.dtype, where
            assert np.array_equal(a.edges, col.edges), where
        if a.n_distinct_exact:
            assert a.n_distinct == col.n_distinct, where
        if col.level_counts is None:
            assert a.level_counts is None, where
        else:
            assert np.array_equal(a.level_counts, col.level_counts), where
        assert codes[name].dtype == col.codes.dtype, where
        assert np.array_equal(codes[name], col.codes), where
    return alphabets, rounds


def _mixed_frame(n: int, seed: int = 7) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    x = rng.normal(size=n)
    x[rng.random(n) < 0.05] = np.nan
    heavy = rng.standard_cauchy(size=n)
    heavy[:3] = [np.inf, -np.inf, np.inf]
    small_int = rng.integers(0, 7, size=n)
    counts = pd.array(rng.poisson(40, size=n), dtype="Int64")
    counts[rng.random(n) < 0.1] = pd.NA
    text = rng.choice(np.array(["north", "south", "east", "west", "(missing)"], dtype=object), size=n,
                      p=[0.4, 0.3, 0.2, 0.05, 0.05]).astype(object)
    text[rng.random(n) < 0.03] = None
    many = np.array([f"level{int(v)}" for v in rng.zipf(1.6, size=n) % 200], dtype=object)
    when = pd.Series(pd.Timestamp("2026-01-01") + pd.to_timedelta(rng.integers(0, 10**7, size=n), unit="s"))
    when[rng.random(n) < 0.02] = pd.NaT
    zoned = pd.Series(when.dt.tz_localize("Europe/Berlin", ambiguous="NaT", nonexistent="NaT"))
    return pd.DataFrame({
        "x": x, "heavy": heavy, "small_int": small_int, "counts": counts, "text": text, "many": many,
        "flag": rng.random(n) < 0.3, "whole": np.round(rng.normal(50, 20, size=n)),
        "row_id": np.arange(n) * 3 + 10, "when": when, "zoned": zoned,
        "wait": pd.to_timedelta(rng.exponential(600, size=n).round(), unit="s"),
        "big": (np.int64(2**60) + rng.integers(0, 1000, size=n)).astype(np.int64),
        "empty": np.full(n, np.nan),
    })


@pytest.mark.parametrize("batch_rows", [1, 97, 1000, 5000])
def test_alphabets_and_codes_equal_the_in_memory_encoder(batch_rows):
    frame = _mixed_frame(3000 if batch_rows > 1 else 400)
    _assert_same(frame, batch_rows)


@pytest.mark.parametrize("settings", [
    {"bins": 7}, {"bins": 5, "strategy": "uniform"}, {"missing": "category"},
    {"max_categories": 6}, {"max_categories": 6, "missing": "category"}, {"categorical_threshold": 0},
    {"bins": [-1.0, 0.0, 0.5, 2.0]},
])
def test_every_setting_decides_the_same_alphabet(settings):
    frame = _mixed_frame(2500, seed=11)
    if isinstance(settings.get("bins"), list):
        frame = frame[["x", "heavy", "whole", "text"]]
    _assert_same(frame, 333, **settings)


def test_beyond_the_cap_the_order_statistics_come_from_selection_rounds(monkeypatch):
    # a small cap forces the radix selection (several rounds) on a few thousand values
    # (each constant patched in the module that reads it)
    monkeypatch.setattr(batch_specs, "LEVEL_CAP", 40)
    monkeypatch.setattr(batch_pass1, "COLLECT_MAX", 25)
    monkeypatch.setattr(batch_pass1, "SELECT_BUCKETS", 8)
    monkeypatch.setattr(batch_pass1, "_FIRST_BUCKETS", 16)
    frame = _mixed_frame(4000, seed=3)
    rng = np.random.default_rng(5)
    frame["ties"] = np.round(rng.normal(size=4000), 1)  # heavy ties inside the selected ranges
    frame["ids"] = np.array([f"u{v}" for v in rng.permutation(4000)], dtype=object)  # ID-like text beyond the cap
    frame["uid"] = rng.permutation(4000) + 17  # whole numbers, dense, not monotone: distinct count asked
    alphabets, rounds = _assert_same(frame, 512, max_categories=20)
    assert rounds >= 3
    assert "id_like" in alphabets["ids"].flags and "id_like" in alphabets["uid"].flags
    assert not alphabets["x"].n_distinct_exact


def test_a_batch_of_another_type_names_the_column_and_both_types():
    frame = pd.DataFrame({"a": [1.5, 2.5], "b": ["x", "y"]})
    p = Pass1(column_specs(frame.dtypes.to_dict()))
    bad = pd.DataFrame({"a": ["1", "2"], "b": ["x", "y"]})
    with pytest.raises(OutOfCoreError, match=r"column 'a'.*a batch has dtype (str|object).*float64"):
        summarize(bad, p.request())


def test_width_rules_need_memory_and_say_so():
    with pytest.raises(OutOfCoreError, match=r"column 'a'.*bins='fd'.*sample="):
        column_specs({"a": np.dtype(np.float64)}, bins="fd")


def test_the_public_names_live_in_summaries_and_their_examples_run():
    # summaries.py is the home of the public names; each part's docstring examples print what they say
    import doctest
    import importlib

    from infoscope.encode import summaries

    for name in summaries.__all__:
        assert getattr(summaries, name) is not None, name
    for part in ("batch_specs", "batch_summaries", "batch_pass1", "batch_alphabet"):
        module = importlib.import_module(f"infoscope.encode.{part}")
        result = doctest.testmod(module, optionflags=doctest.NORMALIZE_WHITESPACE)
        assert result.failed == 0 and result.attempted > 0, module.__name__
