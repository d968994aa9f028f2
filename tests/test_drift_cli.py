"""``infoscope drift REFERENCE CURRENT``: exit status, JSON record, HTML page; the Python record is the same."""
from __future__ import annotations

import json
import warnings

import numpy as np
import pandas as pd
import pytest
from scipy.special import rel_entr

from infoscope._warnings import DataQualityWarning
from infoscope.cli import main
from infoscope.datasets import PLANTED, make_deliveries, make_deliveries_batch
from infoscope.frame.drift_report import SCHEMA, SCHEMA_VERSION
from infoscope.frame.results import DRIFT_COLUMNS, DRIFT_FLAGS


@pytest.fixture(scope="module")
def files(tmp_path_factory):
    folder = tmp_path_factory.mktemp("drift")
    make_deliveries(6_000, seed=0).to_csv(folder / "ref.csv", index=False)
    make_deliveries_batch(3_000, seed=1).to_csv(folder / "new.csv", index=False)
    make_deliveries_batch(3_000, seed=5, drift=False).to_csv(folder / "same.csv", index=False)
    return folder


def _strict(text: str):
    def no_constant(name):
        raise ValueError(f"not strict JSON: {name}")
    return json.loads(text, parse_constant=no_constant)


def test_exit_status_follows_fail_on(files, capsys):
    ref, new, same = (str(files / f) for f in ("ref.csv", "new.csv", "same.csv"))
    assert main(["drift", ref, new, "--fail-on", "major"]) == 1
    out = capsys.readouterr().out
    assert "drift at or above 'major' in: 'weight_kg', 'weight_lb'" in out
    assert main(["drift", ref, new]) == 0            # no --fail-on: a report, not a gate
    assert main(["drift", ref, same, "--fail-on", "moderate"]) == 0
    assert main(["drift", ref, str(files / "nope.csv")]) == 2
    assert "no such file" in capsys.readouterr().err


def test_json_record_has_the_documented_schema_and_matches_the_python_record(files, capsys):
    path = files / "d.json"
    assert main(["drift", str(files / "ref.csv"), str(files / "new.csv"), "--json", str(path)]) == 0
    record = _strict(path.read_text(encoding="utf-8"))
    assert (record["schema"], record["version"]) == (SCHEMA, SCHEMA_VERSION)
    assert set(record) >= {"reference", "current", "settings", "units", "level", "flags", "summary",
                           "columns", "pairs", "notes", "infoscope_version"}
    assert record["flags"] == DRIFT_FLAGS and record["units"]["psi"] == "nats"
    assert all(list(c)[: len(DRIFT_COLUMNS)] == list(DRIFT_COLUMNS) and "bins" in c for c in record["columns"])
    flags = {c["column"]: c["flag"] for c in record["columns"]}
    assert flags == {c: PLANTED["drift"].get(c, "stable") for c in flags}
    # each symbol's share of PSI sums to the column's PSI: the smoothed shares of the
    # record, scored with scipy.special.rel_entr (PSI = KL(a||e) + KL(e||a))
    for c in record["columns"]:
        if c["bins"] and c["psi"] is not None:
            e = np.array([b["reference_share"] for b in c["bins"]])
            a = np.array([b["current_share"] for b in c["bins"]])
            assert sum(b["contribution"] for b in c["bins"]) == pytest.approx(c["psi"], rel=1e-9)
            assert c["psi"] == pytest.approx(float(rel_entr(a, e).sum() + rel_entr(e, a).sum()), rel=1e-9)
    # the Python equivalent returns the same record
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataQualityWarning)
        from infoscope.cli import read_table
        py = read_table(str(files / "new.csv")).info_profile.drift_report(
            read_table(str(files / "ref.csv")), n_boot=100, reference_name=str(files / "ref.csv"),
            current_name=str(files / "new.csv")).to_dict()
    assert _strict(json.dumps(py, allow_nan=False))["columns"] == record["columns"]
    assert py["summary"] == record["summary"]
    # JSON to stdout: the record alone on stdout, the table on stderr
    capsys.readouterr()
    assert main(["drift", str(files / "ref.csv"), str(files / "same.csv"), "--json", "-"]) == 0
    captured = capsys.readouterr()
    assert _strict(captured.out)["summary"]["worst"] == "stable" and "drift per column" in captured.err


def test_html_page_is_self_contained_and_escapes_names(tmp_path):
    ref = pd.DataFrame({"<b>x</b>": list("ab") * 200, "amount": np.random.default_rng(0).normal(size=400)})
    cur = pd.DataFrame({"<b>x</b>": ["a"] * 150 + ["<i>b</i>"] * 50, "amount":
                        np.random.default_rng(1).normal(1.0, 1.0, size=200)})
    ref.to_csv(tmp_path / "r.csv", index=False)
    cur.to_csv(tmp_path / "c.csv", index=False)
    page = tmp_path / "d.html"
    assert main(["drift", str(tmp_path / "r.csv"), str(tmp_path / "c.csv"), "--out", str(page),
                 "--pairs", "--fail-on", "moderate"]) == 1
    text = page.read_text(encoding="utf-8")
    assert "<script" not in text and "http" not in text.split("</head>")[0]
    assert "&lt;b&gt;x&lt;/b&gt;" in text and "<b>x</b>" not in text and "&lt;i&gt;b&lt;/i&gt;" in text
    assert "chance band" in text and "Pairs whose dependence changed" in text


def test_bad_options_are_one_line(files, capsys):
    ref, new = str(files / "ref.csv"), str(files / "new.csv")
    assert main(["drift", ref, new, "--n-perm", "0"]) == 2
    assert main(["drift", ref, new, "--json", str(files / "no-folder" / "d.json")]) == 2
    err = capsys.readouterr().err
    assert "--n-perm must be >= 1" in err and "the folder does not exist" in err
    with pytest.raises(SystemExit):
        main(["drift", ref, new, "--fail-on", "minor"])


def test_the_command_reads_files_with_the_shared_reader(tmp_path, capsys):
    # semicolon-separated files: sniffed, or told with --sep (infoscope.reading.read_table)
    rng = np.random.default_rng(3)
    for name, n in (("r.csv", 400), ("c.csv", 300)):
        pd.DataFrame({"a": rng.normal(size=n).round(3), "b": rng.choice(list("xyz"), size=n)}).to_csv(
            tmp_path / name, sep=";", index=False)
    args = ["drift", str(tmp_path / "r.csv"), str(tmp_path / "c.csv"), "--fail-on", "moderate"]
    assert main(args) == 0
    assert main(args + ["--sep", ";"]) == 0
    out = capsys.readouterr().out
    assert "2 common column(s)" in out


def test_the_view_payload_carries_the_drift_record_with_small_cells_hidden():
    # views.payload(session, reference=...) adds the "_drift" part: the same record as
    # drift_report(...).to_dict(), with per-symbol counts below min_count hidden and
    # never exactly one hidden cell per side (the column total would give it back)
    from infoscope.frame.session import ProfileSession
    from infoscope.views.payload import payload

    rng = np.random.default_rng(9)
    ref = pd.DataFrame({"c": rng.choice(list("abcdef"), size=600, p=[.4, .3, .2, .06, .03, .01]),
                        "x": rng.normal(size=600)})
    cur = pd.DataFrame({"c": rng.choice(list("abcdefg"), size=300, p=[.3, .3, .2, .1, .05, .03, .02]),
                        "x": rng.normal(0.5, 1, size=300)})
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataQualityWarning)
        session = ProfileSession(cur, n_boot=0)
        part = payload(session, min_count=10, reference=ref)["state"]["_drift"]
        plain = session.drift_report(ref).to_dict()
    assert part["schema"] == SCHEMA and part["settings"]["min_count"] == 10
    assert [c["psi"] for c in part["columns"]] == [c["psi"] for c in plain["columns"]]
    bins = {c["column"]: c["bins"] for c in part["columns"]}["c"]
    for side in ("reference", "current"):
        hidden = [b for b in bins if b[side] is None]
        shown = [b[side] for b in bins if b[side] is not None]
        assert all(v == 0 or v >= 10 for v in shown)
        assert len(hidden) != 1
    assert any(b["hidden"] == "small" for b in bins) and any(b["hidden"] == "complement" for b in bins)
    assert payload(session)["state"]["_drift"] is None
