"""PairEngine and the chunk / merge / finalize layer.

Reference for every table: ``pandas.crosstab`` of the same codes over the rows where
both columns are present (pairwise-complete cases), with every category 0..k-1 kept.
"""
from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from infoscope.engine import PairEngine, count_chunk, counting, finalize, merge, sample_rows

from infoscope.encode.columns import EncodedColumn, encode_column


def Col(name, codes, k):
    """An EncodedColumn of these codes (the other fields only describe them)."""
    missing = int(np.count_nonzero(codes == k))
    return EncodedColumn(name=name, codes=codes, k=k, labels=tuple(str(i) for i in range(k)),
                         kind="integer_categories", n=codes.shape[0], n_missing=missing, edges=None,
                         flags=(), settings=("test",), n_distinct=k)


def make_col(name, k, n, rng, missing=0.1):
    dtype = np.uint8 if k + 1 <= 256 else np.uint16
    codes = rng.integers(0, max(k, 1), n) if k > 0 else np.zeros(n, dtype=np.int64)
    codes = np.where(rng.random(n) < missing, k, codes).astype(dtype)
    return Col(name, codes, k)


def crosstab_reference(a: Col, b: Col) -> np.ndarray:
    """pandas.crosstab of the rows where both codes are symbols (not the sentinel k)."""
    both = (a.codes < a.k) & (b.codes < b.k)
    if a.k == 0 or b.k == 0:
        return np.zeros((a.k, b.k), dtype=np.int64)
    ta = pd.Categorical(a.codes[both], categories=range(a.k))
    tb = pd.Categorical(b.codes[both], categories=range(b.k))
    return pd.crosstab(ta, tb, dropna=False).reindex(index=range(a.k), columns=range(b.k), fill_value=0).to_numpy()


def assert_all_pairs_match_crosstab(eng: PairEngine, cols):
    by_name = {c.name: c for c in cols}
    tables = eng.tables()
    names = [c.name for c in cols]
    assert list(tables) == [(a, b) for i, a in enumerate(names) for b in names[i + 1:]]
    for (a, b), t in tables.items():
        assert t.dtype == np.int64
        np.testing.assert_array_equal(t, crosstab_reference(by_name[a], by_name[b]), err_msg=f"pair {(a, b)}")


frames = st.builds(
    lambda seed, n, ks, missing: [
        make_col(f"c{i}", k, n, np.random.default_rng(seed + i), missing) for i, k in enumerate(ks)
    ],
    seed=st.integers(0, 2**31),
    n=st.integers(0, 400),
    ks=st.lists(st.one_of(st.integers(0, 9), st.sampled_from([1, 17, 64, 300])), min_size=2, max_size=5),
    missing=st.sampled_from([0.0, 0.05, 0.5]),
)


# ------------------------------------------------------------------ full counts
class parallel_kernel_forced:
    """Send even tiny chunks through the threaded numba kernel (normally they run serially)."""

    def __enter__(self):
        self.saved = counting.SERIAL_INCREMENTS
        counting.SERIAL_INCREMENTS = 0

    def __exit__(self, *exc):
        counting.SERIAL_INCREMENTS = self.saved


@given(cols=frames, chunk_rows=st.integers(1, 500))
@settings(max_examples=30)
def test_tables_equal_pandas_crosstab_for_every_backend_chunking_and_thread_count(cols, chunk_rows):
    # reference: pandas.crosstab over pairwise-complete rows (see crosstab_reference),
    # computed once per frame and compared with every way the engine can count
    by_name = {c.name: c for c in cols}
    names = [c.name for c in cols]
    expected = {(a, b): crosstab_reference(by_name[a], by_name[b])
                for i, a in enumerate(names) for b in names[i + 1:]}
    configurations = [
        dict(backend="numba", chunk_rows=chunk_rows, threads=1),
        dict(backend="numba", chunk_rows=chunk_rows, threads=2),
        dict(backend="numpy", chunk_rows=chunk_rows),
    ]
    for options in configurations:
        with parallel_kernel_forced():
            tables = PairEngine(cols, progress=False, **options).tables()
        assert list(tables) == list(expected)
        for pair, t in tables.items():
            assert t.dtype == np.int64
            np.testing.assert_array_equal(t, expected[pair], err_msg=f"pair {pair} with {options}")


def test_columns_from_encode_column(rng):
    n = 3000
    x = rng.normal(size=n)
    x[rng.random(n) < 0.1] = np.nan
    frame = pd.DataFrame({
        "x": x,
        "y": pd.Categorical(rng.choice(["north", "south", "east"], n)),
        "z": np.where(rng.random(n) < 0.05, None, rng.integers(0, 300, n).astype(str)).astype(object),
    })
    cols = [encode_column(frame[c], name=c, bins=8, max_categories=None, cache=False) for c in frame]
    eng = PairEngine(cols, progress=False)
    assert_all_pairs_match_crosstab(eng, cols)
    assert eng.table("x", "y").sum() == np.count_nonzero(~np.isnan(x))  # y has no missing rows
    # reference: pandas.crosstab of the x bin labels and the original y values
    present = cols[0].codes < cols[0].k
    x_labels = pd.Categorical(np.asarray(cols[0].labels)[cols[0].codes[present]], categories=list(cols[0].labels))
    tx = pd.crosstab(x_labels, frame["y"].to_numpy()[present], dropna=False)
    tx = tx.reindex(index=list(cols[0].labels), columns=list(cols[1].labels), fill_value=0)
    np.testing.assert_array_equal(eng.table("x", "y"), tx.to_numpy())


def test_uint16_column_with_300_levels(rng):
    cols = [make_col("wide", 300, 5000, rng), make_col("narrow", 4, 5000, rng), make_col("mid", 255, 5000, rng)]
    assert cols[0].codes.dtype == np.uint16 and cols[2].codes.dtype == np.uint8
    for backend in ("numba", "numpy"):
        eng = PairEngine(cols, backend=backend, progress=False, chunk_rows=777)
        assert_all_pairs_match_crosstab(eng, cols)
        assert eng.table("wide", "narrow").shape == (300, 4)


def test_k1_and_k0_columns(rng):
    one = Col("one", np.zeros(50, np.uint8), 1)
    one_missing = Col("one_missing", np.where(rng.random(50) < 0.3, 1, 0).astype(np.uint8), 1)
    empty = Col("all_missing", np.zeros(50, np.uint8), 0)  # k = 0: every row is missing
    other = make_col("other", 3, 50, rng)
    cols = [one, one_missing, empty, other]
    eng = PairEngine(cols, progress=False)
    assert_all_pairs_match_crosstab(eng, cols)
    assert eng.table("all_missing", "other").shape == (0, 3)
    # K = 1 against any column: the table is that column's marginal on the shared rows
    np.testing.assert_array_equal(eng.table("one", "other")[0], eng.marginal("other"))


def test_zero_rows():
    cols = [Col("a", np.zeros(0, np.uint8), 3), Col("b", np.zeros(0, np.uint8), 2)]
    for backend in ("numba", "numpy"):
        eng = PairEngine(cols, backend=backend, progress=False)
        t = eng.table("a", "b")
        assert t.shape == (3, 2) and t.sum() == 0
        assert eng.marginal("a").tolist() == [0, 0, 0]


def test_marginal_equals_pandas_value_counts(rng):
    col = make_col("m", 6, 1000, rng, missing=0.2)
    eng = PairEngine([col, make_col("x", 2, 1000, rng)], progress=False)
    # reference: pandas.Series.value_counts, missing sentinel excluded
    ref = pd.Series(col.codes[col.codes < col.k]).value_counts().reindex(range(6), fill_value=0)
    np.testing.assert_array_equal(eng.marginal("m"), ref.to_numpy())


def test_table_orientation_and_read_only(rng):
    cols = [make_col("a", 3, 200, rng), make_col("b", 5, 200, rng)]
    eng = PairEngine(cols, progress=False)
    np.testing.assert_array_equal(eng.table("b", "a"), eng.table("a", "b").T)
    with pytest.raises(ValueError):
        eng.table("a", "b")[0, 0] = 7  # the cache cannot be edited through a result


# ---------------------------------------------------------- chunk/merge/finalize
@given(cols=frames, data=st.data(), backend=st.sampled_from(["numba", "numpy"]))
@settings(max_examples=25)
def test_chunks_of_any_size_merge_to_the_engine_tables(cols, data, backend):
    n = cols[0].codes.shape[0]
    cuts = sorted(data.draw(st.lists(st.integers(0, n), max_size=6)))
    bounds = [0, *cuts, n]
    ks = [c.k for c in cols]
    pairs = [(i, j) for i in range(len(cols)) for j in range(i + 1, len(cols))]
    total = {}
    for lo, hi in zip(bounds[:-1], bounds[1:]):
        chunk = count_chunk([c.codes[lo:hi] for c in cols], ks, pairs, backend=backend)
        assert all(chunk[(i, j)].shape == (ks[i] + 1, ks[j] + 1) for i, j in pairs)
        total = merge(total, chunk)
    final = finalize(total)
    for i, j in pairs:
        # reference: pandas.crosstab on the whole columns
        np.testing.assert_array_equal(final[(i, j)], crosstab_reference(cols[i], cols[j]))


def test_count_chunk_counts_the_sentinel():
    a = np.array([0, 1, 2, 2], np.uint8)  # k = 2: code 2 is missing
    b = np.array([1, 1, 0, 1], np.uint8)  # k = 1: code 1 is missing
    # hand count (a, b): (0,1) (1,1) (2,0) (2,1)
    t = count_chunk(np.stack([a, b]), [2, 1], [(0, 1)], backend="numpy")[(0, 1)]
    assert t.tolist() == [[0, 1], [0, 1], [1, 1]]
    assert finalize({"p": t})["p"].tolist() == [[0], [0]]


def test_count_chunk_rejects_codes_beyond_k():
    with pytest.raises(ValueError, match=r"column 1: codes must lie in 0\.\.2"):
        count_chunk([np.array([0, 1]), np.array([0, 3])], [2, 2], [(0, 1)])
    with pytest.raises(ValueError, match="out of range"):
        count_chunk([np.array([0, 1]), np.array([0, 1])], [2, 2], [(0, 2)])


def test_merge_rejects_mismatched_shapes():
    with pytest.raises(ValueError, match="shapes"):
        merge({(0, 1): np.zeros((2, 2))}, {(0, 1): np.zeros((3, 2))})


# ----------------------------------------------------------------- incremental
def test_reencoding_recounts_only_the_touching_pairs_in_one_pass(rng):
    cols = [make_col(f"c{i}", k, 3000, rng) for i, k in enumerate([3, 5, 16, 2, 9, 4])]
    eng = PairEngine(cols, progress=False, chunk_rows=1000)
    eng.tables()
    assert len(eng.last_counted) == 15 and eng.passes == 1
    new2, new4 = make_col("c2", 7, 3000, rng), make_col("c4", 12, 3000, rng)
    eng.set_column(new2)
    eng.set_column(new4)
    tables = eng.tables()
    touched = {p for p in tables if "c2" in p or "c4" in p}
    assert set(eng.last_counted) == touched and len(touched) == 9
    assert eng.passes == 2  # both columns' pairs in a single pass over the rows
    cols[2], cols[4] = new2, new4
    assert_all_pairs_match_crosstab(eng, cols)
    assert eng.last_counted == ()  # everything now comes from the cache


def test_returning_to_earlier_codes_hits_the_cache(rng):
    first = make_col("x", 4, 500, rng)
    cols = [first, make_col("y", 3, 500, rng), make_col("z", 6, 500, rng)]
    eng = PairEngine(cols, progress=False)
    eng.tables()
    eng.set_column(make_col("x", 8, 500, rng))
    eng.tables()
    eng.set_column(Col("x", first.codes.copy(), 4))  # same content, new object
    eng.tables()
    assert eng.last_counted == ()


@given(seed=st.integers(0, 2**31), steps=st.lists(
    st.tuples(st.sampled_from(["set", "add", "remove", "tables", "some"]), st.integers(0, 5), st.integers(0, 40)),
    min_size=1, max_size=12))
@settings(max_examples=30)
def test_any_sequence_of_reencodings_equals_a_full_recount(seed, steps):
    rng = np.random.default_rng(seed)
    n = 300
    current = {f"c{i}": make_col(f"c{i}", int(rng.integers(1, 12)), n, rng) for i in range(4)}
    eng = PairEngine(list(current.values()), progress=False, chunk_rows=int(rng.integers(1, 400)),
                     cache_bytes=int(rng.choice([0, 2000, 10**8])))
    fresh_name = 10
    for op, which, k in steps:
        names = list(current)
        if op == "set" and names:
            name = names[which % len(names)]
            current[name] = make_col(name, k, n, rng)
            eng.set_column(current[name])
        elif op == "add":
            name = f"c{fresh_name}"
            fresh_name += 1
            current[name] = make_col(name, k, n, rng)
            eng.set_column(current[name])
        elif op == "remove" and len(names) > 2:
            name = names[which % len(names)]
            del current[name]
            eng.remove_column(name)
        elif op == "some" and len(names) >= 2:
            a, b = names[which % len(names)], names[(which + 1) % len(names)]
            np.testing.assert_array_equal(eng.table(a, b), crosstab_reference(current[a], current[b]))
        else:
            eng.tables()
        assert eng.cached_bytes <= eng._cache_bytes
    assert eng.names == list(current)
    full = PairEngine(list(current.values()), progress=False).tables()
    incremental = eng.tables()
    assert list(full) == list(incremental)
    for pair in full:
        np.testing.assert_array_equal(incremental[pair], full[pair])


# ------------------------------------------------------- interrupts and progress
@pytest.mark.parametrize("backend", ["numba", "numpy"])
def test_interrupt_between_chunks_leaves_the_engine_consistent(rng, backend):
    cols = [make_col(f"c{i}", k, 2000, rng) for i, k in enumerate([3, 4, 5])]
    calls = []

    def interrupt_after_first_chunk(done, total):
        calls.append((done, total))
        if len(calls) == 1:
            raise KeyboardInterrupt

    eng = PairEngine(cols, progress=interrupt_after_first_chunk, chunk_rows=500, backend=backend)
    with pytest.raises(KeyboardInterrupt):
        eng.tables()
    assert eng.cached_bytes == 0 and eng.passes == 0  # nothing half-counted was kept
    assert_all_pairs_match_crosstab(eng, cols)  # still usable, and right
    assert calls[-1] == (2000, 2000) and [d for d, _ in calls[1:]] == [500, 1000, 1500, 2000]
    # after an interrupted recount of one column the other pairs are still cached
    eng.set_column(make_col("c1", 6, 2000, rng))
    calls.clear()
    with pytest.raises(KeyboardInterrupt):
        eng.tables()
    eng.tables()
    assert set(eng.last_counted) == {("c0", "c1"), ("c1", "c2")}


def test_progress_bar_runs(rng, capsys):
    cols = [make_col(f"c{i}", 3, 100, rng) for i in range(3)]
    eng = PairEngine(cols, progress=True, chunk_rows=10)
    assert len(eng.tables()) == 3
    assert "counting 3 pairs" in capsys.readouterr().err


def test_numba_thread_count_is_restored(rng):
    import numba

    before = numba.get_num_threads(), numba.get_parallel_chunksize()
    eng = PairEngine([make_col("a", 3, 100, rng), make_col("b", 3, 100, rng)], threads=1, progress=False,
                     backend="numba")
    eng.tables()
    assert (numba.get_num_threads(), numba.get_parallel_chunksize()) == before


# --------------------------------------------------------------------- sampling
def test_sampling_is_seeded_and_reported(rng):
    n = 5000
    cols = [make_col(f"c{i}", k, n, rng) for i, k in enumerate([4, 6, 3])]
    a = PairEngine(cols, sample=800, seed=3, progress=False)
    b = PairEngine(cols, sample=800, seed=3, progress=False)
    c = PairEngine(cols, sample=800, seed=4, progress=False)
    assert a.sampled == 800 and a.n == 800
    np.testing.assert_array_equal(a.table("c0", "c1"), b.table("c0", "c1"))
    assert not np.array_equal(a.table("c0", "c1"), c.table("c0", "c1"))
    rows = sample_rows(n, 800, seed=3)
    assert len(np.unique(rows)) == 800
    picked = [Col(col.name, col.codes[rows], col.k) for col in cols]
    # reference: pandas.crosstab on the same seeded rows
    assert_all_pairs_match_crosstab(a, picked)
    full = PairEngine(cols, sample=n, progress=False)
    assert full.sampled is None and full.n == n


def test_sample_rows_rejects_bad_sizes():
    with pytest.raises(ValueError, match="sample"):
        sample_rows(10, 0)
    with pytest.raises(ValueError, match="sample"):
        PairEngine(sample=2.5)


# ------------------------------------------------------------------ bad input
def test_bad_columns_name_the_column(rng):
    eng = PairEngine([make_col("a", 3, 10, rng)], progress=False)
    with pytest.raises(ValueError, match="column 'b' has 11 rows"):
        eng.set_column(make_col("b", 3, 11, rng))
    with pytest.raises(ValueError, match=r"column 'c': codes must lie in 0\.\.2"):
        eng.set_column(Col("c", np.full(10, 3, np.uint8), 2))
    with pytest.raises(TypeError, match="column 'd': codes must be unsigned"):
        eng.set_column(Col("d", np.zeros(10, np.int64), 2))
    with pytest.raises(KeyError, match="no column named 'zz'"):
        eng.table("a", "zz")
    eng.set_column(make_col("e", 3, 10, rng))
    with pytest.raises(ValueError, match="with itself"):
        eng.table("a", "a")
    with pytest.raises(ValueError, match="backend"):
        PairEngine(backend="gpu")
    with pytest.raises(ValueError, match="threads"):
        PairEngine(threads=0)


def test_oversized_table_is_refused_with_the_pair_named():
    big = Col("id_like", np.zeros(4, np.uint32), 70_000)
    eng = PairEngine([big, Col("other", np.zeros(4, np.uint32), 70_000)], progress=False)
    with pytest.raises(ValueError, match="pair \\('id_like', 'other'\\).*fold the levels"):
        eng.tables()


def test_cache_budget_is_respected(rng):
    cols = [make_col(f"c{i}", 16, 500, rng) for i in range(6)]
    eng = PairEngine(cols, progress=False, cache_bytes=5 * 16 * 16 * 8)
    assert_all_pairs_match_crosstab(eng, cols)
    assert 0 < eng.cached_bytes <= 5 * 16 * 16 * 8


def test_engines_in_two_threads_count_correctly(rng):
    import threading

    cols = [make_col(f"c{i}", k, 3000, rng) for i, k in enumerate([3, 7, 16, 2])]
    results = []

    def work():
        results.append(PairEngine(cols, progress=False, chunk_rows=100, threads=2).tables())

    with parallel_kernel_forced():
        workers = [threading.Thread(target=work) for _ in range(2)]
        for w in workers:
            w.start()
        for w in workers:
            w.join()
    assert len(results) == 2
    for tables in results:
        for (a, b), t in tables.items():
            # reference: pandas.crosstab
            np.testing.assert_array_equal(t, crosstab_reference(cols[int(a[1:])], cols[int(b[1:])]))


# ------------------------------------------------------------- three-column tables
@pytest.mark.parametrize("backend", ["numba", "numpy"])
def test_star_of_one_column_is_counted_in_triples_equal_to_crosstab(rng, backend):
    # one re-encoded column against all others (the incremental path): the second
    # planner pass pairs its pairs two by two into triples; tables equal crosstab
    ks = [16, 16, 16, 5, 7, 3, 16, 12, 9]
    cols = [make_col(f"s{i}", k, 2_000, rng, missing=0.05 * (i % 2)) for i, k in enumerate(ks)]
    pairs = [(0, j) for j in range(1, len(ks))]
    layout = counting.pair_layout(ks, pairs, triples=True, rows=2_000)
    assert layout.triples.shape[0] >= 3  # the star is not counted pair by pair
    block = np.stack([c.codes for c in cols])
    flat = np.zeros(layout.cells, np.int64)
    counting.KERNELS[backend](block, layout, flat)
    for (i, j), t in zip(pairs, layout.split(flat)):
        # reference: pandas.crosstab over pairwise-complete rows
        np.testing.assert_array_equal(t[:-1, :-1], crosstab_reference(cols[i], cols[j]), err_msg=f"{(i, j)}")


@pytest.mark.parametrize("backend", ["numba", "numpy"])
def test_three_column_tables_equal_pandas_crosstab(rng, backend):
    # eight columns, small and large alphabets, some missing: the layout covers the
    # low-cardinality pairs with triples (checked, so the test cannot pass without
    # them) and counts the rest directly
    ks = [2, 3, 5, 16, 16, 40, 64, 7]
    cols = [make_col(f"c{i}", k, 3_000, rng, missing=0.05 * (i % 3)) for i, k in enumerate(ks)]
    pairs = [(i, j) for i in range(len(ks)) for j in range(i + 1, len(ks))]
    layout = counting.pair_layout(ks, pairs, triples=True, rows=3_000)
    assert layout.triples.shape[0] >= 3 and layout.first.shape[0] >= 1
    covered = {tuple(sorted(p)) for t in layout.triples.tolist() for p in ((t[0], t[1]), (t[0], t[2]), (t[1], t[2]))}
    # every triple serves at least two wanted pairs (three in the first pass, two
    # sharing a column in the second), and no wanted pair is left out
    assert len(covered) >= 2 * layout.triples.shape[0]
    assert all((ks[a] + 1) * (ks[b] + 1) * (ks[c] + 1) <= counting.TRIPLE_MAX_CELLS for a, b, c in layout.triples)
    block = np.stack([c.codes for c in cols])
    flat = np.zeros(layout.cells, np.int64)
    counting.KERNELS[backend](block, layout, flat)
    for (i, j), t in zip(pairs, layout.split(flat)):
        # reference: pandas.crosstab over pairwise-complete rows
        np.testing.assert_array_equal(t[:-1, :-1], crosstab_reference(cols[i], cols[j]), err_msg=f"{(i, j)}")
        assert t.sum() == 3_000  # the sentinel row and column keep every row
    # pairs asked for against column order come back transposed
    reversed_pairs = [(j, i) for i, j in pairs]
    rev = counting.pair_layout(ks, reversed_pairs, triples=True, rows=3_000)
    flat = np.zeros(rev.cells, np.int64)
    counting.KERNELS[backend](block, rev, flat)
    for (j, i), t in zip(reversed_pairs, rev.split(flat)):
        np.testing.assert_array_equal(t[:-1, :-1], crosstab_reference(cols[j], cols[i]))
    # and the engine, through chunks of several sizes and the threaded kernel
    with parallel_kernel_forced():
        for chunk_rows in (700, 3_000):
            eng = PairEngine(cols, progress=False, backend=backend, chunk_rows=chunk_rows, threads=2)
            assert_all_pairs_match_crosstab(eng, cols)
            assert eng.table("c7", "c0").tolist() == crosstab_reference(cols[7], cols[0]).tolist()


def test_no_triples_when_tables_would_outgrow_the_rows():
    # a triple table with more cells than rows counted gains nothing: pairs stay direct
    layout = counting.pair_layout([16, 16, 16], [(0, 1), (0, 2), (1, 2)], triples=True, rows=100)
    assert layout.triples.shape[0] == 0 and layout.first.shape[0] == 3
    assert counting.pair_layout([16] * 3, [(0, 1), (0, 2), (1, 2)], triples=True).triples.shape[0] == 1


def test_auto_backend_counts_with_numpy_until_numba_is_loaded(monkeypatch):
    # Reference: the numpy kernel (numpy.bincount per pair) and the numba kernel give
    # the same tables (checked against pandas.crosstab above); "auto" must answer at
    # once with numpy while numba's kernels load on a background thread, then use numba.
    from types import SimpleNamespace

    from infoscope.engine import counting
    from infoscope.engine.engine import PairEngine

    rng = np.random.default_rng(5)
    cols = [SimpleNamespace(name=f"c{i}", codes=rng.integers(0, 4, 5000).astype(np.uint8), k=4) for i in range(4)]
    state = dict(counting._NUMBA_STATE)
    monkeypatch.setitem(counting._NUMBA_STATE, "ready", False)
    monkeypatch.setitem(counting._NUMBA_STATE, "thread", None)
    monkeypatch.setattr(counting, "_load_numba_kernels", lambda: None)  # loading never finishes here
    eng = PairEngine(cols, progress=False)
    first = eng.tables()
    assert eng.backend == "numpy" and counting._NUMBA_STATE["thread"] is not None
    counting._NUMBA_STATE["thread"].join()
    monkeypatch.setitem(counting._NUMBA_STATE, "ready", True)
    again = PairEngine(cols, progress=False)
    assert again.backend == "numba"
    second = again.tables()
    assert first.keys() == second.keys() and all(np.array_equal(first[p], second[p]) for p in first)
    assert state["lock"] is counting._NUMBA_STATE["lock"]
