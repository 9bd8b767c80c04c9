#!/bin/sh
# Run the mutation jobs one after the other, niced, one worker (see DEVELOPERS.md).
# usage: tools/mutate_queue.sh planner/catalogs/wds.py planner/catalogs/orb6.py ...
# Each module's log goes to mutation/<name>.log, its results to mutation/<name>.json.
cd "$(dirname "$0")/.." || exit 1
mkdir -p mutation
for m in "$@"; do
    name=$(echo "$m" | sed 's|^planner/||; s|\.py$||; s|/|.|g')
    nice -n 19 python tools/mutate.py $m ${MUTATE_ARGS:-} > "mutation/$name.log" 2>&1
done
