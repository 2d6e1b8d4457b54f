"""World files (app/fileio/world_file.py) and image headers (app/fileio/raster_image.py).

Sources of the check values: the world-file layout (six lines A, D, B, E, C, F; C and F the centre
of the upper-left pixel) is GDAL's "WLD -- ESRI World File" driver page; the sidecar names
(.pgw/.pngw, .jgw/.jpgw, .tfw/.tifw, .wld) are the same page's and common practice; header bytes
follow the PNG specification (W3C, 5.2 signature, 11.2.2 IHDR), ITU-T T.81 (JPEG, Annex B) and
TIFF Revision 6.0 (section 2, tags 256 and 257). 1 ft = 0.3048 m exactly (identity,
geometry/units.py).
"""

import math
import struct
import zlib
from pathlib import Path

import pytest

from app.fileio.raster_image import ImageInfo, probe_image
from app.fileio.world_file import (
    find_world_file,
    parse_world_file,
    placement_for_image,
    placement_from_terms,
    read_world_file,
    world_file_candidates,
    world_file_text,
)
from app.model.underlays import Placement, UnderlayFileError

NORTH_UP = "0.5\n0.0\n0.0\n-0.5\n100.25\n200.75\n"  # fictional half-metre image


# --- world files -------------------------------------------------------------------------------------

@pytest.mark.parametrize(("image", "expected"), [
    ("a.png", ("a.pgw", "a.pngw", "a.wld")),   # GDAL WLD page; first+last letter + "w" (common practice)
    ("a.jpg", ("a.jgw", "a.jpgw", "a.wld")),
    ("a.jpeg", ("a.jgw", "a.jpegw", "a.wld")),
    ("a.tif", ("a.tfw", "a.tifw", "a.wld")),
    ("a.TIFF", ("a.tfw", "a.tiffw", "a.wld")),
])
def test_sidecar_names(image: str, expected: tuple[str, ...]) -> None:
    assert tuple(p.name for p in world_file_candidates(Path("/x") / image)) == expected


def test_world_file_is_found_whatever_the_case_of_its_suffix(tmp_path: Path) -> None:
    (tmp_path / "field.png").write_bytes(b"")
    assert find_world_file(tmp_path / "field.png") is None
    (tmp_path / "field.PGW").write_text(NORTH_UP)
    assert find_world_file(tmp_path / "field.png") == tmp_path / "field.PGW"


def test_the_more_specific_sidecar_wins(tmp_path: Path) -> None:
    (tmp_path / "field.wld").write_text(NORTH_UP)
    (tmp_path / "field.pgw").write_text(NORTH_UP)
    assert find_world_file(tmp_path / "field.png") == tmp_path / "field.pgw"


def test_parse_reads_six_terms_in_file_order() -> None:
    # GDAL WLD page: A, D, B, E, C, F; blank lines and surrounding spaces ignored (common practice).
    text = "\n 0.5\n0.1\n\n0.2\n-0.5 \n100.25\n200.75\n\n"
    assert parse_world_file(text) == (0.5, 0.1, 0.2, -0.5, 100.25, 200.75)


@pytest.mark.parametrize(("text", "words"), [
    ("1\n0\n0\n-1\n5\n", "5 number(s) found"),
    ("1\n0\n0\n-1\n5\n6\n7\n", "line 7: more than six"),
    ("1\n0\nabc\n-1\n5\n6\n", "line 3: 'abc' is not a number (expected B (rotation term))"),
    ("1\n0\n0\nnan\n5\n6\n", "line 4: E (pixel size in y) is not finite"),
])
def test_a_malformed_world_file_says_where(text: str, words: str) -> None:
    with pytest.raises(UnderlayFileError, match=words.replace("(", r"\(").replace(")", r"\)")):
        parse_world_file(text)


def test_a_world_file_with_zero_pixel_size_cannot_place_the_image() -> None:
    with pytest.raises(UnderlayFileError, match="zero pixel size"):
        placement_from_terms((0.0, 0.0, 0.0, -1.0, 5.0, 6.0), "m")


def test_terms_in_feet_become_metres() -> None:
    placement = placement_from_terms((1.0, 0.0, 0.0, -1.0, 1000.0, 2000.0), "ft")
    # 1 ft = 0.3048 m exactly (identity)
    assert placement.terms() == (0.3048, 0.0, 0.0, -0.3048, 304.8, 609.6)


def test_placement_for_image_uses_the_sidecar(tmp_path: Path) -> None:
    image = tmp_path / "apron.jpg"
    image.write_bytes(b"")
    assert placement_for_image(image, "m") is None
    (tmp_path / "apron.jgw").write_text(NORTH_UP)
    placement, source = placement_for_image(image, "m") or (None, None)
    assert source == tmp_path / "apron.jgw"
    assert placement == Placement(0.5, 0.0, 0.0, -0.5, 100.25, 200.75)


def test_world_file_text_round_trips(tmp_path: Path) -> None:
    placement = Placement(0.3, 0.01, 0.02, -0.3, 12345.6, -789.0)
    path = tmp_path / "x.wld"
    path.write_text(world_file_text(placement, "ft"))
    again = placement_from_terms(read_world_file(path), "ft")
    assert all(math.isclose(a, b, rel_tol=1e-9, abs_tol=1e-9)  # 10 decimals written: identity
               for a, b in zip(placement.terms(), again.terms(), strict=True))


def test_a_missing_or_huge_world_file_is_refused(tmp_path: Path) -> None:
    with pytest.raises(UnderlayFileError, match="cannot read the world file"):
        read_world_file(tmp_path / "none.wld")
    (tmp_path / "big.wld").write_text("1\n" * 5000)
    with pytest.raises(UnderlayFileError, match="too long"):
        read_world_file(tmp_path / "big.wld")


# --- image headers -----------------------------------------------------------------------------------

def png_bytes(width: int, height: int) -> bytes:
    """A valid grey PNG made by hand (PNG specification 5.2, 11.2.2 IHDR, 11.2.4 IDAT, 11.2.5 IEND)."""
    def chunk(kind: bytes, data: bytes) -> bytes:
        return struct.pack(">I", len(data)) + kind + data + struct.pack(">I", zlib.crc32(kind + data))
    rows = b"".join(b"\x00" + b"\x80" * width for _ in range(height))
    return (b"\x89PNG\r\n\x1a\n" + chunk(b"IHDR", struct.pack(">IIBBBBB", width, height, 8, 0, 0, 0, 0))
            + chunk(b"IDAT", zlib.compress(rows)) + chunk(b"IEND", b""))


def jpeg_header(width: int, height: int) -> bytes:
    """SOI, an APP0 segment to skip, fill bytes, then a baseline frame header SOF0 (T.81 B.2.2)."""
    app0 = b"\xff\xe0" + struct.pack(">H", 16) + b"JFIF\x00" + bytes(9)
    sof0 = b"\xff\xff\xc0" + struct.pack(">HBHHB", 11, 8, height, width, 1) + b"\x01\x11\x00"
    return b"\xff\xd8" + app0 + sof0


def tiff_header(width: int, height: int, order: str) -> bytes:
    """A TIFF header and one IFD: ImageWidth as SHORT, ImageLength as LONG (TIFF 6.0 section 2)."""
    magic = b"II*\x00" if order == "<" else b"MM\x00*"
    entries = (struct.pack(order + "HHIH2x", 256, 3, 1, width)
               + struct.pack(order + "HHII", 257, 4, 1, height)
               + struct.pack(order + "HHIH2x", 259, 3, 1, 1))
    return magic + struct.pack(order + "I", 8) + struct.pack(order + "H", 3) + entries + bytes(4)


@pytest.mark.parametrize(("data", "expected"), [
    (png_bytes(7, 3), ImageInfo("PNG", 7, 3)),
    (jpeg_header(640, 480), ImageInfo("JPEG", 640, 480)),
    (tiff_header(7000, 3, "<"), ImageInfo("TIFF", 7000, 3)),
    (tiff_header(5, 90000, ">"), ImageInfo("TIFF", 5, 90000)),
])
def test_probe_reads_the_size_from_the_header(tmp_path: Path, data: bytes, expected: ImageInfo) -> None:
    path = tmp_path / "image"
    path.write_bytes(data)
    assert probe_image(path) == expected


@pytest.mark.parametrize(("data", "words"), [
    (b"GIF89a" + bytes(20), "not a PNG, JPEG or TIFF"),
    (png_bytes(4, 4)[:20], "header is damaged"),
    (b"\xff\xd8\xff\xd9", "not a PNG, JPEG or TIFF"),
    (b"II+\x00" + bytes(12), "BigTIFF"),
    (png_bytes(0, 4), "size of 0 x 4"),
])
def test_probe_refuses_what_it_cannot_read(tmp_path: Path, data: bytes, words: str) -> None:
    path = tmp_path / "image"
    path.write_bytes(data)
    with pytest.raises(UnderlayFileError, match=words):
        probe_image(path)


def test_probe_of_a_missing_file(tmp_path: Path) -> None:
    with pytest.raises(UnderlayFileError, match="cannot read the image"):
        probe_image(tmp_path / "gone.png")
