#!/usr/bin/env python3
"""Flash and static RAM of the board image, from the ELF's section headers (stdlib only).

flash = every allocated section that has contents in the file (.vector_table, .text,
        .rodata, and .data's initial values, which are copied from flash at reset);
RAM   = every allocated section placed in SRAM (.data, .bss, .uninit). The stack is not
        a section: it takes the rest of SRAM, from the top down.

Usage: size.py ELF [FLASH_LIMIT_KIB RAM_LIMIT_KIB]; exit 1 beyond a limit, 2 on a bad file.
"""
import struct
import sys

SHT_NOBITS = 8
SHF_ALLOC = 0x2
RAM_START, RAM_END = 0x2000_0000, 0x4000_0000  # Cortex-M SRAM region


def sections(path):
    with open(path, "rb") as f:
        data = f.read()
    if data[:4] != b"\x7fELF" or data[4] != 1 or data[5] != 1:
        raise ValueError("not a 32-bit little-endian ELF file")
    shoff, = struct.unpack_from("<I", data, 0x20)
    shentsize, shnum, shstrndx = struct.unpack_from("<HHH", data, 0x2E)
    heads = [struct.unpack_from("<IIIIIIIIII", data, shoff + i * shentsize) for i in range(shnum)]
    strtab = heads[shstrndx][4]
    for name, kind, flags, addr, _off, size, *_ in heads:
        end = data.index(b"\0", strtab + name)
        yield data[strtab + name:end].decode(), kind, flags, addr, size


def main():
    if len(sys.argv) not in (2, 4):
        print(__doc__.strip().splitlines()[-1], file=sys.stderr)
        return 2
    try:
        secs = [s for s in sections(sys.argv[1]) if s[2] & SHF_ALLOC and s[4] > 0]
    except (OSError, ValueError, struct.error) as e:
        print(f"size.py: {sys.argv[1]}: {e}", file=sys.stderr)
        return 2
    flash = sum(size for _, kind, _, _, size in secs if kind != SHT_NOBITS)
    ram = sum(size for _, _, _, addr, size in secs if RAM_START <= addr < RAM_END)
    for name, kind, _, addr, size in secs:
        where = "RAM" if RAM_START <= addr < RAM_END else "flash"
        also = " (+ its initial values in flash)" if where == "RAM" and kind != SHT_NOBITS else ""
        print(f"  {name:<16} {size:>8} bytes  {where}{also}")
    print(f"flash: {flash} bytes ({flash / 1024:.1f} KiB)")
    print(f"static RAM: {ram} bytes ({ram / 1024:.1f} KiB)")
    if len(sys.argv) == 4:
        flash_kib, ram_kib = int(sys.argv[2]), int(sys.argv[3])
        bad = []
        if flash > flash_kib * 1024:
            bad.append(f"flash {flash} > {flash_kib} KiB")
        if ram > ram_kib * 1024:
            bad.append(f"static RAM {ram} > {ram_kib} KiB")
        if bad:
            print("OVER BUDGET: " + "; ".join(bad))
            return 1
        print(f"within budget ({flash_kib} KiB flash, {ram_kib} KiB static RAM)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
