"""Turn the batch answers into a fitment table: the best stocked ratio per vehicle and tire.

Reads the CSV that ``gearwork batch`` wrote for runs.jsonl (columns below) and writes, for
every vehicle and tire size, the ratio with the quickest 1/4 mile whose cruise rpm at
110 km/h stays at or under a ceiling (else the ratio with the lowest cruise rpm), with its
figures. Lines that came back with problem details are counted and left out.

    python examples/catalogue/fitment.py answers.csv -o fitment.csv [--max-cruise-rpm 3000]
"""

from __future__ import annotations

import argparse
import csv
from collections import defaultdict
from pathlib import Path

from expand import stocked_ratios, vehicles

COLUMNS = (
    "finish.elapsed,finish.trap_speed,speeds[0].elapsed,top_speed.speed,"
    "performance.cruise[0].rpm[-1]"
)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("answers", help="CSV written by gearwork batch --columns " + COLUMNS)
    parser.add_argument("-o", "--output", default="fitment.csv")
    parser.add_argument("--max-cruise-rpm", type=float, default=3000.0)
    args = parser.parse_args()
    names = {car["code"]: car["name"] for car in vehicles()}
    figures: dict[tuple[str, str, str], dict[str, str]] = defaultdict(dict)
    problems = 0
    with open(args.answers, newline="") as fh:
        for row in csv.DictReader(fh):
            if row["status"] != "200":
                problems += 1
                continue
            code, ratio, tire, kind = row["id"].split("|")
            figures[(code, tire, ratio)].update(
                {k: v for k, v in row.items() if v and k not in {"id", "endpoint", "status"}}
            )
    answered: dict[tuple[str, str], int] = defaultdict(int)
    for (code, tire, _), f in figures.items():
        if "finish.elapsed" in f and "performance.cruise[0].rpm[-1]" in f:
            answered[(code, tire)] += 1
    stocked = len(stocked_ratios())
    best: dict[tuple[str, str], tuple[float, str, dict[str, str]]] = {}
    for (code, tire, ratio), f in figures.items():
        if answered[(code, tire)] < stocked:  # not every stocked ratio answered (yet)
            continue
        cruise = float(f["performance.cruise[0].rpm[-1]"])
        over = max(0.0, cruise - args.max_cruise_rpm)
        score = over * 1000.0 + float(f["finish.elapsed"])  # within the ceiling first
        if (code, tire) not in best or score < best[(code, tire)][0]:
            best[(code, tire)] = (score, ratio, f)
    with Path(args.output).open("w", newline="") as out:
        w = csv.writer(out, lineterminator="\n")
        w.writerow(
            [
                "code", "vehicle", "tire", "best_ratio", "quarter_mile_s", "trap_kmh",
                "zero_to_60_mph_s", "top_speed_kmh", "cruise_rpm_110_kmh",
            ]
        )  # fmt: skip
        for (code, tire), (_, ratio, f) in sorted(best.items()):
            w.writerow(
                [
                    code, names.get(code, ""), tire, ratio, f["finish.elapsed"],
                    f.get("finish.trap_speed", ""), f.get("speeds[0].elapsed", ""),
                    f.get("top_speed.speed", ""), f["performance.cruise[0].rpm[-1]"],
                ]
            )  # fmt: skip
    print(f"{len(best)} fitments written to {args.output}; {problems} answers with problems")


if __name__ == "__main__":
    main()
