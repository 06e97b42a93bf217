"""Writers and readers at the edge of the program: they format what the pipeline produced.

Every writer renders bytes; :func:`write_outputs` puts a whole set on disk atomically.
"""

from detailer.io.atomic import OutputError, write_output, write_outputs

__all__ = ["OutputError", "write_output", "write_outputs"]
