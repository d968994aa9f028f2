"""Small helpers shared by the benchmark scripts (timing, memory, machine notes)."""
from __future__ import annotations

import os
import time
import tracemalloc


def best_of(repeat: int, fn, *args, **kwargs):
    """(best wall time in seconds, last result) over ``repeat`` calls of ``fn``.

    The machine is shared: the best of a few runs is the least disturbed one.
    """
    best = float("inf")
    result = None
    for _ in range(repeat):
        start = time.perf_counter()
        result = fn(*args, **kwargs)
        best = min(best, time.perf_counter() - start)
    return best, result


def traced_peak(fn, *args, **kwargs):
    """(peak bytes allocated above the starting point while ``fn`` runs, result).

    tracemalloc sees numpy's buffers (numpy reports its allocations to it); memory
    allocated by numba's thread-local stacks is small and not traced.
    """
    tracemalloc.start()
    tracemalloc.reset_peak()
    base, _ = tracemalloc.get_traced_memory()
    try:
        result = fn(*args, **kwargs)
        _, peak = tracemalloc.get_traced_memory()
    finally:
        tracemalloc.stop()
    return peak - base, result


def machine_note() -> str:
    """Cores and load, printed with the figures so that a noisy run can be spotted."""
    try:
        cores = len(os.sched_getaffinity(0))
    except AttributeError:  # pragma: no cover - not Linux
        cores = os.cpu_count()
    try:
        load = ", ".join(f"{x:.2f}" for x in os.getloadavg())
    except OSError:  # pragma: no cover
        load = "unknown"
    return f"{cores} cores, load average {load}"


def interleaved_best(repeat: int, tasks: dict) -> tuple[dict, dict]:
    """Best wall time of each task over ``repeat`` rounds, the tasks taking turns.

    Each round runs every task once, so that a method and its baseline see the same
    spells of load from other processes on a shared machine; the ratio of their best
    times is then steadier than that of timings taken minutes apart.
    Returns ``({name: best seconds}, {name: last result})``.
    """
    best = {name: float("inf") for name in tasks}
    results = {}
    for _ in range(repeat):
        for name, fn in tasks.items():
            start = time.perf_counter()
            results[name] = fn()
            best[name] = min(best[name], time.perf_counter() - start)
    return best, results
