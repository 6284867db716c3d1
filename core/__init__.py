"""Counterdraft's engine: reads agreements, compares a draft with the house precedent,
ranks the deviations and writes tracked changes.  It never imports Qt."""

__version__ = "0.1.0"

CAUTION = (
    "Counterdraft supports, and never replaces, review by a qualified lawyer. "
    "Its output is not legal advice; local rules and professional obligations prevail."
)

__all__ = ["CAUTION", "__version__"]
