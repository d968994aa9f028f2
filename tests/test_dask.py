"""Dask DataFrames as sources, on a real ``distributed.LocalCluster`` started here.

The cluster (two worker processes, one thread each, nannies that restart a lost
worker) is shared by the module and closed at its end; no outside service is
used.  What is checked:

* the tree reduction keeps the partitions in row order whatever ``split_every``
  (the pass-1 merge is associative, not commutative), skips empty partitions,
  and runs on the cluster's worker processes, not in the test process;
* a Dask profile equals the in-memory profile of the same rows exactly: the
  alphabets (kinds, k, labels, edges), every pair's integer count table, and
  hence every estimate (the in-memory :class:`ProfileSession` is the reference;
  its own tables are checked against ``pandas.crosstab`` in tests/test_engine.py);
* worker loss: a worker process is killed (SIGKILL) while it runs a task of the
  profile; Dask reschedules the lost tasks (its task retry: the scheduler's
  ``allowed-failures``) and the profile ends with the same tables.

No assertion depends on timing: a task that must be running when the worker is
killed waits on a marker file that the test writes only after the kill, and every
wait is bounded by a generous timeout that fails loudly.
"""
from __future__ import annotations

import os
import signal
import sys
import time
import warnings
from pathlib import Path

import cloudpickle
import dask
import dask.dataframe as dd
import numpy as np
import pandas as pd
import psutil
import pytest
from distributed import Client, LocalCluster

from infoscope.sources.dask import reduce_partitions

# the partition functions below travel to the worker processes by value
cloudpickle.register_pickle_by_value(sys.modules[__name__])

#: bound of every wait of this module (a loaded CI machine is slow; nothing here is timed)
WAIT_SECONDS = 300


@pytest.fixture(scope="module")
def client():
    """Two worker processes on this machine (loopback only), shared by the module."""
    cluster = LocalCluster(n_workers=2, threads_per_worker=1, processes=True, dashboard_address=":0",
                           host="127.0.0.1", silence_logs=50)
    dask_client = Client(cluster)
    try:
        dask_client.wait_for_workers(2, timeout=WAIT_SECONDS)
        yield dask_client
    finally:
        dask_client.close()
        cluster.close()


def _worker_pids(dask_client) -> set[int]:
    return set(dask_client.run(os.getpid).values())


# ------------------------------------------------------------ worker-loss harness
def _next_call(flag_dir: Path) -> int:
    """Number this call of the watched partition (1, 2, ...) with an exclusively created file."""
    n = len(list(flag_dir.glob("call-*")))
    while True:
        n += 1
        try:
            os.close(os.open(flag_dir / f"call-{n}", os.O_CREAT | os.O_EXCL | os.O_WRONLY))
            return n
        except FileExistsError:
            continue


def _watched(part, flag_dir, watched, block_at, partition_info=None):
    """The partition as it is; the ``block_at``-th load of partition ``watched`` waits for release.

    While it waits, its worker process is killed by the test; the marker that
    releases the wait is written only after the kill, so the rerun of the task
    (on a live worker) goes on.
    """
    flag_dir = Path(flag_dir)
    if partition_info is not None and partition_info["number"] == watched:
        if _next_call(flag_dir) == block_at:
            (flag_dir / f"running-{os.getpid()}").write_text("")
            deadline = time.monotonic() + WAIT_SECONDS
            while not (flag_dir / "released").exists():
                if time.monotonic() > deadline:
                    raise RuntimeError("the test never killed this worker")
                time.sleep(0.02)
    return part


def watched_frame(pdf: pd.DataFrame, npartitions: int, flag_dir: Path, *, watched: int = 1, block_at: int = 0):
    """A Dask frame of ``pdf`` whose partition ``watched`` counts (and may block) its loads."""
    ddf = dd.from_pandas(pdf, npartitions=npartitions, sort=False)
    return ddf.map_partitions(_watched, str(flag_dir), watched, block_at, meta=ddf._meta)


def calls(flag_dir: Path) -> int:
    return len(list(Path(flag_dir).glob("call-*")))


def run_killing_one_worker(dask_client, flag_dir: Path, run):
    """Run ``run()`` in a thread of Dask's client; kill the worker that blocks; return ``run()``'s value.

    The watched task writes ``running-<pid>``; the test kills that process with
    SIGKILL, waits until the process is gone, then writes the release marker.
    """
    import concurrent.futures

    flag_dir = Path(flag_dir)
    with concurrent.futures.ThreadPoolExecutor(1) as pool:
        result = pool.submit(run)
        deadline = time.monotonic() + WAIT_SECONDS
        while not list(flag_dir.glob("running-*")):
            if result.done():
                result.result()  # an error of the run, raised here
                raise AssertionError("the run finished without reaching the watched task")
            assert time.monotonic() < deadline, "the watched task never started"
            time.sleep(0.05)
        pid = int(next(flag_dir.glob("running-*")).name.split("-", 1)[1])
        assert pid in _worker_pids(dask_client) and pid != os.getpid()
        os.kill(pid, signal.SIGKILL)
        try:
            proc = psutil.Process(pid)
            while proc.is_running() and proc.status() != psutil.STATUS_ZOMBIE:
                assert time.monotonic() < deadline, "the killed worker did not end"
                time.sleep(0.05)
        except psutil.NoSuchProcess:
            pass
        (flag_dir / "released").write_text("")
        value = result.result(timeout=WAIT_SECONDS)
    # the nanny starts a new worker: later tests have two again
    dask_client.wait_for_workers(2, timeout=WAIT_SECONDS)
    assert pid not in _worker_pids(dask_client)
    return value


# ------------------------------------------------------------------ the reduction
def _rows_of(part):
    return [int(v) for v in part["i"]]


def _concat(left, right):
    return left + right


@pytest.mark.parametrize("npartitions, split_every", [(1, None), (7, 2), (16, 3), (16, None)])
def test_reduction_keeps_row_order_on_the_cluster(client, npartitions, split_every):
    # list concatenation is associative but not commutative: only a tree that
    # keeps the partitions in order gives 0..n-1 back (dask.bag.Bag.reduction)
    pdf = pd.DataFrame({"i": np.arange(100)})
    ddf = dd.from_pandas(pdf, npartitions=npartitions, sort=False)
    out = reduce_partitions(ddf, _rows_of, _concat, split_every=split_every, progress=False)
    assert out == list(range(100))


def _pid_and_rows(part):
    return {os.getpid(): len(part)}


def _add_dicts(left, right):
    return {k: left.get(k, 0) + right.get(k, 0) for k in {*left, *right}}


def test_reduction_runs_on_the_worker_processes(client):
    pdf = pd.DataFrame({"i": np.arange(4000)})
    out = reduce_partitions(dd.from_pandas(pdf, npartitions=16), _pid_and_rows, _add_dicts, progress=False)
    assert sum(out.values()) == 4000
    assert set(out) <= _worker_pids(client) and os.getpid() not in out


def test_reduction_skips_empty_partitions(client):
    pdf = pd.DataFrame({"i": np.arange(30)})
    ddf = dd.from_pandas(pdf, npartitions=3, sort=False)
    ddf = ddf[ddf["i"] >= 10]  # the first partition is now empty
    assert reduce_partitions(ddf, _rows_of, _concat, split_every=2, progress=False) == list(range(10, 30))
    assert reduce_partitions(ddf[ddf["i"] > 99], _rows_of, _concat, progress=False) is None


def test_reduction_on_the_local_scheduler_shows_dasks_progress(capsys):
    pdf = pd.DataFrame({"i": np.arange(10)})
    with dask.config.set(scheduler="synchronous"):
        out = reduce_partitions(dd.from_pandas(pdf, npartitions=2, sort=False), _rows_of, _concat, progress=True)
    assert out == list(range(10))
    assert "Completed" in capsys.readouterr().out  # dask.diagnostics.ProgressBar's line


@pytest.mark.parametrize("bad", [1, 0, 2.5, True, "8"])
def test_split_every_is_checked(bad):
    ddf = dd.from_pandas(pd.DataFrame({"i": [1, 2]}), npartitions=1)
    with pytest.raises(ValueError, match="split_every"):
        reduce_partitions(ddf, _rows_of, _concat, split_every=bad, progress=False)


# ------------------------------------------------------------ profiles equal in memory
from dask.dataframe.utils import UNKNOWN_CATEGORIES  # noqa: E402

import infoscope  # noqa: E402
from infoscope import DataQualityWarning, SmallSampleWarning  # noqa: E402
from infoscope.datasets import make_deliveries  # noqa: E402
from infoscope.encode import encode_frame  # noqa: E402
from infoscope.engine.counting import count_chunk, finalize  # noqa: E402
from infoscope.frame.session import ProfileSession  # noqa: E402
from infoscope.sources import SampledSession, TableSession  # noqa: E402
from infoscope.sources.dask import dask_alphabets, dask_tables, profile_dask  # noqa: E402

#: pairs() columns that come from Monte-Carlo shuffles: drawn from the same null
#: (random tables with the observed margins) but with another random stream than
#: the in-memory shuffle of the codes, so equal in distribution, not digit for digit
MONTE_CARLO = ["p_value", "q_value", "n_permutations", "p_error"]


def mixed_parts(seed: int = 7) -> list[pd.DataFrame]:
    """Uneven row batches with missing values in every kind and levels seen in some batches only."""
    rng = np.random.default_rng(seed)
    parts = []
    for i, n in enumerate([400, 37, 0, 900, 250, 1]):
        x = rng.normal(size=n)
        x[rng.random(n) < 0.1] = np.nan
        grade = rng.choice(["low", "mid", "high"] if i != 3 else ["low", "mid", "high", "rare"], n)
        text = np.where(rng.random(n) < 0.05, None, grade).astype(object)
        parts.append(pd.DataFrame({
            "x": x + (grade == "high"),
            "count": pd.array(np.where(rng.random(n) < 0.08, None, rng.poisson(3, n)), dtype="Int64"),
            "grade": pd.Categorical(grade, categories=["low", "mid", "high", "rare", "unused"]),
            "text": pd.array(text, dtype="string"),
            "ok": pd.array(np.where(rng.random(n) < 0.1, None, rng.random(n) < 0.3), dtype="boolean"),
            "when": pd.Timestamp("2026-03-01") + pd.to_timedelta(rng.integers(0, 86_400 * 30, n), unit="s"),
        }))
    return parts


def from_parts(parts, *, unknown_categories=()):
    """A Dask frame with one partition per part (sizes as given)."""
    meta = parts[0].iloc[:0].copy()
    for c in unknown_categories:
        meta[c] = pd.Categorical([], categories=[UNKNOWN_CATEGORIES])
    return dd.from_delayed([dask.delayed(p) for p in parts], meta=meta, verify_meta=False)


def assert_same_alphabets(alphabets: dict, encoded) -> None:
    # the in-memory encoder (infoscope.encode.encode_frame on the gathered rows) is
    # the reference; its quantile edges are checked against numpy.quantile in
    # tests/test_binning.py
    assert list(alphabets) == [e.name for e in encoded]
    for e in encoded:
        a = alphabets[e.name]
        assert (a.kind, a.k, a.labels, a.flags, a.n, a.n_missing) == \
            (e.kind, e.k, e.labels, e.flags, e.n, e.n_missing), e.name
        assert (a.edges is None) == (e.edges is None), e.name
        if e.edges is not None:
            np.testing.assert_array_equal(a.edges, e.edges, err_msg=e.name)
        if a.n_distinct_exact:
            assert a.n_distinct == e.n_distinct, e.name
        if e.level_counts is not None:
            np.testing.assert_array_equal(a.level_counts, e.level_counts, err_msg=e.name)


def assert_same_profile(dask_session, memory_session) -> None:
    names = memory_session.names
    assert dask_session.names == names
    with warnings.catch_warnings():  # pair() cautions about sparse tables; both sides alike
        warnings.simplefilter("ignore", SmallSampleWarning)
        for i, a in enumerate(names):
            for b in names[i + 1:]:
                np.testing.assert_array_equal(dask_session.pair(a, b).counts, memory_session.pair(a, b).counts,
                                              err_msg=f"{a} x {b}")
    entropy = dask_session.entropy()
    assert entropy.attrs.pop("source").startswith("Dask DataFrame")
    pd.testing.assert_frame_equal(entropy, memory_session.entropy())
    pairs, expected = dask_session.pairs(), memory_session.pairs()
    pd.testing.assert_frame_equal(pairs.drop(columns=MONTE_CARLO), expected.drop(columns=MONTE_CARLO),
                                  check_like=False, obj="pairs() without the Monte-Carlo columns")
    chi2 = (expected["p_method"] != "permutation").to_numpy()
    np.testing.assert_array_equal(pairs["p_value"].to_numpy()[chi2], expected["p_value"].to_numpy()[chi2])


def gathered_codes(frame: pd.DataFrame, **settings):
    """The in-memory encoder's columns and tables of the same rows (the reference)."""
    with warnings.catch_warnings():  # its data-quality warnings are checked elsewhere
        warnings.simplefilter("ignore")
        encoded = encode_frame(frame, cache=False, **{"bins": "rows", **settings})
    ks = [e.k for e in encoded]
    pairs = [(i, j) for i in range(len(ks)) for j in range(i + 1, len(ks))]
    tables = finalize(count_chunk([e.codes for e in encoded], ks, pairs))
    names = [e.name for e in encoded]
    return encoded, {(names[i], names[j]): t for (i, j), t in tables.items()}


def dask_codes(ddf, **settings):
    """Alphabets, tables and marginals of the two Dask passes."""
    from infoscope.encode.summaries import column_specs
    from infoscope.sources.dask import _known_categories, _prepared

    keys = [str(c) for c in ddf.columns]
    categories = _known_categories(ddf, progress=False)
    specs = column_specs(_prepared(ddf._meta, keys, categories).dtypes, **{"bins": "rows", **settings})
    _, alphabets = dask_alphabets(ddf, keys, specs, categories=categories, split_every=settings.get("split", 3),
                                  progress=False)
    tables, marginals = dask_tables(ddf, keys, list(alphabets.values()), categories=categories, split_every=3,
                                    progress=False)
    return alphabets, tables, marginals


def assert_same_codes(ddf, **settings):
    encoded, expected = gathered_codes(ddf.compute(), **settings)
    alphabets, tables, marginals = dask_codes(ddf, **settings)
    assert_same_alphabets(alphabets, encoded)
    assert list(tables) == list(expected)
    for pair, table in expected.items():
        np.testing.assert_array_equal(tables[pair], table, err_msg=str(pair))
    for e in encoded:
        np.testing.assert_array_equal(marginals[e.name], np.bincount(e.codes, minlength=e.k + 1)[:e.k])
    return encoded, tables


DELIVERIES = make_deliveries(2_500, seed=3)


@pytest.mark.parametrize("npartitions", [1, 4, 9])
def test_alphabets_and_tables_equal_the_in_memory_ones(client, npartitions):
    ddf = dd.from_pandas(DELIVERIES, npartitions=npartitions, sort=False)
    encoded, tables = assert_same_codes(ddf)
    # and one table against an outside count: pandas.crosstab of the gathered codes
    depot = next(e for e in encoded if e.name == "depot")
    late = next(e for e in encoded if e.name == "late")
    both = (depot.codes < depot.k) & (late.codes < late.k)
    crosstab = pd.crosstab(depot.codes[both], late.codes[both]).reindex(
        index=range(depot.k), columns=range(late.k), fill_value=0)
    np.testing.assert_array_equal(tables[("depot", "late")], crosstab.to_numpy())


@pytest.mark.parametrize("unknown", [(), ("grade",)])
@pytest.mark.parametrize("settings", [{}, {"missing": "category", "bins": 5, "strategy": "uniform"}])
def test_missing_values_and_levels_seen_in_some_partitions_only(client, unknown, settings):
    # uneven partitions (one empty, one of a single row); 'rare' only in the
    # fourth, 'unused' in none; with unknown categories every partition has its
    # own (ddf.compute() then holds their union, in order of first appearance)
    parts = mixed_parts()
    if unknown:
        for i, part in enumerate(parts):
            present = [c for c in part["grade"].cat.categories if (part["grade"] == c).any()]
            parts[i] = part.assign(grade=part["grade"].cat.set_categories(present[::-1] if i % 2 else present))
    ddf = from_parts(parts, unknown_categories=unknown)
    assert ddf["grade"].cat.known is (not unknown)
    assert_same_codes(ddf, **settings)


def test_levels_beyond_the_cap_come_from_daskss_own_counts(client):
    # more distinct texts than pass 1 keeps per batch (LEVEL_CAP) and a shuffled
    # whole-number code: the levels and the exact distinct count are then asked of
    # the source (Series.value_counts / nunique on the cluster)
    from infoscope.encode.summaries import LEVEL_CAP

    rng = np.random.default_rng(11)
    n = 2 * LEVEL_CAP + 5_000
    popular = rng.choice([f"p{i:02d}" for i in range(30)], n)
    text = np.where(rng.random(n) < 0.3, popular, np.array([f"r{i}" for i in range(n)]))
    code = rng.permutation(n)
    code[:500] = code[500:1000]
    frame = pd.DataFrame({"text": pd.array(text, dtype="string"), "code": code, "y": rng.integers(0, 3, n)})
    assert_same_codes(dd.from_pandas(frame, npartitions=5, sort=False))


def test_dask_profile_equals_the_in_memory_profile(client):
    ddf = dd.from_pandas(DELIVERIES, npartitions=4, sort=False)
    with pytest.warns(Warning) as from_dask:  # the encoder's warnings come here too, in column order
        session = infoscope.profile(ddf, split_every=2, progress=False, n_boot=40, target="late")
    assert isinstance(session, TableSession)
    with pytest.warns(Warning) as in_memory:
        reference = ProfileSession(ddf.compute(), n_boot=40, target="late")
    assert [str(w.message) for w in from_dask] == [str(w.message) for w in in_memory]
    assert_same_profile(session, reference)
    pd.testing.assert_frame_equal(session.relevance().drop(columns=MONTE_CARLO, errors="ignore"),
                                  reference.relevance().drop(columns=MONTE_CARLO, errors="ignore"))


@pytest.mark.filterwarnings("ignore::infoscope.DataQualityWarning")
def test_a_sample_holds_the_rows_the_in_memory_sample_holds(client):
    # engine.sampling.sample_rows picks positions among all rows in order; only the
    # partitions holding them send rows, and the sample is profiled in memory
    parts = mixed_parts(seed=5)
    ddf = from_parts(parts, unknown_categories=("grade",))
    session = infoscope.profile(ddf, sample=300, seed=9, n_boot=0, progress=False)
    reference = ProfileSession(ddf.compute(), sample=300, seed=9, n_boot=0)
    assert isinstance(session, SampledSession)
    assert (session.n_rows, session.sampled) == (sum(map(len, parts)), 300)
    pd.testing.assert_frame_equal(session.entropy(), reference.entropy())
    pd.testing.assert_frame_equal(session.pairs(), reference.pairs())
    whole = infoscope.profile(ddf, sample=10_000, n_boot=0, progress=False)  # more than there are rows
    assert whole.sampled is None and whole.n_rows == sum(map(len, parts))


# ------------------------------------------------------------ worker loss in a profile
def _watched_profile(flag_dir: Path, block_at: int):
    ddf = watched_frame(DELIVERIES, 6, flag_dir, watched=2, block_at=block_at)
    return profile_dask(ddf, split_every=2, progress=False, n_boot=0)


@pytest.fixture(scope="module")
def undisturbed(client, tmp_path_factory):
    """A profile without worker loss, and how often it loaded the watched partition.

    Every round of pass 1 loads it once, then pass 2 (its last load).
    """
    counted = tmp_path_factory.mktemp("counted")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataQualityWarning)
        reference = _watched_profile(counted, block_at=0)
    return reference, calls(counted)


@pytest.mark.filterwarnings("ignore::infoscope.DataQualityWarning")
@pytest.mark.parametrize("when", ["pass 1", "pass 2"])
def test_a_worker_killed_mid_profile_leaves_the_same_tables(client, undisturbed, tmp_path, when):
    # the watched partition's first load (pass 1) or its last (pass 2) waits until
    # the worker process running it has been killed
    reference, loads = undisturbed
    assert loads >= 2
    killed = tmp_path / "killed"
    killed.mkdir()
    block_at = 1 if when == "pass 1" else loads
    session = run_killing_one_worker(client, killed, lambda: _watched_profile(killed, block_at))
    assert calls(killed) == loads + 1  # the killed load, rerun once on a live worker
    names = reference.names
    assert session.names == names
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", SmallSampleWarning)
        for i, a in enumerate(names):
            for b in names[i + 1:]:
                np.testing.assert_array_equal(session.pair(a, b).counts, reference.pair(a, b).counts)
    pd.testing.assert_frame_equal(session.entropy(), reference.entropy())


# ------------------------------------------------------------------ the accessor
import subprocess  # noqa: E402

import infoscope.dask  # noqa: E402,F401  (registers ddf.info_profile)
from infoscope.sources.session import NeedsRows  # noqa: E402


def test_import_infoscope_never_imports_dask_and_registers_when_present():
    code = ("import sys, infoscope; "
            "assert not [m for m in sys.modules if m.split('.')[0] in ('dask', 'distributed')], 'dask imported'; "
            "import dask.dataframe as dd; assert not hasattr(dd.DataFrame, 'info_profile'); "
            "import infoscope.dask; assert hasattr(dd.DataFrame, 'info_profile')")
    subprocess.run([sys.executable, "-c", code], check=True, timeout=WAIT_SECONDS)
    code = ("import dask.dataframe as dd, pandas as pd, infoscope; "
            "from infoscope.dask import DaskInfoProfile; "
            "assert isinstance(dd.from_pandas(pd.DataFrame({'a': [1]}), npartitions=1).info_profile, DaskInfoProfile)")
    subprocess.run([sys.executable, "-c", code], check=True, timeout=WAIT_SECONDS)


@pytest.mark.filterwarnings("ignore::infoscope.DataQualityWarning", "ignore::infoscope.SmallSampleWarning")
def test_accessor_gives_the_pandas_accessors_tables(client):
    frame = DELIVERIES[["depot", "service", "weight_kg", "distance_km", "fragile", "late"]]
    ddf = dd.from_pandas(frame, npartitions=5, sort=False)
    gathered = ddf.compute()
    settings = {"n_boot": 40, "target": "late", "progress": False}
    entropy = ddf.info_profile.entropy(**settings)
    assert entropy.attrs.pop("source") == "Dask DataFrame (5 partitions)"
    pd.testing.assert_frame_equal(entropy, gathered.info_profile.entropy(n_boot=40, target="late"))
    # the same session answers the next call: the data is read once
    assert ddf.info_profile._session(settings) is ddf.info_profile._session(dict(settings))
    pd.testing.assert_frame_equal(ddf.info_profile.matrix("nmi", **settings),
                                  gathered.info_profile.matrix("nmi", n_boot=40, target="late"))
    pairs = ddf.info_profile.pairs("mi", **settings).drop(columns=MONTE_CARLO)
    pd.testing.assert_frame_equal(pairs, gathered.info_profile.pairs("mi", n_boot=40, target="late")
                                  .drop(columns=MONTE_CARLO))
    np.testing.assert_array_equal(ddf.info_profile.pair("depot", "late", **settings).counts,
                                  gathered.info_profile.pair("depot", "late", n_boot=40, target="late").counts)
    hidden = ddf.info_profile.pair("depot", "service", min_count=30, **settings).hidden
    expected = gathered.info_profile.pair("depot", "service", min_count=30, n_boot=40, target="late").hidden
    assert hidden["small"] == expected["small"] and hidden["complementary"] == expected["complementary"]
    assert hidden["small"]  # small cells were there to hide
    relevance = ddf.info_profile.relevance(**settings).drop(columns=MONTE_CARLO, errors="ignore")
    pd.testing.assert_frame_equal(relevance, gathered.info_profile.relevance(n_boot=40, target="late")
                                  .drop(columns=MONTE_CARLO, errors="ignore"))
    page = ddf.info_profile.to_html(min_count=5, title="<deliveries>", **settings)
    assert page.startswith("<!DOCTYPE html>") and "<deliveries>" not in page and "&lt;deliveries&gt;" in page


@pytest.mark.parametrize("call", [
    lambda p: p.conditional("depot", "late"),
    lambda p: p.select("late"),
    lambda p: p.tree(),
    lambda p: p.surprising_rows(),
    lambda p: p.drift(DELIVERIES),
    lambda p: p.drift_report(DELIVERIES),
    lambda p: p.to_html(reference=DELIVERIES),
])
@pytest.mark.filterwarnings("ignore::infoscope.DataQualityWarning")
def test_views_that_read_rows_say_how_to_get_them(call):
    ddf = dd.from_pandas(DELIVERIES[["depot", "late", "weight_kg"]], npartitions=2)
    with dask.config.set(scheduler="synchronous"), pytest.raises(NeedsRows, match="sample"):
        call(ddf.info_profile)


# ------------------------------------------------------------------ bad input
def test_bad_dask_sources_give_one_clear_error():
    frame = pd.DataFrame({"a": [1, 2, 3], "when": pd.to_datetime(["2026-01-01"] * 3), "x": [0.5, 1.5, 2.5]})
    ddf = dd.from_pandas(frame, npartitions=2)
    with dask.config.set(scheduler="synchronous"):
        with pytest.raises(TypeError, match="dask.dataframe.DataFrame.*Series"):
            profile_dask(ddf["a"], progress=False)
        with pytest.raises(ValueError, match="no columns"):
            profile_dask(ddf[[]], progress=False)
        with pytest.raises(ValueError, match="no rows"):
            profile_dask(ddf[ddf["a"] > 5], progress=False)
        with pytest.raises(ValueError, match="column 'a'.*bins='fd'"):
            profile_dask(ddf, bins="fd", progress=False)
        with pytest.raises(ValueError, match="split_every"):
            profile_dask(ddf, split_every=1, progress=False)
        with pytest.raises(ValueError, match="progress"):
            profile_dask(ddf, progress="yes")
        odd = dd.from_pandas(pd.DataFrame({"a": [1, 2], "span": pd.arrays.IntervalArray.from_breaks([0, 1, 2])}),
                             npartitions=1)
        with pytest.raises(ValueError, match="'span'"):
            profile_dask(odd, progress=False)
    assert frame.equals(pd.DataFrame({"a": [1, 2, 3], "when": pd.to_datetime(["2026-01-01"] * 3),
                                      "x": [0.5, 1.5, 2.5]}))


def test_docstring_examples_run():
    import doctest

    import infoscope.sources.dask as dask_source

    with dask.config.set(scheduler="synchronous"), warnings.catch_warnings():
        warnings.simplefilter("ignore", DataQualityWarning)
        for module in (dask_source, infoscope.dask):
            result = doctest.testmod(module, optionflags=doctest.NORMALIZE_WHITESPACE)
            assert result.failed == 0 and result.attempted > 0, module.__name__
