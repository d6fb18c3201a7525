"""The command line both reference scripts share: `--out DIR` writes the fixtures,
`--compare A B` reports every difference between two fixture folders (exit 1 if any)."""

import argparse
from pathlib import Path


def main(doc, generate, compare):
    parser = argparse.ArgumentParser(description=doc.split("\n\n")[0])
    parser.add_argument("--out", type=Path, help="write the fixtures into this folder")
    parser.add_argument("--compare", type=Path, nargs=2, metavar=("A", "B"))
    args = parser.parse_args()
    if args.out:
        generate(args.out)
    if args.compare:
        problems = compare(*args.compare)
        for p in problems:
            print(p)
        if problems:
            print(f"{len(problems)} difference(s) between the fixtures")
            return 1
        print("fixtures agree")
    if not args.out and not args.compare:
        parser.print_help()
        return 2
    return 0
