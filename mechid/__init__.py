"""mechid: identify the conduction mechanism of thin films and junctions from I-V-T data.

Data flows one way: read and validate (:mod:`mechid.data`) -> screen
(:mod:`mechid.screening`) -> fit and compare (:mod:`mechid.inference`) -> report
(:mod:`mechid.report`). Every conduction mechanism is declared once in
:mod:`mechid.catalogue`.
"""

import logging

__version__ = "0.1.0"

logging.getLogger(__name__).addHandler(logging.NullHandler())
