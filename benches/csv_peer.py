"""Peer for the check benchmark: Python's csv module reading a result log and parsing the
same columns as hex (every field after the index), as a small script would. Prints the
lines read, a checksum and the seconds spent reading (interpreter start excluded).

Usage: python3 benches/csv_peer.py LOG
"""

import csv
import sys
import time


def main() -> None:
    start = time.perf_counter()
    lines = 0
    total = 0
    with open(sys.argv[1], newline="") as f:
        rows = csv.reader(f)
        next(rows)  # header
        for row in rows:
            int(row[0])
            for field in row[1:]:
                total += int(field, 16)
            lines += 1
    seconds = time.perf_counter() - start
    print(f"{lines} {total & 0xFFFFFFFFFFFFFFFF:x} {seconds:.6f}")


if __name__ == "__main__":
    main()
