"""Image files for underlays: which kind a file is and its size in pixels, read from its header.

Only the header is read (no pixels, no Qt): the Qt layer decodes the pixels. The byte layouts
are those of the published formats: PNG (W3C PNG specification, 5.2 signature and 11.2.2 IHDR),
JPEG (ITU-T T.81, Annex B: markers, Table B.1, and the frame header of B.2.2) and TIFF (TIFF
Revision 6.0, section 2: header and image file directory; tags 256 ImageWidth and 257
ImageLength).
"""

from __future__ import annotations

import struct
from dataclasses import dataclass
from pathlib import Path
from typing import BinaryIO

from app.model.underlays import UnderlayFileError

IMAGE_SUFFIXES = (".png", ".jpg", ".jpeg", ".tif", ".tiff")
PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"
JPEG_SOI = b"\xff\xd8"
TIFF_HEADERS = {b"II*\x00": "<", b"MM\x00*": ">"}
BIGTIFF_HEADERS = (b"II+\x00", b"MM\x00+")
# JPEG start-of-frame markers: C0..CF except C4 (DHT), C8 (reserved), CC (DAC) (T.81 Table B.1).
JPEG_SOF_MARKERS = frozenset(range(0xC0, 0xD0)) - {0xC4, 0xC8, 0xCC}
JPEG_STANDALONE_MARKERS = frozenset({0x01, *range(0xD0, 0xD8)})  # TEM and RSTn carry no length
TIFF_WIDTH_TAG, TIFF_HEIGHT_TAG = 256, 257
TIFF_SHORT, TIFF_LONG = 3, 4
MAX_JPEG_SEGMENTS = 10_000  # a real file reaches its frame header after a few dozen


@dataclass(frozen=True, slots=True)
class ImageInfo:
    format: str  # "PNG", "JPEG" or "TIFF"
    width_px: int
    height_px: int


def probe_image(path: Path | str) -> ImageInfo:
    """The format and pixel size of the image at ``path``.

    Raises :class:`UnderlayFileError` when the file is missing, unreadable, or not a PNG,
    JPEG or TIFF image.
    """
    path = Path(path)
    try:
        with open(path, "rb") as stream:
            info = _probe(stream)
    except OSError as error:
        raise UnderlayFileError(f"{path}: cannot read the image ({error.strerror or error})") from error
    except (struct.error, ValueError) as error:
        raise UnderlayFileError(f"{path}: the image header is damaged ({error})") from error
    if info is None:
        raise UnderlayFileError(f"{path}: not a PNG, JPEG or TIFF image")
    if info.width_px <= 0 or info.height_px <= 0:
        raise UnderlayFileError(f"{path}: the {info.format} header gives a size of "
                                f"{info.width_px} x {info.height_px} pixels")
    return info


def _probe(stream: BinaryIO) -> ImageInfo | None:
    head = stream.read(8)
    if head.startswith(PNG_SIGNATURE):
        return _png(stream)
    if head.startswith(JPEG_SOI):
        stream.seek(2)
        return _jpeg(stream)
    if head[:4] in TIFF_HEADERS:
        return _tiff(stream, TIFF_HEADERS[head[:4]], head)
    if head[:4] in BIGTIFF_HEADERS:
        raise ValueError("BigTIFF images (over 4 GB) are not supported; save it as a plain TIFF")
    return None


def _read(stream: BinaryIO, count: int) -> bytes:
    data = stream.read(count)
    if len(data) != count:
        raise ValueError("the file ends inside its header")
    return data


def _png(stream: BinaryIO) -> ImageInfo:
    # The first chunk must be IHDR: length (4), type (4), width (4), height (4), big-endian.
    _length, kind, width, height = struct.unpack(">I4sII", _read(stream, 16))
    if kind != b"IHDR":
        raise ValueError("the first PNG chunk is not IHDR")
    return ImageInfo("PNG", width, height)


def _jpeg(stream: BinaryIO) -> ImageInfo | None:
    for _ in range(MAX_JPEG_SEGMENTS):
        byte = _read(stream, 1)
        if byte != b"\xff":
            raise ValueError("a JPEG marker was expected")
        marker = _read(stream, 1)[0]
        while marker == 0xFF:  # fill bytes may precede a marker
            marker = _read(stream, 1)[0]
        if marker in JPEG_STANDALONE_MARKERS:
            continue
        if marker == 0xD9:
            return None  # end of image before any frame header
        (length,) = struct.unpack(">H", _read(stream, 2))
        if marker in JPEG_SOF_MARKERS:
            _precision, height, width = struct.unpack(">BHH", _read(stream, 5))
            return ImageInfo("JPEG", width, height)
        if length < 2:
            raise ValueError("a JPEG segment has a length below 2")
        stream.seek(length - 2, 1)
    raise ValueError("no JPEG frame header within the first segments")


def _tiff(stream: BinaryIO, order: str, head: bytes) -> ImageInfo:
    (offset,) = struct.unpack(order + "I", head[4:8])
    stream.seek(offset)
    (count,) = struct.unpack(order + "H", _read(stream, 2))
    size: dict[int, int] = {}
    for _ in range(count):
        tag, kind, _values, raw = struct.unpack(order + "HHI4s", _read(stream, 12))
        if tag in (TIFF_WIDTH_TAG, TIFF_HEIGHT_TAG):
            if kind == TIFF_SHORT:
                size[tag] = struct.unpack(order + "H", raw[:2])[0]
            elif kind == TIFF_LONG:
                size[tag] = struct.unpack(order + "I", raw)[0]
            else:
                raise ValueError(f"TIFF tag {tag} has type {kind}, not SHORT or LONG")
    if len(size) != 2:
        raise ValueError("the TIFF directory lacks ImageWidth or ImageLength")
    return ImageInfo("TIFF", size[TIFF_WIDTH_TAG], size[TIFF_HEIGHT_TAG])
