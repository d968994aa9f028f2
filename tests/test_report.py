"""Static outputs: Vega-Lite charts, the SVG picture and small-cell suppression.

The result tables fed to the views here are computed in the test from scikit-learn's
bundled wine data (Forina et al.; ``sklearn.datasets.load_wine``) with reference
libraries (``scipy.stats.entropy``, ``sklearn.metrics.mutual_info_score``,
``pandas.crosstab``), independently of infoscope's own estimators, so a check that
"the chart shows the table" compares against numbers from outside the project.
"""
from __future__ import annotations

import json
import re
import xml.etree.ElementTree as ET

import numpy as np
import pandas as pd
import pytest
from hypothesis import given
from hypothesis import strategies as st
from hypothesis.extra.numpy import arrays
from scipy.stats import entropy as scipy_entropy
from sklearn.datasets import load_wine
from sklearn.metrics import mutual_info_score

from infoscope.report import charts, picture
from infoscope.views import serialize as rec
from infoscope.report.suppression import check_min_count, suppression_mask

HOSTILE = ["<img src=x onerror=alert(1)>", "a.b[0]", 'say "hi"', "it's", "x&y", "ctrl\x01char"]
SVG_NS = "{http://www.w3.org/2000/svg}"


@pytest.fixture(scope="module")
def wine_codes():
    """Wine columns cut into 4 quantile bins, renamed so some names are hostile."""
    frame = load_wine(as_frame=True).frame
    picked = ["alcohol", "malic_acid", "color_intensity", "proline", "hue", "target"]
    codes = {}
    for name in picked[:-1]:
        codes[name] = pd.qcut(frame[name], 4, labels=False, duplicates="drop").to_numpy()
    codes["target"] = frame["target"].to_numpy()
    renamed = dict(zip(picked, [HOSTILE[0], HOSTILE[1], HOSTILE[2], "proline", "hue", "target"]))
    return {renamed[k]: v for k, v in codes.items()}


@pytest.fixture(scope="module")
def wine_tables(wine_codes):
    """The real result tables of a session over the wine codes (plug-in estimator, bits).

    The numbers are checked against scipy and scikit-learn where they are used; the
    small cells of hue x target (scikit-learn's wine data) are real.
    """
    import warnings

    from infoscope.frame.session import ProfileSession

    frame = pd.DataFrame(wine_codes)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # sparse-cell notes of the small wine sample
        session = ProfileSession(frame, estimator="plugin", n_boot=50, seed=0)
        tables = {"entropy": session.entropy(), "matrix": session.matrix("mi"),
                  "pair": session.pair("hue", "target"), "relevance": session.relevance("target"),
                  "drift": ProfileSession(frame.iloc[:90]).drift(frame.iloc[90:])}
    return tables


def _crosstab(codes: dict, a: str, b: str, pair) -> np.ndarray:
    """pandas.crosstab of two code columns, in the row / column order of ``pair``."""
    table = pd.crosstab(pd.Series(codes[a]), pd.Series(codes[b]))
    table.index, table.columns = table.index.astype(str), table.columns.astype(str)
    return table.loc[list(pair.counts.index), list(pair.counts.columns)].to_numpy()


def _svg_texts(svg: str) -> list[str]:
    root = ET.fromstring(svg)  # also proves the SVG is well-formed XML
    return ["".join(t.itertext()) for t in root.iter(f"{SVG_NS}text")]


# ----------------------------------------------------------------- suppression
def test_check_min_count_rejects_bad_values():
    assert check_min_count(None) is None and check_min_count(1) is None and check_min_count(10) == 10
    with pytest.raises(TypeError, match="min_count"):
        check_min_count(2.5)
    with pytest.raises(TypeError, match="min_count"):
        check_min_count(True)
    with pytest.raises(ValueError, match="min_count"):
        check_min_count(-3)


def _pinned_down(mask: np.ndarray, table: np.ndarray) -> list[tuple[int, int]]:
    """Hidden cells whose count follows from the visible cells and the row/column totals.

    Independent check by linear algebra (not the module's graph argument): a hidden
    cell is determined by the totals exactly when its unit vector lies in the row
    space of the margin equations restricted to the hidden cells.
    """
    cells = list(zip(*np.nonzero(mask)))
    if not cells:
        return []
    r, c = table.shape
    eq = np.zeros((r + c, len(cells)))
    for k, (i, j) in enumerate(cells):
        eq[i, k] = 1
        eq[r + j, k] = 1
    rank = np.linalg.matrix_rank(eq)
    pinned = []
    for k, cell in enumerate(cells):
        unit = np.zeros(len(cells))
        unit[k] = 1
        if np.linalg.matrix_rank(np.vstack([eq, unit])) == rank:
            pinned.append(cell)
    return pinned


@given(arrays(np.int64, st.tuples(st.integers(2, 6), st.integers(2, 6)), elements=st.integers(0, 40)),
       st.integers(2, 15))
def test_suppression_hides_small_cells_and_nothing_is_pinned_down(table, threshold):
    mask = suppression_mask(table, threshold)
    primary = (table > 0) & (table < threshold)
    assert mask[primary].all(), "every count 1..threshold-1 is hidden (common practice)"
    for line in [*mask, *mask.T]:
        assert line.sum() != 1, "no row or column may hold exactly one hidden cell"
    assert _pinned_down(mask, table) == []


def test_suppression_of_a_vector_hides_at_least_two_cells():
    mask = suppression_mask(np.array([50, 3, 40, 60]), 10)
    assert mask.tolist() == [False, True, True, False]  # 3 and the smallest other, 40


def test_suppression_off_hides_nothing():
    table = np.array([[1, 2], [3, 4]])
    assert not suppression_mask(table, None).any()
    assert not suppression_mask(table, 1).any()


def test_suppression_closes_a_bridge_between_two_hidden_blocks():
    # Two 2x2 blocks of small counts joined by one more small cell: the degree rule
    # alone would leave the joining cell pinned down by the totals.
    table = np.array([
        [3, 4, 90, 90, 90],
        [5, 6, 2, 90, 90],
        [90, 90, 7, 8, 90],
        [90, 90, 9, 3, 90],
        [90, 90, 90, 90, 90],
    ])
    mask = suppression_mask(table, 10)
    assert _pinned_down(mask, table) == []


def test_pair_records_ship_no_hidden_count(wine_codes, wine_tables):
    pair = wine_tables["pair"]
    raw = _crosstab(wine_codes, "hue", "target", pair)
    assert ((raw > 0) & (raw < 10)).any(), "the wine crosstab has small cells to hide"
    out = rec.pair_records(pair, min_count=10)
    hidden = [c for c in out["cells"] if c["hidden"]]
    assert len(hidden) == out["hidden_cells"] >= 2
    for cell in hidden:
        assert cell["count"] is None and cell["expected"] is None and cell["pmi"] is None
        i, j = pair.counts.index.get_loc(cell["row"]), pair.counts.columns.get_loc(cell["col"])
        # "<10" only where the pandas.crosstab count really is below 10; the others are
        # complementary cells and carry their own marker
        assert cell["shown"] == ("<10" if 0 < raw[i, j] < 10 else "\u00b7"), cell
    assert "row_totals" not in out and "col_totals" not in out
    visible = {(c["row"], c["col"]): c["count"] for c in out["cells"] if not c["hidden"]}
    for (i, row) in enumerate(pair.counts.index):
        for (j, col) in enumerate(pair.counts.columns):
            if (row, col) in visible:
                assert visible[(row, col)] == raw[i, j]  # pandas.crosstab count


def test_pair_records_without_threshold_keep_totals(wine_codes, wine_tables):
    pair = wine_tables["pair"]
    out = rec.pair_records(pair)
    assert out["hidden_cells"] == 0
    assert out["row_totals"] == _crosstab(wine_codes, "hue", "target", pair).sum(axis=1).tolist()


# ----------------------------------------------------------------- charts
def test_entropy_chart_shows_the_table(wine_codes, wine_tables):
    table = wine_tables["entropy"]
    spec = charts.entropy_chart(table).to_dict()
    values = spec["data"]["values"] if "data" in spec else spec["layer"][0]["data"]["values"]
    by_name = {v["column"]: v["entropy"] for v in values}
    for name, c in wine_codes.items():
        assert by_name[name] == pytest.approx(scipy_entropy(np.bincount(c), base=2))


def _fields(spec) -> set[str]:
    found = set()

    def walk(node):
        if isinstance(node, dict):
            for key, value in node.items():
                if key == "field" and isinstance(value, str):
                    found.add(value)
                elif key != "values":
                    walk(value)
        elif isinstance(node, list):
            for item in node:
                walk(item)

    walk(spec)
    return found


def test_chart_fields_are_fixed_and_names_render_as_text(wine_tables):
    table = wine_tables["entropy"]
    chart = charts.entropy_chart(table)
    fields = _fields(chart.to_dict())
    assert fields and not fields & set(HOSTILE)
    assert all("." not in f and "[" not in f for f in fields)
    svg = charts.chart_to_svg(chart)
    texts = _svg_texts(svg)
    assert HOSTILE[0] in texts  # the name is text in the picture ...
    assert ET.fromstring(svg).find(f".//{SVG_NS}img") is None  # ... and never markup
    assert "<img" not in svg


def test_grid_chart_values_match_sklearn(wine_codes, wine_tables):
    m = wine_tables["matrix"]
    spec = charts.grid_chart(m).to_dict()
    names = list(wine_codes)
    assert spec["encoding"]["x"]["sort"] == names
    got = {(v["a"], v["b"]): v["value"] for v in spec["data"]["values"]}
    a, b = names[0], names[-1]
    # sklearn.metrics.mutual_info_score (nats) / ln 2
    assert got[(a, b)] == pytest.approx(mutual_info_score(wine_codes[a], wine_codes[b]) / np.log(2))
    assert (a, a) not in got
    assert charts.chart_to_svg(spec).startswith("<svg")


def test_pair_chart_suppression_reaches_the_rendered_picture(wine_tables):
    pair = wine_tables["pair"]
    chart = charts.pair_chart(pair, min_count=10)
    spec = chart.to_dict()
    assert any("hidden" in s for s in spec["title"]["subtitle"])
    texts = _svg_texts(charts.chart_to_svg(chart))
    assert "<10" in texts
    mask = suppression_mask(pair.counts.to_numpy(), 10)
    shown_counts = {t for t in texts if t.isdigit()}
    visible = {str(v) for v in pair.counts.to_numpy()[~mask]}
    hidden_only = {str(v) for v in pair.counts.to_numpy()[mask]} - visible
    assert not shown_counts & hidden_only


def test_relevance_and_drift_charts_render(wine_codes, wine_tables):
    rel = wine_tables["relevance"]
    # the relevance the chart draws: scikit-learn's mutual_info_score (nats) / ln 2
    for row in rel.itertuples():
        assert row.mi == pytest.approx(mutual_info_score(wine_codes[row.column], wine_codes["target"]) / np.log(2))
    assert "<svg" in charts.chart_to_svg(charts.relevance_chart(rel, target="target"))
    png = charts.chart_to_png(charts.drift_chart(wine_tables["drift"]))
    assert png[:4] == b"\x89PNG"


def test_charts_refuse_a_table_that_is_not_a_result_table():
    with pytest.raises(ValueError, match="entropy table lacks"):
        charts.entropy_chart(pd.DataFrame({"column": ["x"]}))
    with pytest.raises(TypeError, match="DataFrame"):
        charts.grid_chart([[1, 2], [3, 4]])


# ----------------------------------------------------------------- picture
def test_picture_escapes_names_and_is_well_formed(wine_tables):
    svg = picture.profile_svg_from_tables(wine_tables["entropy"], wine_tables["matrix"])
    texts = _svg_texts(svg)
    assert any(HOSTILE[0][:20] in t for t in texts)
    assert "<img" not in svg and "ctrl\x01" not in svg
    titles = ["".join(t.itertext()) for t in ET.fromstring(svg).iter(f"{SVG_NS}title")]
    assert any(t.startswith('say "hi"') for t in titles)


def test_picture_bar_lengths_follow_the_entropies(wine_tables):
    table = wine_tables["entropy"]
    svg = picture.profile_svg_from_tables(table)
    root = ET.fromstring(svg)
    filled = [r for r in root.iter(f"{SVG_NS}rect") if r.get("fill") == charts.PALETTE["bar"]]
    widths = sorted(float(r.get("width")) for r in filled)
    expected = sorted(table["entropy"])
    ratio = [w / e for w, e in zip(widths, expected)]
    assert ratio == pytest.approx([ratio[0]] * len(ratio), rel=0.02)


def test_picture_refuses_bad_max_columns(wine_tables):
    with pytest.raises(ValueError, match="max_columns"):
        picture.profile_svg_from_tables(wine_tables["entropy"], max_columns=0)


def test_svg_data_uri_round_trips():
    import base64

    svg = '<svg xmlns="http://www.w3.org/2000/svg"><text>&lt;x&gt;</text></svg>'
    uri = picture.svg_data_uri(svg)
    assert uri.startswith("data:image/svg+xml;base64,")
    assert base64.b64decode(uri.split(",", 1)[1]).decode() == svg


# ----------------------------------------------------------------- command line
@pytest.fixture(scope="module")
def wine_csv(tmp_path_factory):
    """scikit-learn's bundled wine data (load_wine) written as CSV and Parquet."""
    frame = load_wine(as_frame=True).frame[["alcohol", "hue", "proline", "target"]]
    folder = tmp_path_factory.mktemp("cli")
    frame.to_csv(folder / "wine.csv", index=False)
    frame.to_parquet(folder / "wine.parquet")
    return folder, frame


def test_cli_profile_writes_a_page_with_the_target_entropy(wine_csv, capsys):
    from infoscope.cli import main

    folder, frame = wine_csv
    page = folder / "wine.html"
    status = main(["profile", str(folder / "wine.parquet"), "--target", "target", "--estimator", "plugin",
                   "--bins", "4", "--out", str(page), "--min-count", "10"])
    assert status == 0
    printed = capsys.readouterr().out
    assert "relevance to 'target'" in printed and f"wrote {page}" in printed
    text = page.read_text(encoding="utf-8")
    import re

    payload = json.loads(re.search(r'id="isc-payload">(.*?)</script>', text, re.S).group(1))
    table = json.loads(payload["state"]["_entropy"])
    row = dict(zip(table["fields"], next(r for r in table["rows"] if r[0] == "target")))
    # scipy.stats.entropy of the class counts (59, 71, 48), plug-in, bits
    assert row["entropy"] == pytest.approx(scipy_entropy(np.bincount(frame["target"]), base=2), rel=1e-9)
    assert "counts below 10 are hidden" in text


def test_cli_profile_reads_csv_and_prints_tables(wine_csv, capsys):
    from infoscope.cli import main

    folder, _ = wine_csv
    assert main(["profile", str(folder / "wine.csv"), "--bins", "fd", "--top", "2"]) == 0
    printed = capsys.readouterr().out
    assert "entropy per column" in printed and "top 2 pairs" in printed


@pytest.mark.parametrize("argv, message", [
    (["profile", "{folder}/absent.csv"], "no such file"),
    (["profile", "{folder}/wine.csv", "--target", "colour"], "--target 'colour' is not a column"),
    (["profile", "{folder}/wine.csv", "--out", "{folder}/nowhere/p.html"], "does not exist"),
    (["profile", "{folder}/wine.csv", "--out", "{folder}/p.txt"], "must name an .html file"),
    (["profile", "{folder}/wine.csv", "--min-count", "-2"], "--min-count"),
    (["profile", "{folder}/wine.csv", "--strategy", "sideways"], "strategy"),
    (["profile", "{folder}/broken.parquet"], "cannot read"),
    (["profile", "{folder}/wine.xlsx"], "cannot tell the format"),
])
def test_cli_bad_input_is_one_line_and_status_2(wine_csv, capsys, argv, message):
    from infoscope.cli import main

    folder, _ = wine_csv
    (folder / "broken.parquet").write_bytes(b"not a parquet file")
    (folder / "wine.xlsx").write_bytes(b"")
    assert main([a.format(folder=folder) for a in argv]) == 2
    err = capsys.readouterr().err.strip()
    assert message in err and "\n" not in err and "Traceback" not in err


def test_cli_error_from_the_installed_command_has_no_traceback(tmp_path):
    import subprocess
    import sys

    done = subprocess.run([sys.executable, "-m", "infoscope", "profile", str(tmp_path / "absent.csv")],
                          capture_output=True, text=True, timeout=120)
    assert done.returncode == 2
    assert done.stderr.strip().count("\n") == 0 and "no such file" in done.stderr
    assert "Traceback" not in done.stderr


# ----------------------------------------------------------------- on a real profile
@pytest.fixture(scope="module")
def demo_session():
    import warnings

    from infoscope.datasets import make_deliveries
    from infoscope.frame.session import ProfileSession

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # the demo's planted data-quality warnings
        session = ProfileSession(make_deliveries(50_000, seed=0), target="late", n_boot=0)
        session.entropy(), session.matrix(order="cluster"), session.relevance("late")
    return session


def test_picture_of_the_demo_shows_every_view(demo_session):
    # (its speed against the session's own tables: benchmarks/speed_guards.py, 6.)
    import warnings

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        svg = picture.profile_svg(demo_session)
    texts = _svg_texts(svg)
    assert "Entropy bars" in texts and any(t.startswith("Information grid") for t in texts)
    assert "Relevance to late" in texts
    # the planted leak (compensation paid after a late delivery) is drawn as leakage
    assert any("possible leakage" in t for t in texts)


def test_profile_charts_of_the_demo(demo_session):
    import warnings

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        out = charts.profile_charts(demo_session, pair=("weight_kg", "weight_lb"), min_count=10)
    assert set(out) == {"entropy", "grid", "pair", "relevance"}
    pair_spec = out["pair"].to_dict()
    true = demo_session.pair("weight_kg", "weight_lb").counts.to_numpy()
    cells = pair_spec["layer"][0]["data"]["values"] if "data" in pair_spec["layer"][0] else pair_spec["data"]["values"]
    assert len(cells) == true.size
    for cell, count in zip(cells, true.ravel()):
        if 0 < count < 10:
            assert cell["count"] is None and cell["shown"] == "<10"
        elif cell["count"] is None:  # complementary: never labelled as a small count
            assert cell["shown"] == "\u00b7" and cell["reason"] == "complement"
    json.dumps(pair_spec)  # the spec is plain JSON


def test_payload_with_min_count_hides_cells_and_leaves_the_session_alone():
    from infoscope.frame.session import ProfileSession
    from infoscope.views import payload

    # one small cell (3 rows) in a 2 x 2 table: with min_count=10 it is hidden, and
    # the complementary cells with it (no row or column may hold one hidden cell)
    df = pd.DataFrame({"a": ["x"] * 53 + ["y"] * 100, "b": ["p"] * 50 + ["q"] * 3 + ["p"] * 40 + ["q"] * 60})
    session = ProfileSession(df, n_boot=0)
    before = session.pair("a", "b").counts.copy()
    out = payload(session, min_count=10)
    for v in (out["state"]["_pair"], out["pair_cache"]["a\u0000b"]):
        assert v["counts"] == [[None, None], [None, None]] and v["row_totals"] is None
        assert v["expected"] is None and v["pmi"] == [[None, None], [None, None]]
    assert out["state"]["min_count"] == 10
    assert session.pair("a", "b").counts.equals(before)
    assert payload(session)["state"]["_pair"]["counts"] == [[40, 60], [50, 3]]  # levels by frequency


def test_script_json_cannot_close_its_element():
    from infoscope.report.html import _script_json

    text = _script_json({"name": "</script><script>alert(1)</script>", "v": "a\u2028b & c"})
    assert "</" not in text and "<" not in text and "&" not in text and "\u2028" not in text
    assert json.loads(text)["name"] == "</script><script>alert(1)</script>"


def test_to_html_of_a_session_writes_an_offline_page(demo_session, tmp_path):
    import warnings

    from infoscope.report.html import CONTENT_SECURITY_POLICY, to_html

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        path = to_html(demo_session, tmp_path / "p.html", min_count=10, title='Q3 <log> "final"')
    text = path.read_text(encoding="utf-8")
    assert "<title>Q3 &lt;log&gt; &quot;final&quot;</title>" in text
    import html

    assert "connect-src 'none'" in CONTENT_SECURITY_POLICY
    assert f'content="{html.escape(CONTENT_SECURITY_POLICY, quote=True)}"' in text
    assert not re.search(r"""(src|href)=["']?https?:""", text), "nothing loads from the network"
    assert "counts below 10 are hidden" in text


def test_accessor_to_html_is_the_report_of_its_session(tmp_path):
    import warnings

    from infoscope.frame.sessions import session_for
    from infoscope.report.html import to_html

    df = pd.DataFrame({"<b>x</b>": ["u", "v"] * 30 + ["w"] * 3, "y": [0, 1] * 30 + [1] * 3,
                       "z": list("pqr") * 21})
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        out = df.info_profile.to_html(tmp_path / "p.html", min_count=5, target="y", n_boot=0, order="name")
        direct = to_html(session_for(df, target="y", n_boot=0), None, min_count=5, settings={"order": "name"})
    assert out == tmp_path / "p.html"
    text = out.read_text(encoding="utf-8")
    assert text == direct  # the accessor adds nothing of its own
    payload = json.loads(re.search(r'id="isc-payload">(.*?)</script>', text, re.S).group(1))
    state = payload["state"]
    assert state["target"] == "y" and state["order"] == "name" and state["min_count"] == 5
    assert json.loads(state["_relevance"])["target"] == "y"
    assert "<b>x</b>" not in text  # the name travels escaped
    # the 3-row level 'w' is a small cell in every pair view with x
    views = [v for k, v in payload["pair_cache"].items() if "<b>x</b>" in k]
    assert views and all(v["hidden_cells"] > 0 and v["row_totals"] is None for v in views)
    with pytest.raises(ValueError, match="differ from the session"):
        to_html(session_for(df, n_boot=0), None, settings={"estimator": "plugin"})


def test_cli_demo_out_writes_the_page(tmp_path, capsys):
    from infoscope.cli import main

    page = tmp_path / "demo.html"
    assert main(["demo", "--rows", "2000", "--batch-rows", "500", "--out", str(page), "--min-count", "5"]) == 0
    assert f"wrote {page}" in capsys.readouterr().out
    text = page.read_text(encoding="utf-8")
    assert 'id="isc-payload"' in text and "counts below 5 are hidden" in text


def test_picture_is_wide_enough_for_every_caption(wine_tables):
    # a viewer clips what lies beyond the SVG's width (the grid's caption used to run
    # past it): every left-aligned line must end inside, estimated at 0.55 em per
    # character, about the average advance of a sans-serif face (common practice)
    import re

    for matrix in (None, wine_tables["matrix"]):
        svg = picture.profile_svg_from_tables(wine_tables["entropy"], matrix)
        width = float(re.search(r'<svg [^>]*width="([\d.]+)"', svg).group(1))
        for m in re.finditer(r'<text x="([\d.]+)"([^>]*)>([^<]*)</text>', svg):
            if 'text-anchor="end"' in m.group(2):
                continue
            size = float(re.search(r'font-size="([\d.]+)"', m.group(2)).group(1))
            assert float(m.group(1)) + 0.55 * size * len(m.group(3)) <= width, m.group(3)


def test_export_says_the_negative_estimates_caution_once():
    # issue 10: the footer repeated the views' own caution line
    from infoscope.frame.session import ProfileSession
    from infoscope.report.html import profile_html

    from infoscope.report.html import STATIC

    s = ProfileSession(pd.DataFrame({"a": list("xyxy") * 10, "b": list("xxyy") * 10}), n_boot=0)
    # the page's own text no longer has it; the views' caution line (in the inlined,
    # encoded front-end module) says it once
    assert "slightly negative" not in profile_html(s)
    assert (STATIC / "profile.js").read_text(encoding="utf-8").count("slightly negative") == 1
