#!/usr/bin/env bash
# Regenerates every committed reference fixture in tests/data/fixtures/ from the pinned PyPI
# reference libraries (tests/reference/requirements.txt). CI does not run this: the fixtures are
# committed. Run it after changing a generator, then review the diff of the CSVs.
set -euo pipefail
cd "$(dirname "$0")/../.."
python3 -c 'import sys; assert sys.version_info >= (3, 9), sys.version' 
for gen in tests/reference/gen_*.py; do
  echo "+ python3 $gen"
  python3 "$gen"
done
