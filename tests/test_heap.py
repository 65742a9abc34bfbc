"""The command line's allocator setting (membrane/heap.py)."""

import platform

import pytest


@pytest.mark.skipif(platform.system() != "Linux" or platform.libc_ver()[0] != "glibc",
                    reason="mallopt is glibc's")
def test_the_allocator_takes_the_thresholds():
    from membrane.heap import keep_freed_memory

    assert keep_freed_memory() is True
