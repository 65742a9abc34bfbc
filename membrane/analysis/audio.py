"""Reading a recording: WAV, FLAC, OGG or MP3 through libsndfile, as one channel of floats.

The samples are decoded by :mod:`soundfile` (libsndfile, shipped in its wheel). A WAV file's
RIFF header is checked against the file's size first, so a corrupt or lying header is refused
in one line instead of reaching the decoder (a header that declares gigabytes of samples in a
file of kilobytes, a zero channel count or block size, a RIFF size too small to hold a format
chunk).
"""

from __future__ import annotations

import struct
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from membrane.errors import InputError, RecordingError

FORMATS = "WAV, FLAC, OGG or MP3"
_MAGIC = {b"RIFF": "WAV", b"RIFX": "WAV", b"RF64": "WAV", b"fLaC": "FLAC", b"OggS": "OGG",
          b"FORM": "AIFF", b"ID3": "MP3"}
MAX_CHANNELS = 64  # more than any recorder writes; a larger count is a corrupt header
MAX_RATE_HZ = 768_000.0


@dataclass(frozen=True)
class Recording:
    """A recording as one channel of floats.

    Attributes
    ----------
    samples : numpy.ndarray
        Samples, full scale = 1 (float64, 1-D).
    rate : float
        Sample rate [Hz].
    channels : int
        Channels in the file.
    encoding : str
        How the file stored its samples, e.g. ``"PCM 24-bit"`` or ``"FLAC PCM 16-bit"``.
    clipped : int
        Samples found at the rails of the file's format (0 for an unclipped recording).
    """

    samples: np.ndarray
    rate: float
    channels: int
    encoding: str
    clipped: int = 0

    @property
    def duration(self) -> float:
        """Length of the recording [s]."""
        return self.samples.size / self.rate


_SUBTYPES = {"PCM_S8": ("PCM 8-bit", 8), "PCM_U8": ("PCM 8-bit", 8), "PCM_16": ("PCM 16-bit", 16),
             "PCM_24": ("PCM 24-bit", 24), "PCM_32": ("PCM 32-bit", 32),
             "FLOAT": ("float 32-bit", None), "DOUBLE": ("float 64-bit", None)}


def read_recording(path: str | Path, *, channel: int | None = None) -> Recording:
    """Read a recording (WAV PCM 8/16/24/32-bit or float; FLAC; OGG Vorbis/Opus; MP3).

    Parameters
    ----------
    path : str or Path
        The file.
    channel : int or None
        Channel to use, counting from 0; None mixes all channels (their mean).

    Returns
    -------
    Recording

    Raises
    ------
    RecordingError
        If the file is missing, empty, not a recording, corrupt, truncated, or holds no samples.
    InputError
        If ``channel`` is not one of the file's channels.
    """
    path = Path(path)
    if not path.is_file():
        raise RecordingError(f"{path}: no such file" if not path.exists() else
                             f"{path}: not a regular file; expected a recording ({FORMATS})")
    size = path.stat().st_size
    if size == 0:
        raise RecordingError(f"{path}: empty file (0 bytes); expected a recording ({FORMATS})")
    with open(path, "rb") as fh:
        head = fh.read(12)
    kind = _MAGIC.get(head[:4]) or _MAGIC.get(head[:3])
    if kind is None and not _looks_like_mp3(head):
        what = "a WAV file (no RIFF/WAVE header)" if path.suffix.lower() == ".wav" else \
            "a recording this program reads"
        raise RecordingError(f"{path}: not {what}; export the recording as {FORMATS}")
    if kind == "WAV":
        check_wav_header(path, size)
    import soundfile  # imported here: the command line's --help must stay fast

    try:
        info = soundfile.info(str(path))
        frames = info.frames
        if info.channels < 1 or info.samplerate <= 0:
            raise RecordingError(f"{path}: the header says {info.channels} channels at "
                                 f"{info.samplerate} Hz; expected at least one channel and a "
                                 "positive sample rate")
        if frames <= 0:
            raise RecordingError(f"{path}: the file holds no samples (truncated?)")
        data, rate = soundfile.read(str(path), dtype="float64", always_2d=True)
    except RecordingError:
        raise
    except (RuntimeError, ValueError, TypeError, OSError, EOFError, MemoryError,
            struct.error) as exc:
        detail = " ".join(str(exc).split())[:160]
        raise RecordingError(f"{path}: unreadable {kind or 'MP3'} file ({detail}); "
                             f"expected a recording ({FORMATS})") from None
    if data.shape[0] == 0:
        raise RecordingError(f"{path}: the file holds no samples (truncated?)")
    channels = data.shape[1]
    if channel is not None and not 0 <= channel < channels:
        raise InputError("channel", channel + 1,
                         f"a channel of this {channels}-channel file: 1 to {channels}, or mix")
    picked = data if channel is None else data[:, channel:channel + 1]
    label, bits = _SUBTYPES.get(info.subtype, (info.subtype_info or info.subtype, None))
    if info.format not in ("WAV", "WAVEX", "RF64"):
        container = {"FLAC": "FLAC", "OGG": "Ogg", "MP3": "MP3"}.get(info.format, info.format)
        label = container if info.subtype.startswith("MPEG") else f"{container} {label}"
    # the rails: the largest code of an integer format, or +-1 for float and lossy formats
    rail = 1.0 - 2.0 ** (1 - bits) if bits else 1.0
    clipped = int(np.count_nonzero((picked >= rail) | (picked <= -1.0)))
    return Recording(samples=np.ascontiguousarray(picked.mean(axis=1)), rate=float(rate),
                     channels=channels, encoding=label, clipped=clipped)


def _looks_like_mp3(head: bytes) -> bool:
    """An MPEG audio frame sync (11 set bits) at the start of the file."""
    return len(head) >= 2 and head[0] == 0xFF and head[1] & 0xE0 == 0xE0


def check_wav_header(path: Path, size: int) -> None:
    """Refuse a RIFF/WAVE header that does not fit the file.

    Walks the chunks without reading the samples: the RIFF size must cover at least the
    ``WAVE`` tag and a format chunk and may not claim more than the file holds; the ``fmt``
    chunk must give 1 to :data:`MAX_CHANNELS` channels, a positive rate, a non-zero block
    size; the ``data`` chunk may not run past the end of the file.

    Raises
    ------
    RecordingError
        Naming the bad field and what a WAV file holds there.
    """
    with open(path, "rb") as fh:
        head = fh.read(12)
        if len(head) < 12 or head[8:12] != b"WAVE":
            raise RecordingError(f"{path}: not a WAV file (no RIFF/WAVE header, {size} bytes); "
                                 f"export the recording as {FORMATS}")
        little = head[:4] != b"RIFX"
        u32, u16 = ("<I", "<H") if little else (">I", ">H")
        riff = struct.unpack(u32, head[4:8])[0]
        rf64 = head[:4] == b"RF64"
        if not rf64:
            if riff < 4 + 8 + 16:
                raise RecordingError(f"{path}: corrupt WAV header: RIFF size {riff} bytes cannot "
                                     "hold a format chunk (at least 28)")
            if riff > size - 8:
                raise RecordingError(f"{path}: truncated or corrupt WAV file: the header declares "
                                     f"{riff + 8} bytes, the file has {size}")
        end = size if rf64 else min(size, riff + 8)
        pos, fmt, data = 12, None, None
        while pos + 8 <= end:
            fh.seek(pos)
            cid = fh.read(4)
            length = struct.unpack(u32, fh.read(4))[0]
            if cid == b"fmt ":
                if length < 16 or pos + 8 + 16 > size:
                    raise RecordingError(f"{path}: corrupt WAV header: format chunk of {length} "
                                         "bytes (at least 16)")
                tag, channels, rate, _, align, bits = struct.unpack(
                    u16[0] + "HHIIHH", fh.read(16))
                if not 1 <= channels <= MAX_CHANNELS:
                    raise RecordingError(f"{path}: corrupt WAV header: {channels} channels "
                                         f"(1 to {MAX_CHANNELS})")
                if not 0 < rate <= MAX_RATE_HZ:
                    raise RecordingError(f"{path}: corrupt WAV header: sample rate {rate} Hz "
                                         f"(1 to {MAX_RATE_HZ:.0f})")
                if align == 0:
                    raise RecordingError(f"{path}: corrupt WAV header: block align 0 bytes "
                                         "(bytes per frame, at least 1)")
                fmt = (tag, channels, rate, align, bits)
            elif cid == b"data":
                data = (pos + 8, length)
                if fmt is None:
                    raise RecordingError(f"{path}: corrupt WAV header: the data chunk comes "
                                         "before the format chunk")
                if not (rf64 and length == 0xFFFFFFFF) and pos + 8 + length > size:
                    raise RecordingError(
                        f"{path}: truncated or corrupt WAV file: the data chunk declares "
                        f"{length} bytes, only {size - pos - 8} follow in the file")
                break
            pos += 8 + length + (length & 1)
        if fmt is None:
            raise RecordingError(f"{path}: corrupt WAV header: no format chunk")
        if data is None:
            raise RecordingError(f"{path}: the WAV file has no data chunk (truncated?)")
        if data[1] == 0:
            raise RecordingError(f"{path}: the WAV file holds no samples (truncated?)")
