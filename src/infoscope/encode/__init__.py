"""infoscope.encode: columns -> small integer codes (binning, categories, missing policy, cache).

The contract every later layer reads is :class:`~infoscope.encode.columns.EncodedColumn`
(see DEVELOPERS.md).
"""
from infoscope.encode.binning import BIN_RULES, NUMPY_RULES, bin_edges, knuth_bin_count, knuth_log_posterior
from infoscope.encode.cache import EncodingCache, clear_cache, content_key, default_cache
from infoscope.encode.columns import (
    FLAGS,
    KINDS,
    MISSING_LABEL,
    OTHER_LABEL,
    EncodedColumn,
    codes_dtype,
    column_keys,
    encode_column,
    encode_columns,
    encode_frame,
)

__all__ = [
    "BIN_RULES", "NUMPY_RULES", "bin_edges", "knuth_bin_count", "knuth_log_posterior",
    "EncodingCache", "clear_cache", "content_key", "default_cache",
    "FLAGS", "KINDS", "MISSING_LABEL", "OTHER_LABEL", "EncodedColumn", "codes_dtype",
    "column_keys", "encode_column", "encode_columns", "encode_frame",
]
