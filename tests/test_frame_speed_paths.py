"""The session's pair cache: only touched pairs are re-estimated, results never change.

The live views call ``pairs()`` and ``matrix()`` after every control change; the
session keeps each pair's numbers with the two encoded columns and the estimator
settings they came from.  These tests check that the cache is invisible: after any
sequence of changes the tables equal those of a fresh session built with the final
settings (``pandas.testing.assert_frame_equal``), and the numbers still equal an
outside reference (``sklearn.metrics.mutual_info_score``).  The data are the
package's own benchmark generator (``infoscope.datasets.make_wide``).
"""
from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from sklearn.metrics import mutual_info_score

from infoscope.datasets import make_wide
from infoscope.frame.session import ProfileSession


@pytest.fixture(scope="module")
def wide():
    return make_wide(3_000, p=12, seed=3)


def _fresh(frame, settings, overrides):
    s = ProfileSession(frame, **settings)
    for name, bins in overrides.items():
        s.set_column_bins(name, bins)
    return s


def _assert_same(s, fresh):
    for measure in ("mi", "nmi", "adjusted_mi", "vi"):
        pd.testing.assert_frame_equal(s.pairs(measure), fresh.pairs(measure))
        pd.testing.assert_frame_equal(s.matrix(measure, order="cluster"),
                                      fresh.matrix(measure, order="cluster"))
        assert s.pairs(measure).attrs == fresh.pairs(measure).attrs
    pd.testing.assert_frame_equal(s.entropy(), fresh.entropy())
    for target in (s.names[1], s.names[4]):
        pd.testing.assert_frame_equal(s.relevance(target), fresh.relevance(target))


@pytest.mark.filterwarnings("ignore:column .* folded into:UserWarning")
@pytest.mark.filterwarnings("ignore:alpha=.* is not used:UserWarning")  # alpha kept while the estimator changes
@pytest.mark.parametrize("seed", [0, 1, 2])
def test_random_changes_give_the_tables_of_a_fresh_session(wide, seed):
    rng = np.random.default_rng(seed)
    settings = {"n_boot": 0}
    s = ProfileSession(wide, **settings)
    s.pairs(); s.matrix()
    numeric = s.numeric_keys()
    overrides: dict = {}
    choices = {
        "bins": [4, 8, 16, "sturges"], "estimator": ["plugin", "miller_madow", "chao_shen", "dirichlet"],
        "alpha": [None, 0.5, 1.0], "base": [2, "nats", 10], "measure": ["mi", "nmi", "vi"],
        "normalization": ["arithmetic", "max"], "missing": ["drop", "category"],
        "max_categories": [8, 64], "strategy": ["quantile", "uniform"],
        "n_boot": [0, 40], "ci": [0.9, 0.95], "seed": [0, 5],
    }
    for _ in range(12):
        if rng.random() < 0.35:
            name = str(rng.choice(numeric))
            bins = [None, 3, 6, "fd"][rng.integers(4)]
            s.set_column_bins(name, bins)
            if bins is None:
                overrides.pop(name, None)
            else:
                overrides[name] = bins
        else:
            key = str(rng.choice(list(choices)))
            value = choices[key][rng.integers(len(choices[key]))]
            s.update(**{key: value})
            settings[key] = value
        # what the widget calls after every control change
        s.entropy(); s.pairs(); s.matrix(); s.relevance(s.names[1])
    assert s.settings == {**s.settings, **settings}
    _assert_same(s, _fresh(wide, settings, overrides))


def test_only_pairs_touching_a_re_encoded_column_are_re_estimated(wide):
    s = ProfileSession(wide, n_boot=0)
    names = s.names
    s.pairs()
    assert len(s.last_estimated) == len(names) * (len(names) - 1) // 2
    s.matrix()
    assert s.last_estimated == ()          # matrix() reuses the table of the same settings
    s.pairs("nmi")
    assert s.last_estimated == ()          # another measure: the same pair numbers
    column = s.numeric_keys()[1]
    s.set_column_bins(column, 5)
    s.matrix()
    assert {frozenset(p) for p in s.last_estimated} == {
        frozenset((column, other)) for other in names if other != column}
    # no cached entry keeps a replaced encoding (and its codes) alive
    s.relevance(names[0]); s.entropy()
    s.set_column_bins(column, 7)
    current = {id(s.column(k)) for k in names}
    for cache in (s._pair_cache, s._relevance_cache, s._entropy_cache):
        assert cache and all(id(entry[0]) in current for entry in cache.values())
    s.matrix()
    s.update(base="nats")                  # numbers are kept in nats: nothing to re-estimate
    s.pairs()
    assert s.last_estimated == ()
    s.update(estimator="plugin")           # a new estimator: every pair
    s.pairs()
    assert len(s.last_estimated) == len(names) * (len(names) - 1) // 2
    # the cached numbers still equal an outside reference: plug-in MI of the codes
    # (sklearn.metrics.mutual_info_score, in nats) for a pair re-estimated and one not
    table = s.pairs().set_index(["a", "b"])
    for a, b in [(names[0], column), (names[0], names[2])]:
        a, b = (a, b) if names.index(a) < names.index(b) else (b, a)
        ca, cb = s.column(a), s.column(b)
        both = (ca.codes < ca.k) & (cb.codes < cb.k)
        ref = mutual_info_score(ca.codes[both], cb.codes[both])
        assert table.loc[(a, b), "mi"] == pytest.approx(ref, rel=1e-9, abs=1e-12)


def test_returned_tables_are_copies(wide):
    s = ProfileSession(wide.iloc[:, :4], n_boot=0)
    first = s.pairs()
    first.loc[0, "mi"] = -1.0
    first.attrs["unit"] = "changed"
    again = s.pairs()
    assert again.loc[0, "mi"] != -1.0 and again.attrs["unit"] == "bits"
    m = s.matrix()
    m.iloc[0, 1] = -1.0
    assert s.matrix().iloc[0, 1] != -1.0


def test_resampling_re_estimates(wide):
    s = ProfileSession(wide.iloc[:, :5], n_boot=0)
    s.pairs()
    s.update(sample=500, seed=1)
    pd.testing.assert_frame_equal(s.pairs(), ProfileSession(wide.iloc[:, :5], n_boot=0, sample=500,
                                                            seed=1).pairs())
    assert s.pairs().attrs["sampled"] == 500
    s.update(sample=None)
    pd.testing.assert_frame_equal(s.pairs(), ProfileSession(wide.iloc[:, :5], n_boot=0).pairs())


def test_n_rows_is_public(wide):
    s = ProfileSession(wide.iloc[:, :3], sample=100)
    assert s.n_rows == s._n_rows == len(wide)


def test_entropy_rows_are_cached_per_column_and_still_warn(wide):
    from infoscope._warnings import DataQualityWarning

    frame = wide.iloc[:, :4].copy()
    frame["gone"] = np.nan
    s = ProfileSession(frame, n_boot=40)
    with pytest.warns(DataQualityWarning, match="'gone' has no non-missing values"):
        first = s.entropy()
    with pytest.warns(DataQualityWarning, match="'gone' has no non-missing values"):
        again = s.entropy()  # from the cache: the same table and the same warning
    pd.testing.assert_frame_equal(first, again)
    column = s.numeric_keys()[0]
    s.set_column_bins(column, 3)
    with pytest.warns(DataQualityWarning, match="'gone'"):
        changed = s.entropy().set_index("column")
    assert changed.loc[column, "k"] == 3
    # the re-encoded column's entropy is that of its new codes: plug-in check against
    # scipy.stats.entropy of the bincount (estimator "plugin")
    import scipy.stats

    s.update(estimator="plugin")
    with pytest.warns(DataQualityWarning, match="'gone'"):
        plugin = s.entropy().set_index("column")
    codes = s.column(column).codes
    ref = scipy.stats.entropy(np.bincount(codes[codes < 3]), base=2)
    assert plugin.loc[column, "entropy"] == pytest.approx(ref, rel=1e-12)
