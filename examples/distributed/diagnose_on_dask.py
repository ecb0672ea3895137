#!/usr/bin/python3
"""Sharded plumb diagnose on Dask's distributed scheduler.

One Dask task per shard runs the plumb binary on its shard of the groups
(plumb diagnose --shard K/N) and writes a Parquet part to shared storage;
one last task runs plumb combine over the parts, which computes the q-values
and the rank across all groups. The result equals one plumb diagnose over
the whole source, row for row.

On a cluster (a scheduler and workers already running; README.md):

    python3 diagnose_on_dask.py --scheduler tcp://10.0.0.1:8786 \\
        --plumb /opt/plumb/plumb --source '/shared/sales/*.parquet' \\
        --by store,sku --at day --value units --shards 32 \\
        --parts /shared/plumb-parts --out /shared/ranked.parquet

On this machine only (a LocalCluster of worker processes):

    python3 diagnose_on_dask.py --local-workers 2 --plumb ./plumb ...

Needs Debian's python3-distributed (Dask 2022.12) on every machine, the
plumb binary at the same path on every worker, and the source, the parts
directory and the output on storage every worker sees at the same path.
"""
import argparse
import contextlib
import glob
import os
import subprocess
import sys

from dask.distributed import Client, LocalCluster


def part_name(shard, shards):
    return f"part-{shard:05d}-of-{shards:05d}.parquet"


def diagnose_shard(plumb, source, options, shard, shards, parts):
    """Runs plumb diagnose on one shard and returns the part's path.

    The part is written in parts/.incoming and then renamed into parts, so
    that a task that fails or is retried never leaves half a part where
    plumb combine looks (a rename is atomic on one POSIX file system).
    """
    incoming = os.path.join(parts, ".incoming")
    os.makedirs(incoming, exist_ok=True)
    name = part_name(shard, shards)
    tmp = os.path.join(incoming, name)
    command = [plumb, "diagnose", source, *options, "--shard", f"{shard}/{shards}", "--out", tmp, "--quiet"]
    run = subprocess.run(command, capture_output=True, text=True)
    if run.returncode != 0:
        raise RuntimeError(f"shard {shard} of {shards}: {run.stderr.strip()}")
    final = os.path.join(parts, name)
    os.replace(tmp, final)
    return final


def combine(plumb, parts, out, top, memory_limit):
    """Runs plumb combine over every part and returns what it printed."""
    command = [plumb, "combine", os.path.join(parts, "*.parquet"), "--out", out, "--top", str(top)]
    if memory_limit:
        command += ["--memory-limit", memory_limit]
    run = subprocess.run(command, capture_output=True, text=True)
    if run.returncode != 0:
        raise RuntimeError(f"combine: {run.stderr.strip()}")
    return run.stdout


def arguments(argv):
    p = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    where = p.add_mutually_exclusive_group(required=True)
    where.add_argument("--scheduler", help="address of a running Dask scheduler, such as tcp://10.0.0.1:8786")
    where.add_argument("--local-workers", type=int, help="start a LocalCluster of this many worker processes instead")
    p.add_argument("--plumb", required=True, help="path of the plumb binary on every worker")
    p.add_argument("--source", required=True, help="what plumb diagnose reads: a Parquet or CSV file or glob every worker sees")
    p.add_argument("--by", required=True, help="group columns, comma-separated")
    p.add_argument("--at", required=True, help="time column")
    p.add_argument("--value", required=True, help="value column")
    p.add_argument("--period", type=int, default=0, help="seasonal period (0: detect)")
    p.add_argument("--alpha", default="0.05", help="level of the verdict's tests")
    p.add_argument("--fill", default="none", help="none, linear or previous")
    p.add_argument("--memory-limit", default="", help="DuckDB memory_limit of each plumb process, such as 4GB")
    p.add_argument("--shards", type=int, required=True, help="number of shards (tasks)")
    p.add_argument("--parts", required=True, help="directory for the parts, on shared storage")
    p.add_argument("--out", required=True, help="the combined result: a .parquet, .csv or .json file")
    p.add_argument("--top", type=int, default=10, help="groups plumb combine prints")
    p.add_argument("--overwrite", action="store_true", help="remove the parts of an earlier run from --parts first")
    return p.parse_args(argv)


def main(argv):
    args = arguments(argv)
    if args.shards < 1:
        sys.exit("--shards must be at least 1")
    plumb = os.path.abspath(args.plumb) if os.path.exists(args.plumb) else args.plumb
    os.makedirs(args.parts, exist_ok=True)
    old = glob.glob(os.path.join(args.parts, "*.parquet"))
    if old and not args.overwrite:
        sys.exit(f"{args.parts} already holds {len(old)} Parquet files; remove them or pass --overwrite")
    for path in old:
        if os.path.basename(path).startswith("part-"):
            os.remove(path)
    options = ["--by", args.by, "--at", args.at, "--value", args.value,
               "--period", str(args.period), "--alpha", args.alpha, "--fill", args.fill]
    if args.memory_limit:
        options += ["--memory-limit", args.memory_limit]

    with contextlib.ExitStack() as stack:
        if args.scheduler:
            client = stack.enter_context(Client(args.scheduler))
        else:
            # One thread per worker: each task is a plumb process that uses
            # every core DuckDB is given.
            cluster = stack.enter_context(LocalCluster(n_workers=args.local_workers, threads_per_worker=1,
                                                       processes=True, dashboard_address=None))
            client = stack.enter_context(Client(cluster))
        tasks = [client.submit(diagnose_shard, plumb, args.source, options, k, args.shards, args.parts,
                               key=f"plumb-diagnose-{k}-of-{args.shards}", pure=False, retries=2)
                 for k in range(args.shards)]
        parts = client.gather(tasks)
        print(f"{len(parts)} parts written to {args.parts}", flush=True)
        done = client.submit(combine, plumb, args.parts, args.out, args.top, args.memory_limit,
                             key="plumb-combine", pure=False)
        print(done.result(), end="", flush=True)


if __name__ == "__main__":
    main(sys.argv[1:])
