"""Tests for the fixes of the result-table review (flags, drift units, CLI, matrix).

Each check names its outside reference beside it.
"""

from __future__ import annotations

import math

import numpy as np
import pandas as pd
import pytest
import scipy.stats

import infoscope  # noqa: F401
from infoscope.frame.session import ProfileSession


# ------------------------------------------------------------ exceeds_log_k
@pytest.mark.filterwarnings("ignore:column 'ident'")
def test_all_distinct_column_is_flagged_above_log_k():
    n = 2000
    df = pd.DataFrame({"ident": [f"r{i}" for i in range(n)],
                       "grp": list("abcd") * (n // 4)})
    row = ProfileSession(df, estimator="miller_madow", n_boot=0, base=2).entropy().set_index("column")
    ident = row.loc["ident"]
    # reference: scipy.stats.entropy of the all-distinct counts (plug-in, log2 n)
    # plus the Miller (1955) correction (K - 1) / (2 n) nats, converted to bits
    plug = scipy.stats.entropy(np.ones(n), base=2)
    expected = plug + (n - 1) / (2 * n) / math.log(2)
    assert ident["entropy"] == pytest.approx(expected, rel=1e-9)
    assert ident["max_entropy"] == pytest.approx(math.log2(n), rel=1e-12)
    assert ident["efficiency"] > 1.0  # kept as computed, not clipped
    assert "exceeds_log_k" in ident["flags"].split(",")
    # a uniform four-level column under the plug-in equals log K: no flag
    # (scipy.stats.entropy of [1, 1, 1, 1] in bits = 2, closed form log2 4)
    plain = ProfileSession(df, estimator="plugin", n_boot=0, base=2).entropy().set_index("column")
    assert plain.loc["grp", "entropy"] == pytest.approx(scipy.stats.entropy([1, 1, 1, 1], base=2))
    assert "exceeds_log_k" not in plain.loc["grp", "flags"].split(",")
    assert "exceeds_log_k" not in plain.loc["ident", "flags"].split(",")


def test_binned_column_is_clipped_to_log_k_not_flagged():
    # Quantile bins make the 16 bins almost equally full; Miller-Madow adds
    # (K - 1) / (2 n) nats (Miller 1955) and passes log2 16 = 4 bits.  The alphabet is
    # fixed by the binning, so H <= log K holds for the truth (Shannon 1948, the
    # uniform distribution maximises entropy; common practice to project onto it):
    # the estimate and its interval stop at log K and no flag is raised.
    rng = np.random.default_rng(5)
    df = pd.DataFrame({"x": rng.normal(size=400), "flag": rng.integers(0, 2, 400).astype(bool)})
    out = ProfileSession(df, estimator="miller_madow", bins=16, n_boot=50).entropy().set_index("column")
    x = out.loc["x"]
    raw = scipy.stats.entropy(np.full(16, 25), base=2) + 15 / (2 * 400) / math.log(2)
    assert raw > 4.0  # the unclipped Miller-Madow value would pass log K
    assert x["entropy"] == pytest.approx(4.0, abs=1e-12)
    assert x["ci_high"] <= 4.0 + 1e-12 and x["ci_low"] <= x["entropy"]
    assert x["efficiency"] <= 1.0 + 1e-12 and x["effective_categories"] <= 16 + 1e-9
    assert "exceeds_log_k" not in x["flags"].split(",")


# ------------------------------------------------------------ drift units
def test_drift_units_psi_in_nats_kl_js_in_session_unit():
    from scipy.spatial.distance import jensenshannon

    cur = pd.DataFrame({"c": ["a"] * 50 + ["b"] * 30 + ["c"] * 20})
    ref = pd.DataFrame({"c": ["a"] * 30 + ["b"] * 30 + ["c"] * 40})
    d = ProfileSession(cur, n_boot=0, base=2).drift(ref, pseudocount=0.5)
    units = d.attrs["units"]
    assert (units["psi"], units["psi_chance"], units["kl"], units["kl_chance"], units["js"]) == (
        "nats", "nats", "bits", "bits", "bits")
    row = d.set_index("column").loc["c"]
    a = np.array([50, 30, 20]) + 0.5  # this frame, pseudocount added to every cell
    e = np.array([30, 30, 40]) + 0.5  # reference
    # reference: PSI = KL(a||e) + KL(e||a) in nats (scipy.stats.entropy, natural log)
    assert row["psi"] == pytest.approx(scipy.stats.entropy(a, e) + scipy.stats.entropy(e, a), rel=1e-10)
    # reference: scipy.stats.entropy(a, e, base=2) for KL in bits
    assert row["kl"] == pytest.approx(scipy.stats.entropy(a, e, base=2), rel=1e-10)
    # reference: scipy.spatial.distance.jensenshannon(base=2) squared, raw counts
    js = jensenshannon([50, 30, 20], [30, 30, 40], base=2) ** 2
    assert row["js"] == pytest.approx(js, rel=1e-9)
    nats = ProfileSession(cur, n_boot=0, base="nats").drift(ref)
    assert {nats.attrs["units"][k] for k in ("psi", "kl", "js", "js_chance")} == {"nats"}
    assert nats.set_index("column").loc["c", "psi"] == pytest.approx(row["psi"], rel=1e-12)


# ------------------------------------------------------------ matrix diagonal
def _frame_with_constant():
    return pd.DataFrame({"x": list("abc") * 40, "y": list("aaabbbcccddd") * 10, "k": [1.5] * 120})


def test_matrix_diagonal_of_constant_column_is_nan():
    s = ProfileSession(_frame_with_constant(), estimator="plugin", n_boot=0)
    for measure in ("nmi", "adjusted_mi"):
        m = s.matrix(measure)
        assert math.isnan(m.loc["k", "k"]), measure  # 0/0: undefined
        assert m.loc["x", "x"] == 1.0 and m.loc["y", "y"] == 1.0
    # the MI diagonal is H(X): scipy.stats.entropy of the counts (closed form log2 3)
    mi = s.matrix("mi")
    assert mi.loc["x", "x"] == pytest.approx(scipy.stats.entropy([40, 40, 40], base=2))
    assert mi.loc["k", "k"] == 0.0
    assert s.matrix("vi").loc["k", "k"] == 0.0
    # clustering still works with an undefined diagonal
    assert sorted(s.matrix("nmi", order="cluster").index) == ["k", "x", "y"]


def test_matrix_plugin_float_noise_becomes_exact_zero(monkeypatch):
    s = ProfileSession(_frame_with_constant(), estimator="plugin", n_boot=0)
    real = s.pairs

    def noisy(measure=None):  # the rounding residue the review saw on the engine path
        t = real(measure).copy()
        t["value"] = t["value"] + np.array([4e-16, -3e-16, 2e-13])[: len(t)]
        return t

    monkeypatch.setattr(s, "pairs", noisy)
    m = s.matrix("nmi")
    off = m.to_numpy()[~np.eye(3, dtype=bool)]
    # x and y are exactly independent (each x level meets each y level equally):
    # plug-in MI = 0 in closed form; every off-diagonal cell is then exactly 0
    assert np.all(off == 0.0)
    assert np.all(np.signbit(off) == False)  # noqa: E712  (no -0.0 either)


# ------------------------------------------------------------ CLI: CSV datetimes
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


# ------------------------------------------------------------ CLI headers
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
