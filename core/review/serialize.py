"""The ``counterdraft.review/1`` JSON object of a :class:`~core.model.Review`.

The model's JSON, both ways, lives in :mod:`core.serialize` (with the object's shape and its
schema); this module keeps the names the review engine has always offered.
"""

from __future__ import annotations

from ..serialize import (
    REVIEW_SCHEMA_ID,
    check_to_dict,
    frequency_to_dict,
    review_from_dict,
    review_to_dict,
)

__all__ = ["REVIEW_SCHEMA_ID", "check_to_dict", "frequency_to_dict", "review_from_dict",
           "review_to_dict"]
