"""Print the CPU feature groups NumPy dispatches to at run time on this machine.

`.ci/run` passes them to ``NPY_DISABLE_CPU_FEATURES`` for a second test pass, so that NumPy
falls back to its baseline (compile-time) SIMD kernels: exp, log, power and sin then round
along another code path, as they would on a processor without these features. Prints nothing
when NumPy dispatches to nothing beyond its baseline here.
"""

from __future__ import annotations

try:  # NumPy >= 2
    from numpy._core import _multiarray_umath as umath
except ImportError:  # NumPy 1.26
    from numpy.core import _multiarray_umath as umath  # type: ignore[no-redef]

found = umath.__cpu_features__
print(" ".join(name for name in umath.__cpu_dispatch__ if found.get(name, False)))
