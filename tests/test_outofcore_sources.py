"""Out-of-core profiles of files, Arrow datasets, DuckDB relations and Polars LazyFrames.

The reference is the in-memory profile (``ProfileSession``) of the same rows read
whole by pyarrow (``pyarrow.dataset.dataset(...).to_table()``): the out-of-core
count tables, symbol counts and result tables must equal it exactly.  Bad sources
must give one error naming the file or the column.
"""
from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pyarrow as pa
import pyarrow.dataset as ds
import pyarrow.parquet as pq
import pytest

import infoscope
from infoscope.frame.session import ProfileSession
from infoscope.sources import NeedsRows, SourceError, arrow_to_pandas, profile


def _frame(n: int, seed: int) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    x = rng.normal(size=n)
    x[rng.random(n) < 0.05] = np.nan
    levels = np.array(["red", "green", "blue", "amber"], dtype=object)
    colour = levels[rng.integers(0, 4, size=n)].astype(object)
    colour[rng.random(n) < 0.04] = None
    return pd.DataFrame({
        "x": x,
        "y": x * 2 + rng.normal(size=n),
        "count": pd.array(rng.poisson(30, size=n), dtype="Int64"),
        "colour": colour,
        "big": (np.int64(2**60) + rng.integers(0, 500, size=n)).astype(np.int64),
        "row_id": np.arange(seed * 10**6, seed * 10**6 + n),
        "flag": rng.random(n) < 0.2,
        "when": pd.Timestamp("2026-03-01") + pd.to_timedelta(rng.integers(0, 86_400 * 30, size=n), unit="s"),
    })


def _write(folder, parts, row_groups):
    for i, (part, rg) in enumerate(zip(parts, row_groups)):
        pq.write_table(pa.Table.from_pandas(part, preserve_index=False), folder / f"part-{i:02d}.parquet",
                       row_group_size=rg)


def _reference(path, **settings):
    table = ds.dataset(sorted(str(p) for p in path.glob("*.parquet")), format="parquet").to_table()
    return ProfileSession(arrow_to_pandas(table), **settings)


def _assert_same_tables(out, ref):
    assert out.names == ref.names
    for name in ref.names:
        a, b = out.column(name), ref.column(name)
        assert (a.kind, a.k, a.labels, a.flags, a.n, a.n_missing) == (b.kind, b.k, b.labels, b.flags, b.n, b.n_missing), name
        assert np.array_equal(out.engine.marginal(name), ref.engine.marginal(name)), name
    for i, a in enumerate(ref.names):
        for b in ref.names[i + 1:]:
            assert np.array_equal(out.engine.table(a, b), ref.engine.table(a, b)), (a, b)


@pytest.mark.parametrize("memory_limit", ["16MiB", "64MB"])
def test_parquet_folder_tables_equal_the_in_memory_tables(tmp_path, memory_limit):
    parts = [_frame(700, 1), _frame(1500, 2), _frame(300, 3)]
    parts[2]["colour"] = "violet"  # a level that appears only in the last file
    _write(tmp_path, parts, [100, 1000, 64])
    settings = dict(n_boot=0, bins=8)
    out = profile(tmp_path, memory_limit=memory_limit, progress=False, **settings)
    ref = _reference(tmp_path, **settings)
    _assert_same_tables(out, ref)
    pd.testing.assert_frame_equal(out.entropy(), ref.entropy(), check_like=False)
    pd.testing.assert_frame_equal(out.pairs(), ref.pairs())
    assert out.entropy().attrs["source"] == str(tmp_path)
    assert "violet" in out.column("colour").labels


def test_small_batches_and_a_glob_give_the_same_tables(tmp_path, monkeypatch):
    from infoscope.sources import passes

    monkeypatch.setattr(passes, "BATCH_ROWS", (37, 37))  # batches cut across row groups and files
    _write(tmp_path, [_frame(400, 4), _frame(250, 5)], [50, 128])
    out = profile(str(tmp_path / "*.parquet"), progress=False, n_boot=0)
    _assert_same_tables(out, _reference(tmp_path, n_boot=0))


def test_arrow_dataset_duckdb_and_polars_sources_agree(tmp_path):
    import duckdb
    import polars as pl

    _write(tmp_path, [_frame(600, 6), _frame(600, 7)], [200, 600])
    files = sorted(str(p) for p in tmp_path.glob("*.parquet"))
    ref = _reference(tmp_path, n_boot=0)
    _assert_same_tables(profile(ds.dataset(files, format="parquet"), progress=False, n_boot=0), ref)
    con = duckdb.connect()
    rel = con.sql(f"SELECT * FROM read_parquet({files!r})")
    _assert_same_tables(profile(rel, progress=False, n_boot=0), ref)
    _assert_same_tables(profile(pl.scan_parquet(files), progress=False, n_boot=0), ref)


def test_p_values_and_relevance_come_from_the_tables(tmp_path):
    _write(tmp_path, [_frame(300, 8)], [100])
    out = profile(tmp_path, progress=False, n_boot=0, target="y")
    rel = out.relevance()
    assert rel["p_value"].notna().all()
    assert set(rel["p_method"]) <= {"chi2", "permutation", "none"}
    assert out.pair("x", "y").counts.to_numpy().sum() > 0
    html = out.to_html()
    assert "<html" in html.lower()


def test_views_that_read_rows_say_to_use_a_sample(tmp_path):
    _write(tmp_path, [_frame(300, 9)], [100])
    out = profile(tmp_path, progress=False, n_boot=0)
    with pytest.raises(NeedsRows, match="sample="):
        out.pair_drift(pd.DataFrame({"x": [1.0, 2.0]}))
    with pytest.raises(NeedsRows, match="sample="):
        out.conditional("x", "y", given=["colour"])
    with pytest.raises(NeedsRows, match="another pass"):
        out.update(bins=4)
    out.update(estimator="plugin")  # needs no new encoding
    sampled = profile(tmp_path, progress=False, n_boot=0, sample=100, seed=3)
    assert sampled.sampled == 100 and sampled.n_rows == 300
    assert sampled.entropy().attrs["sampled"] == 100


def test_bad_sources_give_one_clear_error(tmp_path):
    with pytest.raises(SourceError, match="no such file or folder"):
        profile(tmp_path / "nothing", progress=False)
    empty = tmp_path / "empty"
    empty.mkdir()
    with pytest.raises(SourceError, match="holds no Parquet or CSV files"):
        profile(empty, progress=False)
    with pytest.raises(SourceError, match="no file matches"):
        profile(str(tmp_path / "*.parquet"), progress=False)
    good = tmp_path / "good"
    good.mkdir()
    _write(good, [_frame(100, 1), _frame(100, 2)], [50, 50])
    cut = tmp_path / "cut"
    cut.mkdir()
    data = (good / "part-00.parquet").read_bytes()
    (cut / "part-00.parquet").write_bytes(data[: len(data) // 2])
    with pytest.raises(SourceError, match=r"part-00\.parquet.*cut short"):
        profile(cut, progress=False)
    clash = tmp_path / "clash"
    clash.mkdir()
    a, b = _frame(100, 1), _frame(100, 2)
    b["count"] = b["count"].astype("float64")
    _write(clash, [a, b], [50, 50])
    with pytest.raises(SourceError, match=r"column 'count'.*int64 in .*part-00.*double in .*part-01"):
        profile(clash, progress=False)


def test_a_column_all_missing_in_one_file(tmp_path):
    a, b = _frame(200, 1), _frame(200, 2)
    b["x"] = np.nan
    b["colour"] = None
    _write(tmp_path, [a, b], [100, 100])
    out = profile(tmp_path, progress=False, n_boot=0)
    _assert_same_tables(out, _reference(tmp_path, n_boot=0))
    # a column of nulls only (Arrow type null) in one file takes the type of the others
    c = tmp_path / "nulls"
    c.mkdir()
    pq.write_table(pa.table({"v": pa.array([1.5, 2.5, 3.5] * 20)}), c / "a.parquet")
    pq.write_table(pa.table({"v": pa.nulls(30)}), c / "b.parquet")
    s = profile(c, progress=False, n_boot=0)
    assert s.column("v").n_missing == 30 and s.column("v").n == 90


def test_the_package_exports_profile():
    assert infoscope.profile is profile


@pytest.mark.filterwarnings("ignore:column '(ref|shop)'")  # the folding warnings: expected here
def test_text_and_whole_numbers_beyond_the_level_cap_are_answered_by_duckdb(tmp_path):
    # more distinct values than pass 1 keeps exactly (LEVEL_CAP = 32,768): the levels and the
    # distinct count come from DuckDB queries over the files (seen failing on DuckDB 2, whose
    # relations have no fetchone); the tables must still equal the in-memory ones
    rng = np.random.default_rng(8)
    n = 40_000
    parts = []
    for i in range(2):
        ids = rng.permutation(n // 2) + i * n
        parts.append(pd.DataFrame({
            "ref": np.array([f"R{v:06d}" for v in ids], dtype=object),
            "uid": ids * 7 + 3,
            "shop": np.array([f"s{v}" for v in rng.zipf(1.6, size=n // 2) % 500], dtype=object),
            "x": rng.normal(size=n // 2),
        }))
    _write(tmp_path, parts, [5_000, 5_000])
    out = profile(tmp_path, progress=False, n_boot=0, max_categories=32)
    ref = _reference(tmp_path, n_boot=0, max_categories=32)
    _assert_same_tables(out, ref)
    assert "id_like" in out.column("ref").flags


def test_the_widget_on_count_tables_says_when_a_control_needs_another_pass(tmp_path):
    from infoscope.widgets import ProfileWidget

    _write(tmp_path, [_frame(300, 1), _frame(300, 2)], [100, 100])
    s = profile(tmp_path, progress=False, n_boot=0)
    w = ProfileWidget(s, threaded=False)
    assert w._status["state"] == "idle" and w._status["message"] == "" and json.loads(w._entropy)["rows"]
    shown, bins = w.generation, w.bins
    w.bins = bins - 2  # new bins need the rows: said, the slider returns, the session keeps its settings
    assert w._status["state"] == "idle" and "needs another pass" in w._status["message"]
    assert w.bins == bins and w.generation == shown and s.settings["bins"] == "rows"
    w.estimator = "plugin"  # the tables answer this one
    assert w._status["message"] == "" and w.generation > shown and s.settings["estimator"] == "plugin"
    assert json.loads(w._entropy)["rows"]
