"""One module per manufacturability check, each registered with
:func:`soft_molds.analysis.registry.check`; the registry imports every module here on first
use. Modules whose names start with ``_`` are helpers and are not imported by the registry.
"""
