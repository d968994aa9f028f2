"""``infoscope profile`` on many files: out of core, on a local Dask cluster, on a running one.

The numbers printed out of core must be the numbers printed for the same rows read
into memory (the count tables are equal, issue 7), and one of them is checked against
scipy.stats.entropy (plug-in entropy of the level counts).
"""
from __future__ import annotations

import io

import numpy as np
import pandas as pd
import pytest
import scipy.stats

from infoscope.cli import build_parser, cmd_profile, main


def _frames(n_files=3, rows=1500, seed=0):
    rng = np.random.default_rng(seed)
    parts = []
    for _ in range(n_files):
        x = rng.normal(size=rows)
        parts.append(pd.DataFrame({
            "x": x, "y": x + rng.normal(size=rows), "c": rng.choice(list("abcd"), rows, p=[.4, .3, .2, .1]),
            "t": (x + rng.normal(scale=.5, size=rows) > 0).astype("int64")}))
    return parts


@pytest.fixture(scope="module")
def folder(tmp_path_factory):
    where = tmp_path_factory.mktemp("events")
    parts = _frames()
    for i, part in enumerate(parts):
        part.to_parquet(where / f"part-{i}.parquet", index=False)
    pd.concat(parts, ignore_index=True).to_parquet(where.parent / "all.parquet", index=False)
    return where


def _run(argv) -> tuple[int, str]:
    out = io.StringIO()
    status = cmd_profile(build_parser().parse_args(argv), out=out)
    return status, out.getvalue()


def _tables(text: str) -> str:
    """The printed tables (everything from the first '==' heading on, notes left out)."""
    body = text[text.index("== "):]
    return body.split("== notes on the data")[0].split("\nwrote ")[0]


@pytest.fixture(scope="module")
def in_memory(folder):
    status, text = _run(["profile", str(folder.parent / "all.parquet"), "--target", "t", "--estimator", "plugin"])
    assert status == 0 and "read into memory" in text
    return text


def test_a_quoted_glob_is_read_out_of_core_and_prints_the_in_memory_numbers(folder, in_memory):
    status, text = _run(["profile", str(folder / "*.parquet"), "--target", "t", "--estimator", "plugin",
                         "--memory-limit", "32MB"])
    assert status == 0
    assert "4500 rows x 4 columns" in text and "read out of core in row batches within 32MB" in text
    assert _tables(text) == _tables(in_memory)


def test_a_folder_and_a_shells_expansion_read_the_same_rows(folder, in_memory):
    files = sorted(str(f) for f in folder.glob("*.parquet"))
    for data in ([str(folder)], files):
        status, text = _run(["profile", *data, "--target", "t", "--estimator", "plugin"])
        assert status == 0 and "read out of core" in text
        assert _tables(text) == _tables(in_memory)
    assert f"{files[0]} and 2 more" in text


def test_the_plug_in_entropy_printed_out_of_core_is_scipys(folder):
    # scipy.stats.entropy(counts, base=2) is the plug-in entropy of the level counts
    status, text = _run(["profile", str(folder), "--estimator", "plugin"])
    counts = pd.concat(_frames())["c"].value_counts().to_numpy()
    line = next(x for x in text.splitlines() if x.startswith("c "))
    assert float(line.split()[4]) == pytest.approx(scipy.stats.entropy(counts, base=2), abs=5e-3)


def test_csv_files_out_of_core_sniff_their_delimiter(tmp_path, in_memory):
    for i, part in enumerate(_frames()):
        part.to_csv(tmp_path / f"day-{i}.csv", sep=";", index=False)
    status, text = _run(["profile", str(tmp_path / "day-*.csv"), "--target", "t", "--estimator", "plugin"])
    assert status == 0 and "4500 rows x 4 columns" in text
    assert _tables(text) == _tables(in_memory)  # pandas writes floats that read back exactly


def test_a_sample_out_of_core_says_so_and_reads_every_view(folder):
    status, text = _run(["profile", str(folder), "--sample", "1000", "--target", "t"])
    assert status == 0 and "4500 rows x 4 columns; a seeded sample of 1000 rows" in text
    assert "holds count tables" not in text


@pytest.mark.parametrize("argv, message", [
    (["profile", "nowhere/*.parquet"], "nowhere/*.parquet: no file matches this pattern"),
    (["profile", "FOLDER", "--bins", "fd"], "column 'x': bins='fd' needs every value of the column"),
    (["profile", "FOLDER", "--target", "nope"], "nope"),
    (["profile", "FOLDER", "--memory-limit", "lots"], "lots"),
])
def test_bad_sources_and_settings_are_one_line(folder, capsys, argv, message):
    argv = [str(folder) if a == "FOLDER" else a for a in argv]
    assert main(argv) == 2
    err = capsys.readouterr().err.strip()
    assert err.startswith("infoscope profile: ") and message in err and "\n" not in err


def test_files_that_disagree_name_the_column_and_both_types(tmp_path, capsys):
    pd.DataFrame({"a": [1, 2, 3], "b": ["x", "y", "z"]}).to_parquet(tmp_path / "1.parquet")
    pd.DataFrame({"a": ["1", "2", "3"], "b": ["x", "y", "z"]}).to_parquet(tmp_path / "2.parquet")
    assert main(["profile", str(tmp_path)]) == 2
    err = capsys.readouterr().err
    assert "column 'a'" in err and "int64" in err and "string" in err


def test_dask_and_scheduler_exclude_each_other(folder, capsys):
    with pytest.raises(SystemExit):
        build_parser().parse_args(["profile", str(folder), "--dask", "--scheduler", "tcp://localhost:1"])
    assert "not allowed with" in capsys.readouterr().err


def test_on_a_local_dask_cluster_the_numbers_are_the_in_memory_ones(folder, in_memory):
    status, text = _run(["profile", str(folder / "*.parquet"), "--target", "t", "--estimator", "plugin",
                         "--dask", "--out", str(folder.parent / "dask.html")])
    assert status == 0
    assert "counted on a local Dask cluster of" in text and "(3 partitions)" in text
    assert _tables(text) == _tables(in_memory)
    page = (folder.parent / "dask.html").read_text(encoding="utf-8")
    assert "</html>" in page


def test_on_a_running_cluster_by_its_address(folder, in_memory):
    import distributed  # in the test extra

    with distributed.LocalCluster(n_workers=1, threads_per_worker=1, processes=True,
                                  dashboard_address=":0") as cluster:
        status, text = _run(["profile", str(folder), "--target", "t", "--estimator", "plugin",
                             "--scheduler", cluster.scheduler_address])
    assert status == 0 and f"the Dask cluster at {cluster.scheduler_address}" in text
    assert _tables(text) == _tables(in_memory)


def test_the_demo_writes_parquet_files_that_profile_out_of_core(tmp_path, capsys):
    # the README's quick start: demo --write-parquet, then profile the glob it prints
    assert main(["demo", "--rows", "6000", "--write-parquet", str(tmp_path / "deliveries")]) == 0
    said = capsys.readouterr().out
    command = said.strip().splitlines()[-1].split()
    assert command[:2] == ["infoscope", "profile"] and len(list((tmp_path / "deliveries").glob("*.parquet"))) == 8
    glob = command[2].strip("'")
    assert main(["profile", glob, "--target", "late"]) == 0
    text = capsys.readouterr().out
    assert "6000 rows x 17 columns" in text and "read out of core" in text
    leak = next(x for x in text.split("== relevance")[1].splitlines() if x.startswith("compensation_eur"))
    assert leak.rstrip().endswith("True")  # the planted leak is found


def test_drift_of_a_batch_folder_out_of_core_is_the_in_memory_record(tmp_path, capsys):
    # infoscope drift REFERENCE 'day/*.parquet': the same record (and exit status) as the batch read whole
    import json

    from infoscope.datasets import make_deliveries, make_deliveries_batch

    batch = make_deliveries_batch(9_000, seed=1)
    (tmp_path / "day").mkdir()
    for i in range(3):
        batch.iloc[i * 3000:(i + 1) * 3000].to_parquet(tmp_path / "day" / f"p{i}.parquet", index=False)
    batch.to_parquet(tmp_path / "day.parquet", index=False)
    make_deliveries(6_000).to_parquet(tmp_path / "ref.parquet", index=False)
    ref = str(tmp_path / "ref.parquet")
    assert main(["drift", ref, str(tmp_path / "day" / "*.parquet"), "--fail-on", "major", "--pairs",
                 "--json", str(tmp_path / "a.json"), "--memory-limit", "32MB"]) == 1
    said = capsys.readouterr().out
    assert "batch: read out of core in row batches within 32MB" in said
    assert main(["drift", ref, str(tmp_path / "day.parquet"), "--fail-on", "major",
                 "--json", str(tmp_path / "b.json")]) == 1
    a, b = (json.loads((tmp_path / f"{x}.json").read_text()) for x in "ab")
    assert a["columns"] == b["columns"] and a["summary"] == b["summary"]
    assert any("relationship drift" in note for note in a["notes"])
