"""``infoscope demo`` prints the demo profile's tables and the cautions."""
from __future__ import annotations

import io
import subprocess
import sys

import numpy as np
import pandas as pd
import pytest
import scipy.stats

from infoscope.cli import CAUTION, build_parser, cmd_demo, main
from infoscope.datasets import PLANTED

SMALL = ["demo", "--rows", "4000", "--batch-rows", "2000"]


@pytest.fixture(scope="module")
def demo_output():
    out = io.StringIO()
    assert cmd_demo(build_parser().parse_args(SMALL), out=out) == 0
    return out.getvalue()


def test_demo_prints_every_table(demo_output):
    for heading in ("== entropy per column", "== top 10 pairs", "== relevance to 'late'",
                    "== drift of a later batch"):
        assert heading in demo_output
    assert demo_output.count(CAUTION) == 1  # once, at the top (issue 10: it was printed twice)


def test_demo_shows_what_was_planted(demo_output):
    lines = demo_output.splitlines()
    top_pairs = lines[lines.index(next(x for x in lines if x.startswith("== top"))) + 2]
    assert all(name in top_pairs for name in PLANTED["near_duplicates"])
    relevance = demo_output.split("== relevance")[1].split("== drift")[0].splitlines()
    leak_line = next(x for x in relevance if x.strip().startswith(PLANTED["leak"]))
    assert leak_line.rstrip().endswith("True")
    drift = demo_output.split("== drift")[1].splitlines()
    for column, flag in PLANTED["drift"].items():
        assert next(x for x in drift if x.strip().startswith(column + " ")).rstrip().endswith(flag)
    # the notes list the data warnings and say which frame each is about
    assert "- log (" in demo_output and "rows): column 'parcel_ref'" in demo_output
    assert "- later batch (" in demo_output


def test_numbers_read_at_the_display_precision():
    # issue 10: "q = 0", "MI = 6.4e-16 bits", "NMI -1.9e-5" -> "below 0.001" and "0"
    import pandas as pd

    from infoscope.cli import format_table

    text = format_table(pd.DataFrame({"column": ["a", "b", "c"], "mi": [6.4e-16, -1.9e-5, 0.01234],
                                      "q_value": [0.0, 4e-250, 0.0123]}))
    rows = [line.split() for line in text.splitlines()[1:]]
    assert rows[0] == ["a", "0", "below", "0.001"]
    assert rows[1] == ["b", "0", "below", "0.001"]
    assert rows[2] == ["c", "0.0123", "0.0123"]


def test_main_without_command_prints_help(capsys):
    assert main([]) == 2
    assert "demo" in capsys.readouterr().out


@pytest.mark.parametrize(("option", "match"), [(["--rows", "0"], "--rows must be >= 1, got 0"),
                                               (["--seed", "-1"], "--seed must be >= 0, got -1")])
def test_bad_option_is_one_clear_line(capsys, option, match):
    assert main(["demo", *option]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert err == [f"infoscope demo: {match}"]


def test_python_dash_m_runs_the_demo():
    result = subprocess.run([sys.executable, "-m", "infoscope", *SMALL],
                            capture_output=True, text=True, timeout=120)
    assert result.returncode == 0, result.stderr
    assert "== drift of a later batch" in result.stdout
    assert "Traceback" not in result.stderr


# ------------------------------------------------------------------ CLI: CSV datetimes
def _profile_output(capsys, argv):
    from infoscope.cli import main

    status = main(argv)
    return status, capsys.readouterr().out


def _kind_of(output: str, column: str) -> str:
    section = output.split("== entropy per column", 1)[1].split("\n== ", 1)[0]
    row = next(line for line in section.splitlines() if line.strip().startswith(column + " "))
    return row.split()[1]


def test_cli_reads_csv_timestamps_as_datetimes(tmp_path, capsys):
    rng = np.random.default_rng(3)
    n = 600
    frame = pd.DataFrame({
        "picked_up": pd.Timestamp("2025-02-01") + pd.to_timedelta(rng.integers(0, 10**7, n), unit="s"),
        "parcels": rng.integers(1, 90, n),            # numeric: never touched
        "zone": rng.choice(["north", "south", "east"], n),
    })
    path = tmp_path / "log.csv"
    frame.to_csv(path, index=False)  # reference: pandas writes datetimes as ISO 8601 text
    assert pd.read_csv(path)["picked_up"].dtype.kind not in "mM"  # as text without the fix
    status, out = _profile_output(capsys, ["profile", str(path)])
    assert status == 0
    assert "read as dates/times (text in the file): 'picked_up'" in out
    assert _kind_of(out, "picked_up") == "datetime"
    assert _kind_of(out, "parcels") in ("numeric", "integer_categories")
    assert _kind_of(out, "zone") != "datetime"  # words stay text


def test_parse_datetime_columns_leaves_mixed_text_alone():
    from infoscope.cli import parse_datetime_columns

    dates = [str(d.date()) for d in pd.date_range("2025-01-01", periods=100)]
    mixed = pd.DataFrame({"d": dates[:90] + ["soon"] * 10, "code": ["2025-01-01x"] * 100,
                          "ok": dates, "num": np.arange(100.0)})
    before = mixed.copy()
    out, names = parse_datetime_columns(mixed)
    assert names == ["ok"]
    assert out["ok"].dtype.kind == "M" and out["num"].dtype == np.float64
    pd.testing.assert_frame_equal(mixed, before)  # the input frame is not changed


# ------------------------------------------------------------------ CLI headers
def test_cli_top_pairs_only_significant_and_headers(tmp_path, capsys):
    rng = np.random.default_rng(5)
    n = 800
    a = rng.choice(list("pqrs"), n)
    indep = pd.DataFrame({"u": rng.choice(list("abc"), n), "v": rng.choice(list("xyz"), n)})
    linked = pd.DataFrame({"a": a, "b": np.where(rng.random(n) < 0.9, a, "t"),
                           "w": rng.choice(list("mn"), n)})
    p1, p2 = tmp_path / "indep.csv", tmp_path / "linked.csv"
    indep.to_csv(p1, index=False)
    linked.to_csv(p2, index=False)
    from infoscope.frame.session import ProfileSession

    # reference for the filter: scipy.stats.chi2_contingency's G-test (lambda_="log-likelihood")
    # p-value of the one pair of the independent frame; with one pair q = p
    g = scipy.stats.chi2_contingency(pd.crosstab(indep["u"], indep["v"]).to_numpy(),
                                     lambda_="log-likelihood", correction=False)
    status, out = _profile_output(capsys, ["profile", str(p1)])
    assert status == 0
    assert "only pairs with q < 0.05" in out
    assert g.pvalue >= 0.05  # independent draws (seeded): the reference finds nothing
    assert "no pair has q < 0.05" in out
    status, out = _profile_output(capsys, ["profile", str(p2), "--target", "b"])
    section = out.split("== top", 1)[1].split("\n== ", 1)[0]
    shown = [line.split()[:2] for line in section.splitlines()[2:] if line.strip()]
    assert ["a", "b"] in shown  # b copies a 90% of the time
    q = ProfileSession(linked).pairs("nmi").set_index(["a", "b"])["q_value"]
    assert all(q.loc[tuple(pair)] < 0.05 for pair in shown if tuple(pair) in q.index)
    assert "95% bootstrap interval" in out.split("== entropy per column", 1)[1].splitlines()[0]
    assert "an estimate below 0 means no dependence beyond the bias correction" in out


def test_cli_demo_drift_header_states_units(capsys):
    status, out = _profile_output(capsys, ["demo", "--rows", "1500", "--batch-rows", "600"])
    assert status == 0
    header = next(line for line in out.splitlines() if line.startswith("== drift of"))
    assert "PSI in nats; KL and JS in bits" in header
