"""Samples out of a SoundFont 2 file (the RIFF 'sfbk' form), for tests that use an installed one.

A SoundFont 2 file holds every sample's 16-bit data in one 'smpl' chunk and a 46-byte header
per sample in 'shdr' (name, start, end, loop points, rate, ...): SoundFont 2.04 Technical
Specification, sections 6.2 and 7.10. Only what the tests need is read.
"""

from __future__ import annotations

import struct
from pathlib import Path

import numpy as np


def _chunks(data: bytes, start: int, stop: int):
    while start + 8 <= stop:
        kind, size = struct.unpack("<4sI", data[start:start + 8])
        yield kind, start + 8, size
        start += 8 + size + (size & 1)


def sample(path: Path, name: str) -> tuple[np.ndarray, int]:
    """The sample called ``name`` (full scale = 1) and its rate [Hz]."""
    data = Path(path).read_bytes()
    if data[:4] != b"RIFF" or data[8:12] != b"sfbk":
        raise ValueError(f"{path}: not a SoundFont 2 file")
    smpl = shdr = None
    for kind, at, size in _chunks(data, 12, len(data)):
        if kind == b"LIST":
            for sub, at2, size2 in _chunks(data, at + 4, at + size):
                if sub == b"smpl":
                    smpl = (at2, size2)
                elif sub == b"shdr":
                    shdr = (at2, size2)
    for k in range(shdr[1] // 46):
        rec = data[shdr[0] + 46 * k: shdr[0] + 46 * (k + 1)]
        if rec[:20].split(b"\0")[0].decode("latin-1") == name:
            start, end, _, _, rate = struct.unpack("<5I", rec[20:40])
            pcm = np.frombuffer(data, dtype="<i2", count=end - start, offset=smpl[0] + 2 * start)
            return pcm.astype(float) / 32768.0, rate
    raise KeyError(name)
