"""Whether the kernel may run its parallel algorithms in this process.

The kernel keeps one pool of worker threads per process, made on first use.  A process forked after its parent
used that pool inherits the pool's bookkeeping but none of its threads, and a parallel call then waits forever
for them.  diegen's own build workers are fresh processes, and its forked analysis refuses to fork once the kernel
is loaded, but a program (or a test run) that builds a die in-process and then forks would hang.  So parallel
calls are made only in the process that first used the kernel, or in a process forked before any kernel call;
anywhere else the same algorithms run on one thread (same results, slower).
"""

from __future__ import annotations

import os

_FIRST_USER: int | None = None  # pid of the process whose kernel thread pool exists


def parallel_ok() -> bool:
    """True when this process may run the kernel's parallel algorithms (see the module docstring)."""
    global _FIRST_USER  # noqa: PLW0603 - one value per process, set on first use of the kernel
    if _FIRST_USER is None:
        _FIRST_USER = os.getpid()
    return _FIRST_USER == os.getpid()


__all__ = ["parallel_ok"]
