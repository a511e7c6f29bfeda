#!/usr/bin/env python3
"""Write the link_frame fuzz seeds, built from docs/link.md alone (not from the Rust code):
COBS(type, sequence number, postcard payload, CRC-32 LE) and a zero. zlib.crc32 is the
ISO-HDLC CRC-32. firmware/tests/link.rs checks that the device reads them as documented."""
import os, struct, zlib

def varint(n):
    out = b''
    while True:
        b, n = n & 0x7F, n >> 7
        if n:
            out += bytes([b | 0x80])
        else:
            return out + bytes([b])

def cobs(data):
    out, block = bytearray(), bytearray()
    for b in data:
        if b == 0:
            out.append(len(block) + 1); out += block; block = bytearray()
        else:
            block.append(b)
            if len(block) == 254:
                out.append(255); out += block; block = bytearray()
    out.append(len(block) + 1); out += block
    return bytes(out)

def frame(seq, payload):
    body = bytes([0x51]) + varint(seq) + payload
    return cobs(body + struct.pack('<I', zlib.crc32(body))) + b'\0'

def text(s):
    b = s.encode()
    return varint(len(b)) + b

# Request variants in docs/link.md order: Hello 0, Status 1, Entry 2, Get 3, PutBegin 4,
# PutData 5, PutCommit 6, Delete 7, Log 8, SetClock 9.
hello = frame(1, varint(0) + varint(1))
status = frame(2, varint(1))
entry = frame(3, varint(2) + varint(0))
data = bytes(range(1, 41))
put = (hello
       + frame(4, varint(4) + text("T_1200") + varint(2) + varint(40) + varint(zlib.crc32(data)))
       + frame(5, varint(5) + varint(0) + varint(40) + data)
       + frame(6, varint(6)))
d = os.path.join(os.path.dirname(os.path.abspath(__file__)), 'seeds', 'link_frame')
os.makedirs(d, exist_ok=True)
for name, b in [('hello', hello), ('status', status), ('entry', entry), ('put', put)]:
    with open(os.path.join(d, name), 'wb') as f:
        f.write(b)
