#!/usr/bin/env bash
# Peak memory of `sheaf assign --stream jsonl` at 100k and 1M generated rows (bench/generate.mjs, seed 7),
# with a model fitted on the first 10,000 rows (20 groups). Each size is run twice: with Node's default heap
# sizing and with the old space capped at 96 MB (flat memory means the capped run finishes and peaks alike at
# both sizes). Needs GNU time (/usr/bin/time -v). Usage: bash bench/stream-memory.sh [out-folder]
set -euo pipefail
cd "$(dirname "$0")/.."
OUT="${1:-bench/out}"
SHEAF="node dist/cli/main.js"
node bench/generate.mjs --sizes 100k,1m --seed 7 --out "$OUT"
head -10001 "$OUT/synth-100k.csv" > "$OUT/sample-10k.csv"
[ -f "$OUT/fit10k/model.json" ] || $SHEAF group "$OUT/sample-10k.csv" --text text --id id --groups 20 --no-report --no-duplicates --out "$OUT/fit10k" --quiet > /dev/null
for size in 100k 1m; do
  for heap in default 96; do
    opts=""; [ "$heap" = default ] || opts="--max-old-space-size=$heap"
    NODE_OPTIONS="$opts" /usr/bin/time -v $SHEAF assign "$OUT/synth-$size.csv" --model "$OUT/fit10k/model.json" --text text --id id --stream jsonl --quiet \
      2> "$OUT/stream-time-$size-$heap.txt" | wc -l > "$OUT/stream-rows-$size-$heap.txt"
    echo "$size rows, heap $heap: $(cat "$OUT/stream-rows-$size-$heap.txt") rows out, peak RSS $(grep 'Maximum resident' "$OUT/stream-time-$size-$heap.txt" | awk '{print $NF}') KB"
  done
done
