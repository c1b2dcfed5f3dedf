"""The PNG writer of our own (``diegen.export.png``), read back by an independent decoder.

Reference: Pillow's PNG reader (it checks the signature, the chunk layout and every chunk's CRC-32 while it
decodes) and zlib's own CRC; the format itself is ISO/IEC 15948 (PNG), section 5 (datastream structure) and
section 11.2.2 (IHDR).
"""

from __future__ import annotations

import io
import struct
import zlib

import numpy as np
import pytest
from PIL import Image

from diegen.export.png import SIGNATURE, png_bytes


def test_pixels_read_back_exactly() -> None:
    rng = np.random.default_rng(7)
    pixels = rng.integers(0, 256, size=(37, 53, 3), dtype=np.uint8)
    data = png_bytes(pixels)
    with Image.open(io.BytesIO(data)) as image:
        image.load()
        assert image.format == "PNG" and image.mode == "RGB" and image.size == (53, 37)
        assert np.array_equal(np.asarray(image), pixels)


def test_chunks_follow_the_standard() -> None:
    """Signature, then IHDR (width, height, bit depth 8, colour type 2 = truecolour, no interlace), one IDAT,
    IEND; each chunk's CRC covers its type and data (ISO/IEC 15948, 5.3)."""
    data = png_bytes(np.full((4, 6, 3), 200, dtype=np.uint8))
    assert data.startswith(SIGNATURE)
    at, kinds = len(SIGNATURE), []
    while at < len(data):
        (length,) = struct.unpack(">I", data[at:at + 4])
        kind, body = data[at + 4:at + 8], data[at + 8:at + 8 + length]
        (crc,) = struct.unpack(">I", data[at + 8 + length:at + 12 + length])
        assert crc == zlib.crc32(kind + body)
        kinds.append(kind)
        if kind == b"IHDR":
            assert struct.unpack(">IIBBBBB", body) == (6, 4, 8, 2, 0, 0, 0)
        at += 12 + length
    assert kinds == [b"IHDR", b"IDAT", b"IEND"]


def test_a_picture_the_imaging_library_drew_reads_back_the_same() -> None:
    image = Image.new("RGB", (120, 80), (255, 255, 255))
    from PIL import ImageDraw

    ImageDraw.Draw(image).line((0, 0, 119, 79), fill=(31, 119, 180), width=3)
    with Image.open(io.BytesIO(png_bytes(np.asarray(image)))) as back:
        assert np.array_equal(np.asarray(back.convert("RGB")), np.asarray(image))


@pytest.mark.parametrize("shape, dtype", [((4, 4), np.uint8), ((4, 4, 4), np.uint8), ((4, 4, 3), np.float64)])
def test_refuses_what_is_not_8_bit_rgb(shape, dtype) -> None:
    with pytest.raises(ValueError, match="uint8"):
        png_bytes(np.zeros(shape, dtype=dtype))
