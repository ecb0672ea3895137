"""Shard numbers of group keys, from an implementation of plumb's shard
definition written independently of the Go code (from the doc comment of
udf/shard.go): the key's columns as text, each written as 0x00 for NULL or
0x01, its UTF-8 length as 8 bytes little-endian and its bytes; 64-bit FNV-1a
of those bytes; MurmurHash3's fmix64 finalizer; shard = floor(m * n / 2^64).

FNV-1a 64 test vectors from the FNV reference (Fowler, Noll and Vo; from
memory, checked here): "" -> cbf29ce484222325, "a" -> af63dc4c8601ec8c,
"foobar" -> 85944171f73967e8.

Usage: shard_keys.py OUT_DIR  (writes shard_keys.csv)
"""
import csv
import json
import os
import struct
import sys

MASK = (1 << 64) - 1


def fnv1a64(data):
    h = 0xCBF29CE484222325
    for b in data:
        h ^= b
        h = (h * 0x100000001B3) & MASK
    return h


def fmix64(h):
    h ^= h >> 33
    h = (h * 0xFF51AFD7ED558CCD) & MASK
    h ^= h >> 33
    h = (h * 0xC4CEB9FE1A85EC53) & MASK
    h ^= h >> 33
    return h


def shard(key, n):
    data = b""
    for k in key:
        if k is None:
            data += b"\x00"
        else:
            text = k.encode("utf-8")
            data += b"\x01" + struct.pack("<Q", len(text)) + text
    return (fmix64(fnv1a64(data)) * n) >> 64


assert fnv1a64(b"") == 0xCBF29CE484222325
assert fnv1a64(b"a") == 0xAF63DC4C8601EC8C
assert fnv1a64(b"foobar") == 0x85944171F73967E8

keys = [["1"], ["42"], ["store-7", "sku-3"], [None, "milk"], ["milk", None], ["2025-01-01"],
        ["2025-01-01 06:30:00"], ["true"], ["Zürich"], [""], [None], ["a", "bc"], ["ab", "c"]]
keys += [[str(i)] for i in range(0, 100, 7)]

with open(os.path.join(sys.argv[1], "shard_keys.csv"), "w", newline="") as f:
    w = csv.writer(f, lineterminator="\n")
    w.writerow(["key", "shards", "shard"])
    for key in keys:
        for n in (1, 2, 4, 7, 1000):
            w.writerow([json.dumps(key, ensure_ascii=False), n, shard(key, n)])
