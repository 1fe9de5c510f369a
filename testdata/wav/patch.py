#!/usr/bin/python3
"""Derives edited and broken WAV files from the SoX ones (see make.sh)."""
import struct


def chunks(b):
    """Yields (id, offset of header, size) for each chunk after 'WAVE'."""
    off = 12
    while off + 8 <= len(b):
        cid, size = b[off:off + 4], struct.unpack("<I", b[off + 4:off + 8])[0]
        yield cid, off, size
        off += 8 + size + (size & 1)


def parts(name):
    b = open(name, "rb").read()
    return b, {cid: (off, size) for cid, off, size in chunks(b)}


def chunk(b, p, cid):
    off, size = p[cid]
    return b[off:off + 8 + size + (size & 1)]


def riff(body):
    return b"RIFF" + struct.pack("<I", 4 + len(body)) + b"WAVE" + body


def save(name, b):
    open(name, "wb").write(b)


b, p = parts("pcm16-stereo.wav")
fmt, dat = chunk(b, p, b"fmt "), chunk(b, p, b"data")
# An odd-sized chunk (5 bytes + 1 pad byte) before the data.
odd = b"junk" + struct.pack("<I", 5) + b"abcde" + b"\0"
save("oddchunk.wav", riff(fmt + odd + dat))
# fmt after data: against the spec, which puts fmt first, but cheap to accept.
# SoX 14.4.2 refuses it ("data chunk before fmt"), so it has no .dat of its own.
save("fmtlast.wav", riff(odd + dat + fmt))

save("invalid-nofmt.wav", riff(dat))
save("invalid-nodata.wav", riff(fmt + odd))
f = bytearray(fmt)
f[8 + 12:8 + 14] = struct.pack("<H", 6)  # blockAlign 6 for 2 x 16 bit
save("invalid-blockalign.wav", riff(bytes(f) + dat))
f = bytearray(fmt)
f[8 + 2:8 + 4] = struct.pack("<H", 0)  # no channels
save("invalid-zerochannels.wav", riff(bytes(f) + dat))
f = bytearray(fmt)
f[8 + 4:8 + 8] = struct.pack("<I", 0)  # sample rate 0
save("invalid-rate.wav", riff(bytes(f) + dat))
save("invalid-truncated.wav", b[:30])  # ends inside the fmt chunk
save("invalid-cutdata.wav", riff(fmt + b"data" + struct.pack("<I", 400) + b"\x01\x02\x03"))

b, p = parts("float32.wav")
off, size = p[b"data"]
nan = bytearray(b)
nan[off + 8 + 4 * 7:off + 8 + 4 * 8] = struct.pack("<f", float("nan"))
save("invalid-nan.wav", bytes(nan))

b, p = parts("pcm24-ext.wav")
off, size = p[b"fmt "]
g = bytearray(b)
g[off + 8 + 24:off + 8 + 26] = struct.pack("<H", 2)  # subformat GUID: ADPCM
save("invalid-extguid.wav", bytes(g))
