"""Samples to a mono WAV file: 16-bit PCM or 32-bit IEEE float.

The file is written here, with the standard library (a RIFF header and one data chunk): the
format is three small chunks, and writing it directly costs nothing to import (scipy.io
loads its whole package, about 30 ms; libsndfile adds a PEAK chunk to float files that
some readers warn about).

Layout (Microsoft RIFF WAVE, little-endian): ``RIFF`` size ``WAVE``; ``fmt `` with format
tag 1 (PCM, 16 bytes) or 3 (IEEE float, 18 bytes with an empty extension); for float a
``fact`` chunk holding the number of samples, as the format requires of non-PCM data;
then ``data``.
"""

from __future__ import annotations

import struct

import numpy as np

from ..errors import InputError

SAMPLE_FORMATS = ("int16", "float32")
_PCM, _IEEE_FLOAT = 1, 3


def wav_bytes(data: np.ndarray, rate: int) -> bytes:
    """A whole mono WAV file holding ``data`` (int16 or float32 samples) at ``rate`` Hz."""
    data = np.ascontiguousarray(data)
    if data.dtype == np.int16:
        tag, fmt_extra, fact = _PCM, b"", b""
    elif data.dtype == np.float32:
        tag, fmt_extra = _IEEE_FLOAT, struct.pack("<H", 0)
        fact = b"fact" + struct.pack("<II", 4, data.size)
    else:
        raise ValueError(f"WAV samples must be int16 or float32, not {data.dtype}")
    width = data.dtype.itemsize
    fmt = struct.pack("<HHIIHH", tag, 1, int(rate), int(rate) * width, width, 8 * width) + fmt_extra
    payload = data.astype(data.dtype.newbyteorder("<"), copy=False).tobytes()
    body = (b"WAVE" + b"fmt " + struct.pack("<I", len(fmt)) + fmt + fact
            + b"data" + struct.pack("<I", len(payload)) + payload)
    if len(body) + 8 > 0xFFFFFFFF:
        raise InputError("wav length", data.size, "too long for a WAV file (4 GB at most)")
    return b"RIFF" + struct.pack("<I", len(body)) + body


def save_wav(path, samples: np.ndarray, *, rate: int, sample_format: str = "int16") -> None:
    """Write samples in [-1, 1] to a mono WAV file: 16-bit PCM or 32-bit float.

    int16 samples are ``round(32767 x)`` after clipping to [-1, 1] (full scale 32767, so +1
    and -1 are symmetric); float32 samples are written as they are. Writes ``path``
    directly; callers wanting all-or-nothing writing pass a temporary path (see
    membrane.cli.files.write_atomic).

    Parameters
    ----------
    path : path-like
        File to write.
    samples : numpy.ndarray
        Samples, 1-D, nominally in [-1, 1].
    rate : int
        Sample rate in Hz.
    sample_format : {"int16", "float32"}
        Sample type in the file.
    """
    if sample_format == "int16":
        data = np.round(np.clip(samples, -1, 1) * 32767).astype(np.int16)
    elif sample_format == "float32":
        data = np.asarray(samples, dtype=np.float32)
    else:
        raise InputError("wav format", sample_format, f"must be one of {', '.join(SAMPLE_FORMATS)}")
    blob = wav_bytes(np.ravel(data), rate)
    with open(path, "wb") as f:
        f.write(blob)
