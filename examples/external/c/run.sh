#!/bin/sh
# Builds and runs the C tile solver for one rungs level.
#
#   run.sh DATA_DIR N OUT_DIR [TAG ...] [-- SOLVER OPTIONS ...]
#
# DATA_DIR holds the rungs_data.h that rungs writes for the study ({data}); N is the level's cells per unit length
# ({n}); OUT_DIR is the level folder ({out}), where the binary and solution.vtk go. TAGs (left, right, bottom,
# top) are the Dirichlet edges, all four when none is given; the others get the Neumann flux. Words after "--"
# go to the solver unchanged, e.g. "-- --x 0 2 --y 0 0.5" for a rectangle other than the unit square.
# The solver is compiled into each level's own folder (about 0.1 s), so parallel levels never share a binary.
set -eu

me=run.sh
if [ "$#" -lt 3 ]; then
    echo "$me: usage: run.sh DATA_DIR N OUT_DIR [left|right|bottom|top ...] [-- solver options]" >&2
    exit 2
fi
data=$1
n=$2
out=$3
shift 3

if ! command -v cc >/dev/null 2>&1; then
    echo "$me: no C compiler: 'cc' is not on PATH (on Debian: apt-get install gcc)" >&2
    exit 127
fi
if [ ! -f "$data/rungs_data.h" ]; then
    echo "$me: $data/rungs_data.h not found; DATA_DIR must be the study's data folder ({data})" >&2
    exit 2
fi
if [ ! -d "$out" ]; then
    echo "$me: output folder $out does not exist" >&2
    exit 2
fi

case $0 in
    */*) here=${0%/*} ;;
    *) here=. ;;
esac

tags=
while [ "$#" -gt 0 ] && [ "$1" != "--" ]; do
    tags=${tags:+$tags,}$1
    shift
done
if [ "$#" -gt 0 ]; then shift; fi

cc -O2 -std=c99 -I"$data" -o "$out/tile_p1" "$here/tile_p1.c" -lm
if [ -n "$tags" ]; then
    exec "$out/tile_p1" --n "$n" --out "$out" --dirichlet "$tags" "$@"
fi
exec "$out/tile_p1" --n "$n" --out "$out" "$@"
