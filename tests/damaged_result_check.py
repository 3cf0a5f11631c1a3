"""Damaged and semantically wrong result files (issue 12, items 4 and 5): every
command that reads a result (report, export, plot) must refuse them with exit 2
and a message, never crash, hang or exit 1.

The files are made here, deterministically, from a small result of
endfire-pair.toml on a 30 deg grid (7 x 13 directions):
  - wrong values in a well-formed file (h5py): a NaN or reversed theta, a
    million-point theta, NaN directivity, frequency 0, a zero orientation, a
    sense of 5; each refused as "not a valid lobecast result" naming the dataset;
  - structures HDF5 trusts (found by flipping and zeroing bytes, issue 12): the
    global heap's free space zeroed (HDF5 1.10 spun forever), a string's length
    past its heap object (ran away), a string naming a heap object that is not
    there, a complex member's offset past the compound (segfault in the
    conversion), a string that is not UTF-8 (cairo refused it, exit 1), an
    attribute message whose name, datatype or dataspace claims more than the
    message (HDF5 copied the value from past it: a heap overflow);
  - a sweep: one byte inverted at every --stride-th position, two bytes zeroed at
    every --stride-th position (offset by half a stride) and the file truncated at
    every 8 * --stride-th; every command must exit 0 (damage in the data itself
    is not detectable) or 2, each within --timeout seconds (a bound on a hang,
    not a timing test: a healthy run takes well under a second).
"""
import os
import re
import struct
import subprocess
import sys

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from check_common import arguments, check, summary  # noqa: E402

import h5py  # noqa: E402
import numpy as np  # noqa: E402


def options():
    extra = {"--stride": 613, "--timeout": 10.0}
    argv = sys.argv[1:]
    for key in list(extra):
        if key in argv:
            i = argv.index(key)
            extra[key] = type(extra[key])(argv[i + 1])
            del argv[i:i + 2]
    sys.argv[1:] = argv
    return arguments(), extra["--stride"], extra["--timeout"]


a, stride, timeout = options()
work = os.path.abspath(a.workdir)


def commands(path):
    return {
        "report": [a.lobecast, "report", path],
        "export": [a.lobecast, "export", path, "-o", os.path.join(work, "out.csv")],
        "plot": [a.lobecast, "plot", path, "-o", os.path.join(work, "out.png")],
    }


def run(cmd):
    try:
        r = subprocess.run(cmd, capture_output=True, timeout=timeout)
        return r.returncode, r.stderr.decode("utf-8", "replace")
    except subprocess.TimeoutExpired:
        return "timeout", ""


# The small result every case starts from.
sample = open(os.path.join(a.samples, "endfire-pair.toml")).read()
coarse = re.sub(r"step\s*=\s*[0-9.]+", "step = 30", sample)
source = os.path.join(work, "pair.toml")
with open(source, "w") as f:
    f.write(coarse)
good = os.path.join(work, "pair.h5")
rc, err = run([a.lobecast, "compute", "-q", source, "-o", good])
if not check(rc == 0, f"compute of the small result: exit {rc} {err}"):
    sys.exit(summary("damaged_result_check"))
original = open(good, "rb").read()
for name, cmd in commands(good).items():
    rc, err = run(cmd)
    check(rc == 0, f"{name} of the undamaged result: exit {rc} {err}")


def expect_refused(path, what, *needles, only=None):
    """Every command (or those in `only`) exits 2 with 'not a valid lobecast result'
    and the needles."""
    for name, cmd in commands(path).items():
        if only and name not in only:
            continue
        rc, err = run(cmd)
        ok = rc == 2 and "not a valid lobecast result" in err and all(n in err for n in needles)
        check(ok, f"{what}: {name} exit {rc}, expected 2 naming {needles}: {err.strip()}")


# --- wrong values in a well-formed file ---------------------------------------------

def edited(tag, edit):
    path = os.path.join(work, f"value-{tag}.h5")
    with open(path, "wb") as f:
        f.write(original)
    with h5py.File(path, "r+") as h:
        edit(h)
    return path


def set_value(h, name, index, value):
    v = h[name][()]
    v[index] = value
    h[name][...] = v


def replace(h, name, values):
    units = h[name].attrs["units"]
    del h[name]
    h[name] = values
    h[name].attrs["units"] = units


expect_refused(edited("nan-theta", lambda h: set_value(h, "grid/theta_deg", 2, np.nan)),
               "NaN theta", "/grid/theta_deg")
expect_refused(edited("reversed-theta", lambda h: replace(h, "grid/theta_deg",
                                                          h["grid/theta_deg"][()][::-1].copy())),
               "reversed theta", "/grid/theta_deg", "increasing")
expect_refused(edited("million-theta", lambda h: replace(h, "grid/theta_deg",
                                                         np.arange(1e6))),
               "a million-point theta", "/grid/theta_deg")
expect_refused(edited("nan-directivity", lambda h: set_value(h, "pattern/directivity", (3, 4),
                                                             np.nan)),
               "NaN directivity", "/pattern/directivity")
expect_refused(edited("frequency-0", lambda h: h["array"].attrs.modify("frequency_hz", 0.0)),
               "frequency 0", "frequency_hz")
expect_refused(edited("zero-orientation", lambda h: set_value(h, "array/orientation", 1,
                                                              [0.0, 0.0, 0.0])),
               "zero orientation", "/array/orientation")
expect_refused(edited("sense-5", lambda h: set_value(h, "polarization/sense", (1, 1), 5)),
               "a sense of 5", "/polarization/sense")

# Counts read back from the file (issue 12: a stored max_nulls of -1 became 2^64 - 1).
expect_refused(edited("max-nulls-negative",
                      lambda h: h["summary/analysis"].attrs.modify("max_nulls", np.int64(-1))),
               "max_nulls -1", "max_nulls", "[0, 1000000000]",
               only=("report", "plot"))  # export does not read the stored analysis
expect_refused(edited("directions-negative",
                      lambda h: h["summary"].attrs.modify("num_directions", np.int64(-1))),
               "num_directions -1", "num_directions", "[0, 1000000000]")


# --- structures HDF5 trusts ------------------------------------------------------------

def damaged(tag, data):
    path = os.path.join(work, f"struct-{tag}.h5")
    with open(path, "wb") as f:
        f.write(bytes(data))
    return path


heap = original.find(b"GCOL\x01")
check(heap > 0, "the result has a global heap collection")
heap_size = struct.unpack("<Q", original[heap + 8:heap + 16])[0]
# Walk to the free space (index 0) and to the first string object.
objects = {}
p = heap + 16
while p + 16 <= heap + heap_size:
    index = struct.unpack("<H", original[p:p + 2])[0]
    size = struct.unpack("<Q", original[p + 8:p + 16])[0]
    if index == 0:
        free_space = p
        break
    objects[index] = (p, size)
    p += 16 + (size + 7) // 8 * 8
refs = [m.start() - 4 for m in re.finditer(re.escape(struct.pack("<Q", heap)), original)]
refs = [r for r in refs if struct.unpack("<I", original[r + 12:r + 16])[0] in objects]
check(len(refs) > 10, f"the result's strings refer to the heap ({len(refs)} found)")
# The reference of the root attribute format, which every reader reads first.
format_index = next(k for k, (p, s) in objects.items()
                    if original[p + 16:p + 16 + s] == b"lobecast.pattern")
format_ref = next(r for r in refs
                  if struct.unpack("<I", original[r + 12:r + 16])[0] == format_index)

d = bytearray(original)
d[free_space + 8:free_space + 16] = bytes(8)
expect_refused(damaged("heap-free-space-0", d), "heap free space of size 0", "global heap")

d = bytearray(original)
d[format_ref:format_ref + 4] = struct.pack("<I", 0xFFFFFFF0)
expect_refused(damaged("string-length-past-object", d), "a string longer than its object",
               "global heap object holds")

d = bytearray(original)
d[format_ref + 12:format_ref + 16] = struct.pack("<I", 60000)
expect_refused(damaged("string-missing-object", d), "a string naming a missing object",
               "does not hold")

# What the search for references once let through (issue 12): an index past 16
# bits (0x02000009 from the result fuzzer: HDF5 1.10.8 read outside the collection,
# a segmentation fault), an index and a length both damaged, and an address that
# names no collection. Each reference is now read where its attribute or dataset
# keeps it.
d = bytearray(original)
d[format_ref + 12:format_ref + 16] = struct.pack("<I", 0x02000009)
expect_refused(damaged("string-index-past-16-bits", d), "a string index past 16 bits",
               "does not hold")

d = bytearray(original)
d[format_ref:format_ref + 4] = struct.pack("<I", 12345)
d[format_ref + 12:format_ref + 16] = struct.pack("<I", 777)
expect_refused(damaged("string-index-and-length", d), "a string's index and length damaged",
               "does not hold")

d = bytearray(original)
d[format_ref + 4:format_ref + 12] = struct.pack("<Q", heap + 8)
expect_refused(damaged("string-address-no-heap", d), "a string naming no collection",
               "where the file has none")

d = bytearray(original)
for m in re.finditer(re.escape(b"r" + bytes(11)), original):
    d[m.start() + 11] = 0xFF  # the member's byte offset, most significant byte
expect_refused(damaged("complex-member-offset", d), "a complex member past the compound",
               "complex numbers")

# A stored name with a byte that is not UTF-8 (a title the plot would draw).
name = b"Quillanby Wharf endfire pair"
index = next(k for k, (p, s) in objects.items() if original[p + 16:p + 16 + s] == name)
d = bytearray(original)
d[objects[index][0] + 16] = 0xFF
expect_refused(damaged("name-not-utf8", d), "a name that is not UTF-8", "not UTF-8", "\\xff")

# Attribute messages whose parts claim more than the message holds (issue 12: HDF5
# 1.10.8 copied the value from past the message, a heap overflow under
# AddressSanitizer from H5Aexists; found by this sweep at byte 41071, the dataspace
# size of the analysis option `reference`). Each attribute message starts (HDF5 File
# Format Specification 2.0, IV.A.2.m, version 1) version, reserved, name size,
# datatype size, dataspace size (u16 each), then the name.
attribute = original.find(b"\x01\x00\x0a\x00\x14\x00\x08\x00reference\x00")
check(attribute > 0, "the result has the attribute message of `reference`")
for part, offset in (("name", 2), ("datatype", 4), ("dataspace", 6)):
    d = bytearray(original)
    d[attribute + offset + 1] = 0xFF  # the size's most significant byte
    expect_refused(damaged(f"attribute-{part}-size", d), f"an attribute's {part} past its message",
                   "damaged attribute message")

# --- the sweep ------------------------------------------------------------------------
runs = 0
sweep = os.path.join(work, "sweep.h5")


def sweep_case(what, data):
    global runs
    with open(sweep, "wb") as f:
        f.write(data)
    for name, cmd in commands(sweep).items():
        rc, err = run(cmd)
        runs += 1
        ok = rc == 0 or (rc == 2 and err.startswith("lobecast: ") and "internal" not in err)
        if not check(ok, f"{what}: {name} exit {rc}: {err.strip()[:300]}"):
            keep = os.path.join(work, f"failed-{what.replace(' ', '-')}.h5")
            with open(keep, "wb") as f:
                f.write(data)


for p in range(0, len(original), stride):
    sweep_case(f"byte {p} inverted",
               original[:p] + bytes([original[p] ^ 0xFF]) + original[p + 1:])
for p in range(stride // 2, len(original) - 1, stride):
    sweep_case(f"bytes {p}-{p + 1} zeroed", original[:p] + b"\0\0" + original[p + 2:])
for p in range(0, len(original), 8 * stride):
    sweep_case(f"truncated at {p}", original[:p])
print(f"sweep: {len(original)} bytes, stride {stride}, {runs} runs")
sys.exit(summary("damaged_result_check"))
