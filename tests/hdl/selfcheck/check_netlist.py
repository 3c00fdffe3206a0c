#!/usr/bin/env python3
"""check_netlist.py: confirm that a Yosys JSON netlist (write_json) holds one flattened module
made only of simple gate cells, and print its cell counts.

Usage: check_netlist.py NETLIST.json TOP LABEL

The allowed cells are the ones `abc -g AND,NAND,OR,NOR,XOR,XNOR,MUX` maps to, plus the
inverters and buffers Yosys keeps around them (cell names per the Yosys JSON netlist
format, observed with Yosys 0.23). Exit status 1 names every problem found.
"""
import json
import sys
from collections import Counter

ALLOWED = {"$_AND_", "$_NAND_", "$_OR_", "$_NOR_", "$_XOR_", "$_XNOR_", "$_MUX_",
           "$_NOT_", "$_BUF_"}


def main():
    path, top, label = sys.argv[1:4]
    with open(path, encoding="utf-8") as f:
        netlist = json.load(f)
    problems = []
    modules = netlist.get("modules", {})
    if list(modules) != [top]:
        problems.append(f"expected exactly one module '{top}', found {sorted(modules)}")
    module = modules.get(top, {})
    counts = Counter(cell["type"] for cell in module.get("cells", {}).values())
    odd = sorted(t for t in counts if t not in ALLOWED)
    if odd:
        problems.append("cells other than simple gates: " + ", ".join(odd))
    if not counts:
        problems.append("no cells at all")
    summary = ", ".join(f"{t.strip('$_')} {n}" for t, n in sorted(counts.items()))
    ports = ",".join(module.get("ports", {}))
    status = "ok" if not problems else "PROBLEM: " + "; ".join(problems)
    print(f"NETLIST {label}: {sum(counts.values())} cells ({summary}); ports {ports}: {status}")
    return 1 if problems else 0


if __name__ == "__main__":
    sys.exit(main())
