"""backend.bound_heap: large blocks stay in their own mappings after a larger one was freed."""

from __future__ import annotations

import ctypes
import platform
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]

glibc = pytest.mark.skipif(platform.system() != "Linux" or platform.libc_ver()[0] != "glibc",
                           reason="the heap bound is for glibc only")

# In a fresh process: free a 24 MB block (glibc then raises its mmap threshold to 24 MB), then
# allocate 8 MB and report whether it got its own mapping (mallinfo2's hblks went up).
PROBE = """
import ctypes, sys
class Info(ctypes.Structure):
    _fields_ = [(n, ctypes.c_size_t) for n in ("arena ordblks smblks hblks hblkhd usmblks "
                                               "fsmblks uordblks fordblks keepcost").split()]
libc = ctypes.CDLL("libc.so.6")
libc.mallinfo2.restype = Info
if sys.argv[1] == "bound":
    from minutes.asr.backend import bound_heap
    assert bound_heap()
big = bytearray(24 * 1024 * 1024)
del big
before = libc.mallinfo2().hblks
block = bytearray(8 * 1024 * 1024)
print(libc.mallinfo2().hblks - before)
"""


def _mapped(mode: str) -> int:
    out = subprocess.run([sys.executable, "-c", PROBE, mode], check=True, capture_output=True,
                         text=True, env={"PYTHONPATH": str(ROOT)})
    return int(out.stdout.strip())


@glibc
def test_bound_heap_maps_large_blocks_that_glibc_would_put_on_the_heap() -> None:
    if not hasattr(ctypes.CDLL("libc.so.6"), "mallinfo2"):
        pytest.skip("mallinfo2 needs glibc 2.33 or later")
    assert _mapped("default") == 0  # glibc's own policy: the 8 MB block comes from the heap
    assert _mapped("bound") == 1


def test_bound_heap_leaves_a_threshold_the_user_set(monkeypatch: pytest.MonkeyPatch) -> None:
    from minutes.asr import backend

    monkeypatch.setenv("MALLOC_MMAP_THRESHOLD_", "1048576")
    backend.bound_heap.cache_clear()
    try:
        assert backend.bound_heap() is False
    finally:
        backend.bound_heap.cache_clear()
