"""Labels of hidden cells: "<10" only for counts really below the threshold.

Complementary cells (hidden only so a small cell cannot be worked out from the
totals; primary and secondary suppression is common practice in official
statistics) get their own marker. The reference for "below the threshold" is the
count itself, from pandas.crosstab of the raw columns.
"""
from __future__ import annotations

import ast
import json
import warnings
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from infoscope.frame.suppression import COMPLEMENTARY, SMALL, VISIBLE, suppression_kinds, suppression_mask

SRC = Path(__file__).resolve().parents[1] / "src" / "infoscope"


def quiet(fn, *args, **kwargs):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return fn(*args, **kwargs)


def test_kinds_split_the_mask_by_the_count_itself():
    table = np.array([[2904, 3, 282], [115, 69, 4], [500, 600, 700]])
    kinds = suppression_kinds(table, 10)
    mask = suppression_mask(table, 10)
    assert ((kinds != VISIBLE) == mask).all()
    primary = (table > 0) & (table < 10)  # the threshold rule itself (common practice)
    assert (kinds[primary] == SMALL).all()
    assert (kinds[mask & ~primary] == COMPLEMENTARY).all()
    assert (kinds == COMPLEMENTARY).any(), "this table needs complementary cells"


def test_frame_never_imports_report():
    # data flows frame -> report: no module of frame/ may import infoscope.report
    for path in (SRC / "frame").glob("*.py"):
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for node in ast.walk(tree):
            names = []
            if isinstance(node, ast.ImportFrom) and node.module:
                names = [node.module]
            elif isinstance(node, ast.Import):
                names = [a.name for a in node.names]
            assert not any(n.startswith("infoscope.report") for n in names), path.name


def test_report_names_still_work():
    from infoscope.report import suppression as rs

    assert rs.suppression_mask is suppression_mask and rs.suppressed_label(10) == "<10"
    assert rs.SUPPRESSED_LABEL.format(min_count=5) == "<5" and rs.complement_label() == rs.COMPLEMENT_LABEL


@pytest.fixture(scope="module")
def demo():
    from infoscope.datasets import make_deliveries
    from infoscope.frame.session import ProfileSession

    frame = make_deliveries(20_000, seed=0)
    return frame, quiet(ProfileSession, frame, n_boot=0)


def _pair_with_complements(session, threshold=10):
    for a, b in (("weight_kg", "weight_lb"), ("depot", "service")):
        pair = quiet(session.pair, a, b)
        kinds = suppression_kinds(pair.counts.to_numpy(), threshold)
        if (kinds == COMPLEMENTARY).any():
            return a, b, pair
    pytest.skip("no demo pair needs complementary cells")


def test_widget_pair_view_marks_complementary_cells(demo):
    from infoscope.views.serialize import pair_view

    _, session = demo
    a, b, pair = _pair_with_complements(session)
    view = pair_view(pair, a, b, min_count=10)
    raw = pair.counts.to_numpy()
    seen = set()
    for i in range(raw.shape[0]):
        for j in range(raw.shape[1]):
            why = view["hidden_reasons"][i][j]
            assert (why is None) == (view["counts"][i][j] is not None)
            if why is not None:
                assert why == ("small" if 0 < raw[i, j] < 10 else "complement"), (raw[i, j], why)
                seen.add(why)
    assert seen == {"small", "complement"}


def test_export_labels_and_ships_no_hidden_count(demo, tmp_path):
    from infoscope.views import payload
    from infoscope.views.serialize import pair_view

    _, session = demo
    a, b, pair = _pair_with_complements(session)
    out = quiet(payload, session, {"selected_pair": [a, b]}, min_count=10, top_pairs=0)
    shipped = out["pair_cache"][f"{a}\u0000{b}"]
    assert out["state"]["_pair"] == shipped and out["state"]["min_count"] == 10
    raw = pair.counts.to_numpy()
    for i in range(raw.shape[0]):
        for j in range(raw.shape[1]):
            why = shipped["hidden_reasons"][i][j]
            if why is not None:
                assert shipped["counts"][i][j] is None and shipped["pmi"][i][j] is None
                assert why == ("small" if 0 < raw[i, j] < 10 else "complement")
    text = json.dumps(shipped)
    assert '"complement"' in text and shipped["row_totals"] is None and shipped["expected"] is None
    # a table suppressed already (PairTable.suppressed) keeps each cell's reason in the view
    again = pair_view(pair.suppressed(10), a, b, min_count=10)
    assert again["hidden_reasons"] == shipped["hidden_reasons"]
    assert not pair.counts.isna().any().any()  # the session's table is untouched


# ----------------------------------------------------------------- the accessor
def test_accessor_pair_takes_min_count(demo):
    frame, _ = demo
    a, b = "weight_kg", "weight_lb"
    full = quiet(frame.info_profile.pair, a, b)
    out = quiet(frame.info_profile.pair, a, b, min_count=10)
    # reference: the threshold rule applied to the unsuppressed table of the same call
    raw = full.counts.to_numpy()
    kinds = suppression_kinds(raw, 10)
    hidden = out.counts.isna().to_numpy()
    assert (hidden == (kinds != VISIBLE)).all() and hidden.any()
    assert np.isnan(out.pmi.to_numpy(dtype=float)[hidden]).all()
    assert np.isnan(out.expected.to_numpy(dtype=float)[hidden]).all()
    shown = out.counts.to_numpy(dtype=float, na_value=np.nan)
    assert (shown[~hidden] == raw[~hidden]).all()
    rows, cols = list(full.counts.index), list(full.counts.columns)
    small = {(rows[i], cols[j]) for i, j in zip(*np.nonzero((raw > 0) & (raw < 10)))}
    assert set(out.hidden["small"]) == small and out.hidden["min_count"] == 10
    assert set(out.hidden["complementary"]).isdisjoint(small)
    assert len(out.hidden["small"]) + len(out.hidden["complementary"]) == hidden.sum()
    assert out.mi == full.mi and out.n == full.n
    assert full.hidden is None and not full.counts.isna().any().any()  # the original is untouched
    assert quiet(frame.info_profile.pair, a, b, min_count=None).hidden is None


def test_accessor_min_count_bad_values_are_named():
    df = pd.DataFrame({"a": list("xy") * 10, "b": list("pq") * 10})
    with pytest.raises(TypeError, match="min_count"):
        df.info_profile.pair("a", "b", min_count=2.5)
    with pytest.raises(ValueError, match="min_count"):
        df.info_profile.pair("a", "b", min_count=-1)


def test_suppressed_pair_table_feeds_the_views_without_leaking(demo):
    from infoscope.views import serialize as rec
    from infoscope.views.serialize import pair_view

    frame, _ = demo
    out = quiet(frame.info_profile.pair, "weight_kg", "weight_lb", min_count=10)
    raw = quiet(frame.info_profile.pair, "weight_kg", "weight_lb").counts.to_numpy()
    records = rec.pair_records(out)  # no threshold given: the table's own applies
    assert records["min_count"] == 10 and "row_totals" not in records
    for cell in records["cells"]:
        i, j = out.counts.index.get_loc(cell["row"]), out.counts.columns.get_loc(cell["col"])
        if cell["hidden"]:
            assert cell["shown"] == ("<10" if 0 < raw[i, j] < 10 else "\u00b7")
    view = pair_view(out, "weight_kg", "weight_lb")
    assert view["hidden_cells"] == out.counts.isna().to_numpy().sum() and view["row_totals"] is None
    assert sum(r == "complement" for row in view["hidden_reasons"] for r in row) == len(out.hidden["complementary"])
