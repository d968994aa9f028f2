"""infoscope.engine: joint count tables of every column pair, cached and incremental.

``PairEngine`` holds encoded columns and their pair tables; ``count_chunk`` /
``merge`` / ``finalize`` are the additive layer other back-ends build on. numba is
imported only when the compiled kernel first counts.
"""
from infoscope.engine.counting import count_chunk, finalize, merge
from infoscope.engine.engine import PairEngine
from infoscope.engine.sampling import sample_rows

__all__ = ["PairEngine", "count_chunk", "merge", "finalize", "sample_rows"]
