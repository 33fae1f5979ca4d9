#!/usr/bin/env python3
"""Files a large export into a saved sheaf model with Dask distributed, shard by shard.

The recipe:
  1. makes an invented export (CSV: id, subject, body) of --rows rows: maintenance
     requests from the residents of a seaside housing cooperative (seeded, so the
     same arguments give the same file);
  2. fits a model on a sample (the first --sample rows) with `sheaf group`, on
     one machine;
  3. cuts the export into --shards CSV shards (each with the header);
  4. starts a Dask LocalCluster with --workers worker processes (or connects to
     a running scheduler with --scheduler tcp://host:8786) and maps
     `sheaf assign - --stream jsonl` over the shards: each task gets the shard's
     bytes and the model's bytes, so the workers need the sheaf command but no
     shared disk;
  5. gathers the rows in shard order and compares them byte for byte with one
     `sheaf assign --stream jsonl` over the whole export on this machine.

Exit code 0 when the bytes are equal, 1 when they differ, 2 on bad usage.

    python3 examples/dask/assign_shards.py                 # 200,000 rows, 2 workers
    python3 examples/dask/assign_shards.py --rows 20000    # smaller, as the test runs it
    python3 examples/dask/assign_shards.py --scheduler tcp://10.0.0.5:8786 --sheaf sheaf

Needs Python 3 with dask.distributed (Debian: apt-get install python3-distributed)
and Node 20 with sheaf built (`npm run build`) or installed (`--sheaf sheaf`).
"""
import argparse
import csv
import os
import random
import shlex
import subprocess
import sys
import tempfile
import time

HERE = os.path.dirname(os.path.abspath(__file__))
REPO = os.path.dirname(os.path.dirname(HERE))

# Invented themes of the cooperative's requests: (subject words, body words).
THEMES = [
    ("boiler heating radiator", "boiler radiator heating cold pressure thermostat bleed valve warm hot water flat"),
    ("laundry washer dryer", "washing machine dryer laundry room coin drum door spin cycle soap flood"),
    ("bike shed lock", "bicycle shed lock key rack chain stolen gate padlock code storage"),
    ("roof gutter leak", "roof gutter leak rain drip ceiling stain tile attic storm downpipe moss"),
    ("garden hedge mowing", "garden hedge lawn mowing trim bench flowerbed compost weeds path gravel"),
    ("lift elevator stuck", "lift elevator stuck floor button door alarm engineer stairs wheelchair"),
    ("parking permit car", "parking permit car space visitor bay tow sticker barrier gate van"),
    ("noise neighbour party", "noise neighbour music party night dog barking drilling weekend quiet hours"),
    ("rent payment invoice", "rent payment invoice charge direct debit balance refund service fee statement"),
    ("pest mice damp", "mice droppings pest damp mould bathroom window condensation trap smell kitchen"),
    ("wifi internet router", "wifi internet router signal slow outage cable modem password connection"),
    ("intercom door entry", "intercom buzzer entry door fob front lobby visitor camera ring panel"),
]
FILLER = "please the a could you someone have has been since last week again our my we it is not and when".split()


def generate_export(path, rows, seed):
    """Writes the invented export: rows of id, subject, body (seeded)."""
    rng = random.Random(seed)
    themes = [(s.split(), b.split()) for s, b in THEMES]
    with open(path, "w", newline="", encoding="utf-8") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["id", "subject", "body"])
        for i in range(1, rows + 1):
            subject_words, body_words = themes[rng.randrange(len(themes))]
            other = themes[rng.randrange(len(themes))][1]
            n = rng.randint(8, 30)
            words = []
            for _ in range(n):
                u = rng.random()
                words.append(rng.choice(body_words) if u < 0.55 else rng.choice(other) if u < 0.65 else rng.choice(FILLER))
            subject = " ".join(rng.sample(subject_words, 2))
            w.writerow([f"R{i:07d}", subject, " ".join(words)])


def split_export(path, shards, folder):
    """Cuts the export into `shards` CSV files of consecutive rows, each with the header."""
    with open(path, newline="", encoding="utf-8") as f:
        rows = list(csv.reader(f))
    header, body = rows[0], rows[1:]
    size = -(-len(body) // shards)
    paths = []
    for s in range(shards):
        part = body[s * size:(s + 1) * size]
        if not part:
            break
        p = os.path.join(folder, f"shard-{s:04d}.csv")
        with open(p, "w", newline="", encoding="utf-8") as out:
            w = csv.writer(out, lineterminator="\n")
            w.writerow(header)
            w.writerows(part)
        paths.append(p)
    return paths


def assign_shard(shard_bytes, model_bytes, sheaf, columns):
    """The map step, run on a worker: `sheaf assign - --stream jsonl` over one shard's bytes."""
    import os
    import subprocess
    import tempfile

    with tempfile.TemporaryDirectory(prefix="sheaf-shard-") as d:
        model = os.path.join(d, "model.json")
        with open(model, "wb") as f:
            f.write(model_bytes)
        cmd = sheaf + ["assign", "-", "--model", model, "--format", "csv", *columns, "--stream", "jsonl", "--quiet"]
        done = subprocess.run(cmd, input=shard_bytes, stdout=subprocess.PIPE, stderr=subprocess.PIPE, cwd=d, check=False)
    if done.returncode != 0:
        raise RuntimeError(f"sheaf assign failed ({done.returncode}): {done.stderr.decode('utf-8', 'replace').strip()}")
    return done.stdout


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--rows", type=int, default=200_000, help="rows in the generated export (default 200000)")
    ap.add_argument("--sample", type=int, default=5_000, help="rows the model is fitted on (default 5000)")
    ap.add_argument("--groups", type=int, default=12, help="groups of the model (default 12)")
    ap.add_argument("--shards", type=int, default=8, help="shards the export is cut into (default 8)")
    ap.add_argument("--workers", type=int, default=2, help="LocalCluster worker processes (default 2)")
    ap.add_argument("--scheduler", default=None, help="address of a running Dask scheduler (default: start a LocalCluster)")
    ap.add_argument("--sheaf", default=f"node {shlex.quote(os.path.join(REPO, 'dist', 'cli', 'main.js'))}", help="the sheaf command (default: this checkout's dist)")
    ap.add_argument("--seed", type=int, default=7, help="seed of the generated export (default 7)")
    ap.add_argument("--work", default=None, help="folder for the export, shards and model (default: a temporary folder)")
    args = ap.parse_args()
    if args.rows < 1 or args.sample < 1 or args.shards < 1 or args.workers < 1:
        ap.error("--rows, --sample, --shards and --workers must be at least 1")

    try:
        import dask.distributed  # noqa: F401
    except ImportError:
        print("this recipe needs dask.distributed: apt-get install python3-distributed (Debian) or pip install distributed", file=sys.stderr)
        return 2
    sheaf = shlex.split(args.sheaf)
    columns = ["--text", "subject,body", "--id", "id"]
    if args.work:
        os.makedirs(args.work, exist_ok=True)
        return run(args, sheaf, columns, args.work)
    with tempfile.TemporaryDirectory(prefix="sheaf-dask-") as work:
        return run(args, sheaf, columns, work)


def run(args, sheaf, columns, work):
    """Steps 1-5 in the folder `work`."""
    from dask.distributed import Client, LocalCluster

    t0 = time.time()
    export = os.path.join(work, "requests.csv")
    generate_export(export, args.rows, args.seed)
    sample = os.path.join(work, "sample.csv")
    with open(export, encoding="utf-8") as f, open(sample, "w", encoding="utf-8") as out:
        for i, line in enumerate(f):
            if i > args.sample:
                break
            out.write(line)
    fit = os.path.join(work, "fit")
    subprocess.run(sheaf + ["group", sample, *columns, "--groups", str(args.groups), "--clean", "tickets",
                            "--no-report", "--no-duplicates", "--out", fit, "--quiet"], check=True, stdout=subprocess.DEVNULL)
    model = os.path.join(fit, "model.json")
    shard_folder = os.path.join(work, "shards")
    os.makedirs(shard_folder, exist_ok=True)
    shards = split_export(export, args.shards, shard_folder)
    print(f"export: {args.rows} rows in {len(shards)} shards; model fitted on {args.sample} rows ({time.time() - t0:.1f} s)", flush=True)

    t1 = time.time()
    with open(model, "rb") as f:
        model_bytes = f.read()
    if args.scheduler:
        client = Client(args.scheduler)
        cluster = None
    else:
        cluster = LocalCluster(n_workers=args.workers, threads_per_worker=1, processes=True, dashboard_address=None)
        client = Client(cluster)
    try:
        model_future = client.scatter(model_bytes, broadcast=True)
        futures = []
        for p in shards:
            with open(p, "rb") as f:
                shard_future = client.scatter(f.read())  # the shard's bytes go to a worker once, not through the scheduler
            futures.append(client.submit(assign_shard, shard_future, model_future, sheaf, columns, pure=False))
        distributed = b"".join(client.gather(futures))
    finally:
        client.close()
        if cluster is not None:
            cluster.close()
    t2 = time.time()
    one = subprocess.run(sheaf + ["assign", export, "--model", model, *columns, "--stream", "jsonl", "--quiet"],
                         stdout=subprocess.PIPE, check=True).stdout
    t3 = time.time()
    lines = distributed.count(b"\n")
    one_lines = one.count(b"\n")
    print(f"dask: {lines} rows from {len(shards)} shards ({t2 - t1:.1f} s); one machine: {one_lines} rows ({t3 - t2:.1f} s)")
    if distributed == one and lines == args.rows:
        print("identical: the gathered rows equal the one-machine run byte for byte")
        return 0
    print("DIFFERENT: the gathered rows do not equal the one-machine run", file=sys.stderr)
    return 1


if __name__ == "__main__":
    sys.exit(main())
