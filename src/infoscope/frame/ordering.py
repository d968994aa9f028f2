"""Orders of the columns of a square pair table (``ProfileSession.matrix(order=...)``)."""
from __future__ import annotations

import numpy as np
from scipy.cluster.hierarchy import leaves_list, linkage
from scipy.spatial.distance import squareform


def _cluster_order(nmi: np.ndarray) -> list[int]:
    """Leaf order of average linkage on 1 - NMI with optimal leaf ordering (scipy)."""
    distance = 1.0 - np.clip(np.nan_to_num(nmi, nan=0.0), 0.0, 1.0)
    distance = (distance + distance.T) / 2.0
    np.fill_diagonal(distance, 0.0)
    tree = linkage(squareform(distance, checks=False), method="average", optimal_ordering=True)
    return leaves_list(tree).tolist()
