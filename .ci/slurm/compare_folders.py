#!/usr/bin/python3
"""Compare accelplan results folders file by file, timing fields aside.

Usage:
  compare_folders.py REFERENCE OTHER [OTHER...]   exit 0 if every OTHER equals REFERENCE
  compare_folders.py --self-test REFERENCE         check that this comparison can fail

Python standard library only (run as /usr/bin/python3).

Every file of the folder is compared byte for byte, except for the fields
that record when and how fast the run went:
  manifest.json  the top-level keys "started", "seconds", "workers", "cpu_seconds" and
                 "overhead_outside_reconstruction" (run conditions) are
                 dropped; every other key (plan hash, seeds, λ per candidate,
                 ...) must be equal after JSON parsing;
  results.csv    the recon_seconds column is dropped; every other cell must
                 be equal, row by row;
  report.html    the <dt>workers|run time|generated</dt><dd>...</dd> facts and
                 the "YYYY-MM-DD HH:MM:SS UTC" stamps are removed, the rest
                 must be equal byte for byte.
This is the same set of exceptions as cmd/accelplan/resume_test.go, written
independently, and stricter on manifest.json (the Go test skips that file).
"""

import csv
import io
import json
import os
import re
import shutil
import sys
import tempfile

MANIFEST_TIMING_KEYS = ("started", "seconds", "workers", "cpu_seconds", "overhead_outside_reconstruction")
CSV_TIMING_COLUMN = "recon_seconds"
REPORT_TIMING = [
    re.compile(rb"<dt>(workers|run time|generated)</dt><dd>[^<]*</dd>"),
    re.compile(rb"\d{4}-\d\d-\d\d \d\d:\d\d:\d\d UTC"),
]


def files_of(folder):
    """Relative paths of every regular file under folder, sorted."""
    out = []
    for root, dirs, names in os.walk(folder):
        dirs.sort()
        for n in names:
            out.append(os.path.relpath(os.path.join(root, n), folder))
    return sorted(out)


def normalised(rel, data):
    """The comparable form of one file's bytes."""
    if rel == "manifest.json":
        m = json.loads(data)
        for k in MANIFEST_TIMING_KEYS:
            m.pop(k, None)
        return m
    if rel == "results.csv":
        rows = list(csv.reader(io.StringIO(data.decode("utf-8"), newline="")))
        if rows and CSV_TIMING_COLUMN in rows[0]:
            col = rows[0].index(CSV_TIMING_COLUMN)
            rows = [r[:col] + r[col + 1:] for r in rows]
        return rows
    if rel == "report.html":
        for rx in REPORT_TIMING:
            data = rx.sub(b"", data)
        return data
    return data


def differences(ref, other):
    """A list of human-readable differences between two results folders."""
    diffs = []
    a, b = files_of(ref), files_of(other)
    if not a:
        diffs.append(f"{ref} holds no files")
    for rel in sorted(set(a) - set(b)):
        diffs.append(f"{rel}: missing from {other}")
    for rel in sorted(set(b) - set(a)):
        diffs.append(f"{rel}: only in {other}")
    for rel in sorted(set(a) & set(b)):
        with open(os.path.join(ref, rel), "rb") as f:
            x = f.read()
        with open(os.path.join(other, rel), "rb") as f:
            y = f.read()
        try:
            nx, ny = normalised(rel, x), normalised(rel, y)
        except (ValueError, UnicodeDecodeError) as e:
            diffs.append(f"{rel}: cannot be read: {e}")
            continue
        if nx != ny:
            diffs.append(f"{rel}: differs{first_difference(nx, ny)}")
    return diffs


def first_difference(x, y):
    """Where two normalised forms first differ, for the message."""
    if isinstance(x, list) and isinstance(y, list):
        for i, (r, s) in enumerate(zip(x, y)):
            if r != s:
                return f" at row {i + 1}: {r} != {s}"
        return f" ({len(x)} rows against {len(y)})"
    if isinstance(x, dict) and isinstance(y, dict):
        keys = sorted(k for k in set(x) | set(y) if x.get(k) != y.get(k))
        return " in key(s) " + ", ".join(keys)
    if isinstance(x, bytes) and isinstance(y, bytes):
        n = next((i for i, (p, q) in enumerate(zip(x, y)) if p != q), min(len(x), len(y)))
        return f" from byte {n} ({len(x)} bytes against {len(y)})"
    return ""


def compare(ref, others):
    bad = 0
    for other in others:
        d = differences(ref, other)
        n = len(files_of(ref))
        if d:
            bad += 1
            print(f"DIFFERENT: {other} against {ref}:")
            for line in d:
                print("  " + line)
        else:
            print(f"same: {other} equals {ref} in all {n} files, timing fields aside")
    return 1 if bad else 0


def self_test(ref):
    """Show that the comparison ignores timing only: tampered copies of ref
    that change a timing field must compare equal, and copies that change
    anything else must compare different."""
    failures = []
    work = tempfile.mkdtemp(prefix="compare-selftest-")
    try:
        def copy(name):
            dst = os.path.join(work, name)
            shutil.copytree(ref, dst)
            return dst

        def edit(folder, rel, fn):
            p = os.path.join(folder, rel)
            with open(p, "rb") as f:
                data = f.read()
            with open(p, "wb") as f:
                f.write(fn(data))

        def set_csv_cell(column, value):
            def fn(data):
                rows = list(csv.reader(io.StringIO(data.decode("utf-8"), newline="")))
                col = rows[0].index(column)
                rows[1][col] = value
                buf = io.StringIO()
                csv.writer(buf, lineterminator="\n").writerows(rows)
                return buf.getvalue().encode("utf-8")
            return fn

        def set_manifest(key, value):
            def fn(data):
                m = json.loads(data)
                m[key] = value
                return json.dumps(m, indent=2).encode("utf-8")
            return fn

        # Timing changes: must be ignored.
        t = copy("timing")
        edit(t, "results.csv", set_csv_cell(CSV_TIMING_COLUMN, "123.4567"))
        edit(t, "manifest.json", set_manifest("seconds", 9999.5))
        edit(t, "manifest.json", set_manifest("started", "1999-01-01T00:00:00Z"))
        edit(t, "manifest.json", set_manifest("workers", 77))
        edit(t, "report.html", lambda d: REPORT_TIMING[1].sub(b"1999-01-01 00:00:00 UTC", d))
        if not REPORT_TIMING[0].search(open(os.path.join(ref, "report.html"), "rb").read()):
            failures.append("report.html has no workers/run time/generated facts to ignore")
        if differences(ref, t):
            failures.append("timing-only changes were reported: " + "; ".join(differences(ref, t)))

        # Anything else: must be caught.
        cases = [
            ("an SSIM cell of results.csv", "results.csv", set_csv_cell("ssim", "0.12345678")),
            ("a noise seed in results.csv", "results.csv", set_csv_cell("noise_seed", "1")),
            ("the seed in manifest.json", "manifest.json", set_manifest("seed", 1)),
            ("the plan hash in manifest.json", "manifest.json", set_manifest("plan_sha256", "0" * 64)),
            ("one byte of report.html", "report.html", lambda d: d[:-20] + bytes([d[-20] ^ 1]) + d[-19:]),
            ("one byte of summary.csv", "summary.csv", lambda d: d[:-3] + bytes([d[-3] ^ 1]) + d[-2:]),
            ("one byte of an image", "images/truth.png", lambda d: d[:len(d) // 2] + bytes([d[len(d) // 2] ^ 1]) + d[len(d) // 2 + 1:]),
            ("recommendation.txt", "recommendation.txt", lambda d: d + b"\n"),
        ]
        for i, (what, rel, fn) in enumerate(cases):
            c = copy(f"case{i}")
            edit(c, rel, fn)
            if not differences(ref, c):
                failures.append(f"a change of {what} was not noticed")
        c = copy("missing")
        os.remove(os.path.join(c, "summary.csv"))
        if not differences(ref, c):
            failures.append("a missing file was not noticed")
        c = copy("extra")
        with open(os.path.join(c, "extra.txt"), "w") as f:
            f.write("x")
        if not differences(ref, c):
            failures.append("an extra file was not noticed")
    finally:
        shutil.rmtree(work)
    for f in failures:
        print("self-test: " + f)
    if not failures:
        print(f"self-test: timing-only edits ignored, {len(cases) + 2} other kinds of edit caught")
    return 1 if failures else 0


def main(argv):
    if len(argv) == 2 and argv[0] == "--self-test":
        return self_test(argv[1])
    if len(argv) >= 2 and not argv[0].startswith("-"):
        return compare(argv[0], argv[1:])
    print(__doc__.strip().split("\n\n")[1], file=sys.stderr)
    return 2


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
