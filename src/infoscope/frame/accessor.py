"""``DataFrame.info_profile``: the pandas accessor (being built; see DEVELOPERS.md, contracts)."""
from __future__ import annotations

import pandas as pd


@pd.api.extensions.register_dataframe_accessor("info_profile")
class InfoProfileAccessor:
    """Information profile of a DataFrame (placeholder until the frame layer lands)."""

    def __init__(self, frame: pd.DataFrame):
        self._frame = frame
