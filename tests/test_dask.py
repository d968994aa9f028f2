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
    cluster = LocalCluster(n_workers=2, threads_per_worker=1, processes=True, dashboard_address=None,
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


def test_worker_loss_mid_reduction_gives_the_same_result(client, tmp_path):
    pdf = pd.DataFrame({"i": np.arange(4000)})
    ddf = watched_frame(pdf, 8, tmp_path, watched=3, block_at=1)
    out = run_killing_one_worker(
        client, tmp_path, lambda: reduce_partitions(ddf, _rows_of, _concat, split_every=2, progress=False))
    assert out == list(range(4000))
    assert calls(tmp_path) == 2  # the killed load and its rerun on a live worker
