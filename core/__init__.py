"""Counterdraft's engine: reads agreements, compares a draft with the house precedent,
ranks the deviations and writes tracked changes.  It never imports Qt."""

from .kept import keep_dataclass_methods
from .parallel import one_blas_thread

__version__ = "0.1.0"

CAUTION = (
    "Counterdraft supports, and never replaces, review by a qualified lawyer. "
    "Its output is not legal advice; local rules and professional obligations prevail."
)

__all__ = ["CAUTION", "__version__"]

keep_dataclass_methods()  # compiled once per installation, not at every start (core.kept)
one_blas_thread()  # this program shares out the processor cores itself (core.parallel)
