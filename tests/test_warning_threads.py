"""Background threads leave process-wide state alone: warnings of a worker thread stay in
that thread (the widget recomputes in one), and compiling kernels on a loader thread does
not swap the standard streams."""
import os
import subprocess
import sys
import threading
import warnings

import pytest

from infoscope._warnings import DataQualityWarning, collect_warnings, warn_user


def test_a_collecting_thread_leaves_the_main_threads_warnings_alone():
    # warnings.catch_warnings in a worker swaps process-wide state: while it is open,
    # a warning of the main thread can vanish into the worker's list (Python docs,
    # "warnings.catch_warnings ... is not thread-safe"). collect_warnings must not.
    started, stop = threading.Event(), threading.Event()
    gathered = []

    def worker():
        with collect_warnings() as caught:
            started.set()
            while not stop.is_set():
                warn_user("column 'w': worker", DataQualityWarning)
                stop.wait(0.001)
        gathered.extend(caught)

    t = threading.Thread(target=worker)
    t.start()
    started.wait(5)
    try:
        for i in range(50):
            with pytest.warns(DataQualityWarning, match=rf"column 'm': main {i}") as record:
                warn_user(f"column 'm': main {i}", DataQualityWarning)
            assert all("worker" not in str(w.message) for w in record)
    finally:
        stop.set()
        t.join(5)
    assert gathered and all(str(w.message) == "column 'w': worker" for w in gathered)
    assert all(w.category is DataQualityWarning for w in gathered)


def test_collecting_touches_no_global_warning_state():
    filters, show = list(warnings.filters), warnings.showwarning
    with collect_warnings() as caught:
        assert warnings.filters == filters and warnings.showwarning is show
        warn_user("column 'a': note")
    assert [str(w.message) for w in caught] == ["column 'a': note"]
    assert warnings.filters == filters


def test_nested_collection_gives_back_the_outer_list():
    with collect_warnings() as outer:
        with collect_warnings() as inner:
            warn_user("column 'a': inner")
        warn_user("column 'a': outer")
    assert [str(w.message) for w in inner] == ["column 'a': inner"]
    assert [str(w.message) for w in outer] == ["column 'a': outer"]


def test_only_the_main_thread_entry_points_swap_the_warnings_module_state():
    # Code that can run in the widget's worker or in the encoder's threads must not use
    # warnings.catch_warnings (process-wide filters: a test's pytest.warns lost its
    # "always" filter when a worker's context closed, and the warning raised instead).
    # Only the command line and its CSV reader, which run in the main thread, may.
    import pathlib

    import infoscope

    root = pathlib.Path(infoscope.__file__).parent
    allowed = {"cli.py", "reading.py", "frame/drift_over.py", "_warnings.py"}
    found = sorted(str(p.relative_to(root)) for p in root.rglob("*.py")
                   if "catch_warnings(" in p.read_text(encoding="utf-8")
                   and str(p.relative_to(root)) not in allowed)
    assert found == []


def test_compiling_kernels_on_a_thread_leaves_the_standard_streams_alone():
    # numba formats its typing messages with colorama while it compiles; colorama's
    # init()/deinit() replace sys.stdout/sys.stderr process-wide (colorama
    # initialise.py), so a stream the main thread put in place (a doctest's, a
    # notebook cell's capture) was swapped back under it.  infoscope._numba turns the
    # colouring off before numba's first import (NUMBA_DISABLE_ERROR_MESSAGE_HIGHLIGHTING,
    # numba's environment variable).  A fresh interpreter, so numba is imported here first.
    code = """
import io, sys, threading
out, err = io.StringIO(), io.StringIO()
sys.stdout, sys.stderr = out, err
from infoscope.encode import order_stats
from infoscope.engine import counting
def load():
    counting._load_numba_kernels()
    order_stats.kernels(wait=True)
t = threading.Thread(target=load)
t.start()
changed = False
while t.is_alive():
    changed = changed or sys.stdout is not out or sys.stderr is not err
    t.join(0.0005)
changed = changed or sys.stdout is not out or sys.stderr is not err
from numba.core import errors
scheme = type(errors.termcolor()).__name__
sys.stdout, sys.stderr = sys.__stdout__, sys.__stderr__
print(changed, scheme)
"""
    env = {k: v for k, v in os.environ.items() if k != "NUMBA_DISABLE_ERROR_MESSAGE_HIGHLIGHTING"}
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, env=env, timeout=600)
    assert done.returncode == 0, done.stderr
    assert done.stdout.split() == ["False", "NOPColorScheme"]
