#!/usr/bin/env python3
"""Reads CSV files with Python's standard csv module (RFC 4180 quoting), independent of lapwing's
own writer, and checks that each has a header of unique, non-empty names and
as many fields in every row as names in its header (a file may have no rows: a track without
corners writes a corners.csv of its header alone).
    csv_fields.py FILE ...
Prints one line per failure and exits 1 when any file fails."""
import csv
import sys


def check(path):
    with open(path, newline="", encoding="utf-8") as f:
        rows = list(csv.reader(f))
    if not rows:
        return [f"{path}: empty"], 0
    header, body = rows[0], rows[1:]
    problems = []
    if any(name == "" for name in header):
        problems.append(f"{path}: an empty name in the header {header}")
    if len(set(header)) != len(header):
        problems.append(f"{path}: a name twice in the header {header}")
    for line, row in enumerate(body, start=2):
        if len(row) != len(header):
            problems.append(
                f"{path}:{line}: {len(row)} fields, the header has {len(header)} names"
            )
            break  # one line per file is enough to find it
    return problems, len(body)


def main(paths):
    if not paths:
        print("csv_fields.py: no files given")
        return 1
    failed = rows = 0
    for path in paths:
        problems, n = check(path)
        rows += n
        failed += bool(problems)
        for p in problems:
            print("FAIL:", p)
    print(f"csv_fields: {len(paths) - failed} of {len(paths)} files match their headers, "
          f"{rows} rows read")
    if rows == 0:
        print("FAIL: no rows at all")
    return 1 if failed or rows == 0 else 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
