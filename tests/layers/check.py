#!/usr/bin/env python3
"""The modules of engine/ in the order of the data path, lowest first: a module includes only
modules below it (and itself). Run by ctest; prints every include that points up.

Usage: check.py ENGINE_DIR
"""
import pathlib
import re
import sys

# The data path (scenario -> sampling -> flight -> study pipeline -> footprint -> store -> report
# -> app) as dependencies, lowest first: the flight's physics under the terrain read from rasters
# (GDAL) and the scenario that describes both, the footprint statistics (on rows, knowing nothing of flights) under the pipeline that
# computes them, the processes of a job (cluster) under the command line.
LAYERS = ["core", "medium", "flight", "terrain", "scenario", "sampling", "study", "footprint",
          "pipeline", "store", "report", "cluster", "app"]

def main() -> int:
    engine = pathlib.Path(sys.argv[1])
    rank = {name: i for i, name in enumerate(LAYERS)}
    found = sorted(p.name for p in engine.iterdir() if p.is_dir())
    unknown = [m for m in found if m not in rank]
    problems = [f"engine/{m}: a module not in the layer list of tests/layers/check.py" for m in unknown]
    include = re.compile(r'^\s*#\s*include\s+"([a-z_]+)/[^"]+"', re.M)
    for module in found:
        if module not in rank:
            continue
        for source in sorted((engine / module).rglob("*")):
            if source.suffix not in (".hpp", ".cpp", ".in"):
                continue
            for target in include.findall(source.read_text()):
                if target in rank and rank[target] > rank[module]:
                    problems.append(f"{source.relative_to(engine.parent)}: includes {target}/, "
                                    f"a module above {module}/")
    for p in problems:
        print(p)
    print(f"{len(found)} modules, {len(problems)} includes that point up")
    return 1 if problems else 0

if __name__ == "__main__":
    sys.exit(main())
