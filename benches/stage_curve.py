#!/usr/bin/env python3
"""The growth curve of a build from its `--progress json` log: per stage, the working set's
size and the elapsed time at the stage's last report (and the norm level it had reached),
then the largest working set of the build (`peak_moves`, exact in a log of version 2, whose
last record is the build's end) and, given the build's peak resident memory, the bytes per
working move at that peak.

Records are one JSON object per line (schema `kernstep.progress/1` or `/2`), as
`kernstep build MODEL --progress json 2> LOG` writes them; other lines are skipped.

Usage: python3 benches/stage_curve.py LOG [PEAK_RSS_KIB]
"""

import json
import sys


def main():
    last = {}
    with open(sys.argv[1]) as f:
        for line in f:
            try:
                record = json.loads(line)
            except json.JSONDecodeError:
                continue
            if str(record.get("schema", "")).startswith("kernstep.progress/"):
                last[record["stage"]] = record
    print(f"{'stage':>5} {'of':>3} {'norm level':>10} {'working moves':>14} {'elapsed s':>10}")
    for stage in sorted(last):
        r = last[stage]
        print(f"{stage:>5} {r['stages']:>3} {r['norm_level']:>10} {r['moves']:>14,} "
              f"{r['elapsed_seconds']:>10.0f}")
    peak = max((r.get("peak_moves", r["moves"]) for r in last.values()), default=0)
    print(f"largest working set: {peak:,} moves")
    if len(sys.argv) > 2 and peak:
        rss = int(sys.argv[2]) * 1024
        print(f"peak resident memory {rss / 2**20:.1f} MiB: {rss / peak:.0f} bytes per working move")


if __name__ == "__main__":
    main()
