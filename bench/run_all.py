"""``make bench``: run every bench/*.py script and print one table of all their measures.

Each script runs in its own process. Measures come from its ``BENCH {json}`` lines (the
protocol of bench/README.md); for a script that prints none, an adapter below reads the free
text it prints today. A script that fails or prints nothing readable still gets a row, so a
missing measure is visible. Exit status: 0 when every measure ran (met or not), 1 otherwise.

Run: ``.venv/bin/python bench/run_all.py [--only NAME ...] [--json PATH]``.
"""

from __future__ import annotations

import argparse
import json
import re
import subprocess
import sys
import time
from pathlib import Path

BENCH = Path(__file__).resolve().parent
ROOT = BENCH.parent
PREFIX = "BENCH "
TIMEOUT_SECONDS = 1800
NUM = r"([\d.]+)"


def _row(measure, value, unit, baseline, ratio, target, met, note=""):
    return {"measure": measure, "value": value, "unit": unit, "baseline": baseline,
            "ratio": ratio, "target": target, "met": met, "note": note}


def _find(pattern: str, text: str) -> tuple[float, ...] | None:
    match = re.search(pattern, text, re.M)
    return tuple(float(g) for g in match.groups()) if match else None


def adapt_page_weight(out: str) -> list[dict]:
    rows = []
    for label, pattern in (("App shell, compressed (gzip)", r"shell total \(gzip\): " + NUM
                            + r" KB\s+target <= " + NUM),
                           ("App shell JavaScript, compressed (gzip)",
                            r"JavaScript \(gzip\):\s+" + NUM + r" KB\s+target <= " + NUM)):
        found = _find(pattern, out)
        if found:
            rows.append(_row(label, found[0], "KB", None, None, f"<= {found[1]:g} KB",
                             found[0] <= found[1]))
    return rows


def adapt_offline_result(out: str) -> list[dict]:
    value = _find(r"tap -> result drawn.*?: " + NUM + " ms", out)
    baseline = _find(r"^baseline .*?: " + NUM + " ms", out)
    target = _find(r"target: <= " + NUM + " ms", out)
    if not (value and baseline and target):
        return []
    return [_row("Offline tap to result, CPU x4", value[0], "ms", baseline[0],
                 value[0] / baseline[0], f"<= {target[0]:g} ms", value[0] <= target[0],
                 "baseline: trivial button to frame")]


def adapt_pdf_sheet(out: str) -> list[dict]:
    value = _find(r"^value\s+" + NUM + " ms", out)
    baseline = _find(r"^baseline\s+" + NUM + " ms", out)
    ratio = _find(r"^ratio\s+" + NUM + r"\s+target <= " + NUM, out)
    cached = _find(r"^cached\s+" + NUM + r" ms\s+ratio " + NUM + r"\s+target <= " + NUM, out)
    rows = []
    if value and baseline and ratio:
        rows.append(_row("Caregiver sheet PDF (uncached)", value[0], "ms", baseline[0],
                         ratio[0], f"ratio <= {ratio[1]:g}", ratio[0] <= ratio[1],
                         "baseline: plain one-page WeasyPrint HTML"))
    if cached and baseline:
        rows.append(_row("Caregiver sheet PDF (cached repeat)", cached[0], "ms", baseline[0],
                         cached[1], f"ratio <= {cached[2]:g}", cached[1] <= cached[2]))
    return rows


def adapt_tallies(out: str) -> list[dict]:
    value = _find(r"^value .*?:\s+" + NUM + " ms", out)
    baseline = _find(r"^baseline .*?:\s+" + NUM + " ms", out)
    ratio = _find(r"^ratio .*?:\s+" + NUM + r"\s+\(target <= " + NUM + r"\)", out)
    page = _find(r"^page .*?:\s+" + NUM + r" ms\s+\(target <= " + NUM + " ms\\)", out)
    rows = []
    if value and baseline and ratio:
        rows.append(_row("Tallies, 12 weeks over 1,000,000 cases (API)", value[0], "ms",
                         baseline[0], ratio[0], f"ratio <= {ratio[1]:g}", ratio[0] <= ratio[1],
                         "baseline: bare SQL GROUP BY"))
    if page:
        rows.append(_row("Supervisor page, 12 weeks over 1,000,000 cases", page[0], "ms", None,
                         None, f"<= {page[1]:g} ms", page[0] <= page[1]))
    return rows


ADAPTERS = {"page_weight": adapt_page_weight, "offline_result": adapt_offline_result,
            "pdf_sheet": adapt_pdf_sheet, "tallies": adapt_tallies}


def scripts(only: list[str] | None) -> list[Path]:
    found = sorted(p for p in BENCH.glob("*.py")
                   if not p.name.startswith("_") and p.name != "run_all.py")
    return [p for p in found if not only or p.stem in only]


def run(script: Path) -> list[dict]:
    """Run one script; return its measures (protocol lines first, else its adapter)."""
    started = time.monotonic()
    try:
        done = subprocess.run([sys.executable, str(script)], cwd=ROOT, capture_output=True,
                              text=True, timeout=TIMEOUT_SECONDS)
        out, err, code = done.stdout, done.stderr, done.returncode
    except subprocess.TimeoutExpired as exc:
        out, err, code = (exc.stdout or b"").decode(errors="replace"), "", "timeout"
    rows = [json.loads(line[len(PREFIX):]) for line in out.splitlines()
            if line.startswith(PREFIX)]
    if not rows and script.stem in ADAPTERS:
        rows = ADAPTERS[script.stem](out)
    seconds = time.monotonic() - started
    print(f"  {script.name}: {len(rows)} measure(s) in {seconds:.0f} s"
          + ("" if rows else f" - exit {code}, no readable measure"), file=sys.stderr)
    if not rows:
        tail = (err or out).strip().splitlines()[-3:]
        rows = [_row(f"{script.stem}: no measure (exit {code})", None, "", None, None, "",
                     None, " | ".join(tail)[:200])]
    return rows


def _fmt(value, unit: str = "") -> str:
    if value is None:
        return "-"
    text = f"{value:,.0f}" if abs(value) >= 100 else f"{value:.3g}"
    return f"{text} {unit}".strip()


def table(rows: list[dict]) -> str:
    header = ("measure", "value", "baseline", "ratio", "target", "met")
    lines = [(r["measure"], _fmt(r["value"], r["unit"]), _fmt(r["baseline"], r["unit"]),
              _fmt(r["ratio"]), r["target"],
              {True: "yes", False: "NO", None: "?"}[r["met"]]) for r in rows]
    widths = [max(len(str(x)) for x in column) for column in zip(header, *lines, strict=True)]
    fmt = " | ".join(f"{{:<{w}}}" for w in widths)
    out = [fmt.format(*header), "-+-".join("-" * w for w in widths)]
    out += [fmt.format(*line) for line in lines]
    return "\n".join(out)


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--only", nargs="*", help="script names without .py")
    parser.add_argument("--json", help="also write the rows to this JSON file")
    args = parser.parse_args()
    print("Running the benchmarks (each in its own process)...", file=sys.stderr)
    rows = [row for script in scripts(args.only) for row in run(script)]
    print(table(rows))
    for row in rows:
        if row["value"] is None:
            print(f"\n{row['measure']}: {row['note']}")
    if args.json:
        Path(args.json).write_text(json.dumps(rows, indent=1))
    return 0 if all(r["value"] is not None for r in rows) else 1


if __name__ == "__main__":
    sys.exit(main())
