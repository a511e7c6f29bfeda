#!/usr/bin/env python3
"""Flash and static RAM of the board image, from the ELF's section headers (stdlib only).

flash = every allocated section that has contents in the file (.vector_table, .text,
        .rodata, and .data's initial values, which are copied from flash at reset);
RAM   = every allocated section placed in SRAM (.data, .bss, .uninit). The stack is not
        a section: it takes the rest of SRAM, from the top down.
main's frame = the stack the entry function (cortex-m-rt's `main` and the `#[entry]`
        function it calls) takes for good, read from their prologues (PUSH, VPUSH and
        SUB SP instructions, Thumb-2): the board keeps its app, store and link there. It
        never returns, so this part of the stack is as lasting as the statics; the stack
        of the work below it is measured on the emulated target (scripts/target-check).

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


def symbols(data):
    """(name, address, size) of every function symbol, from .symtab."""
    shoff, = struct.unpack_from("<I", data, 0x20)
    shentsize, shnum, _ = struct.unpack_from("<HHH", data, 0x2E)
    heads = [struct.unpack_from("<IIIIIIIIII", data, shoff + i * shentsize) for i in range(shnum)]
    for _name, kind, _f, _a, off, size, link, _i, _al, entsize in heads:
        if kind != 2:  # SHT_SYMTAB
            continue
        stroff = heads[link][4]
        for k in range(size // entsize):
            st_name, value, st_size, info, _other, _shndx = struct.unpack_from("<IIIBBH", data, off + k * entsize)
            if info & 0xF == 2:  # STT_FUNC
                end = data.index(b"\0", stroff + st_name)
                yield data[stroff + st_name:end].decode(errors="replace"), value & ~1, st_size


def file_offset(data, addr):
    """Where the byte at `addr` lies in the file (from the program headers)."""
    phoff, = struct.unpack_from("<I", data, 0x1C)
    phentsize, phnum = struct.unpack_from("<HH", data, 0x2A)
    for i in range(phnum):
        _t, off, vaddr, _p, filesz, *_ = struct.unpack_from("<IIIIII", data, phoff + i * phentsize)
        if vaddr <= addr < vaddr + filesz:
            return off + addr - vaddr
    raise ValueError(f"address {addr:#x} is not in the file")


def thumb_expand_imm(imm12):
    """ThumbExpandImm of the Armv7-M architecture reference manual (A5.3.2)."""
    if imm12 >> 10 == 0:
        b = imm12 & 0xFF
        return [b, b << 16 | b, b << 24 | b << 8, b * 0x01010101][imm12 >> 8 & 3]
    unrotated, rot = 0x80 | imm12 & 0x7F, imm12 >> 7
    return (unrotated >> rot | unrotated << (32 - rot)) & 0xFFFFFFFF


def prologue_bytes(data, addr):
    """Stack a function's prologue takes: PUSH, VPUSH, SUB SP,#imm; stops at anything else
    (the frame-pointer set-up `add r7, sp, #n` / `mov r7, sp` is skipped)."""
    at, total = file_offset(data, addr), 0
    for _ in range(16):
        hw, = struct.unpack_from("<H", data, at)
        if hw & 0xFE00 == 0xB400:  # PUSH {regs[, lr]} (T1)
            total += 4 * (bin(hw & 0xFF).count("1") + (hw >> 8 & 1))
            at += 2
        elif hw & 0xFF00 == 0xAF00 or hw == 0x466F:  # add r7, sp, #n / mov r7, sp
            at += 2
        elif hw & 0xFF80 == 0xB080:  # SUB SP, SP, #imm7*4 (T1)
            total += 4 * (hw & 0x7F)
            at += 2
        elif hw >> 11 not in (0x1D, 0x1E, 0x1F):  # another 16-bit instruction: the end
            break
        else:
            hw2, = struct.unpack_from("<H", data, at + 2)
            i, imm3, imm8 = hw >> 10 & 1, hw2 >> 12 & 7, hw2 & 0xFF
            if hw == 0xE92D:  # PUSH.W (STMDB SP!, {regs})
                total += 4 * bin(hw2).count("1")
            elif hw & 0xFBFF == 0xF1AD and hw2 & 0x8F00 == 0x0D00:  # SUB.W SP, SP, #const (T2)
                total += thumb_expand_imm(i << 11 | imm3 << 8 | imm8)
            elif hw & 0xFBFF == 0xF2AD and hw2 & 0x8F00 == 0x0D00:  # SUBW SP, SP, #imm12 (T3)
                total += i << 11 | imm3 << 8 | imm8
            elif hw == 0xED2D and hw2 & 0x0F00 == 0x0B00:  # VPUSH {d-regs}
                total += 4 * imm8
            elif hw & 0xFF00 == 0xF100 and hw2 & 0x0F00 == 0x0B00:  # add.w r11, sp, #n
                pass
            else:
                break
            at += 4
    return total


def main_frame(path):
    """Bytes of stack the entry function and cortex-m-rt's `main` take for good."""
    with open(path, "rb") as f:
        data = f.read()
    total, seen = 0, []
    for name, addr, _size in symbols(data):
        if name == "main" or "__cortex_m_rt_main" in name:
            total += prologue_bytes(data, addr)
            seen.append(name)
    if not any("__cortex_m_rt_main" in n for n in seen):
        raise ValueError("no #[entry] function (__cortex_m_rt_main) in the symbols")
    return total


def self_test():
    """The prologue decoder on hand-assembled Thumb-2 (encodings from the Armv7-M ARM;
    the last case is the board's own prologue as llvm-objdump shows it)."""
    def code(*hws):
        return struct.pack(f"<{len(hws)}H", *hws)
    cases = [
        # push {r4, r5, r7, lr}; add r7, sp, #8; sub.w sp, sp, #25088; sub sp, #112; movs
        (code(0xB5B0, 0xAF02, 0xF5AD, 0x4DC4, 0xB09C, 0x2000), 16 + 25088 + 112),
        # push.w {r4-r11, lr}; subw sp, sp, #4095; vpush {d8-d9}; movs
        (code(0xE92D, 0x4FF0, 0xF6AD, 0x7DFF, 0xED2D, 0x8B04, 0x2000), 36 + 4095 + 16),
        # push {r7, lr}; mov r7, sp; bl ... (cortex-m-rt's main)
        (code(0xB580, 0x466F, 0xF000, 0xF800), 8),
    ]
    failed = 0
    for blob, want in cases:
        # A fake one-segment file: program header at 0x34 mapping address 0 to offset 0x54.
        head = bytearray(0x54)
        struct.pack_into("<I", head, 0x1C, 0x34)
        struct.pack_into("<HH", head, 0x2A, 32, 1)
        struct.pack_into("<IIIIII", head, 0x34, 1, 0x54, 0, 0, len(blob), len(blob))
        got = prologue_bytes(bytes(head) + blob, 0)
        if got != want:
            print(f"size.py self-test: prologue {blob.hex()} read as {got} bytes, not {want}")
            failed = 1
    print("size.py self-test: " + ("FAILED" if failed else "prologue decoder ok"))
    return failed


def main():
    if sys.argv[1:] == ["--self-test"]:
        return self_test()
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
    try:
        frame = main_frame(sys.argv[1])
        print(f"main's frame: {frame} bytes (the app, the store and the link; from the prologue)")
    except (OSError, ValueError, struct.error) as e:
        print(f"size.py: {sys.argv[1]}: main's frame not read: {e}", file=sys.stderr)
        return 2
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
