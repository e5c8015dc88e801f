"""The BLAS floor of a permutation run: the time an optimised BLAS takes for the
(K·c × S) by (S × E) double-precision matrix product that holds every dot
product the permutations need (2·S·E·c·K floating-point operations).

    python3 bench/floor.py --subjects 200 --edges 79800 --rows 15000

prints one JSON object: seconds for the whole product (computed in blocks of
rows, one after another, into a reused output block, so the output never needs
K·c × E doubles of memory; the fastest of --repeats runs, with its CPU time over
all threads), GFLOP/s, and which BLAS and core type numpy used.
The operands hold standard normal values from a seeded generator.

bench/run.ts runs this with OPENBLAS_CORETYPE=SkylakeX and without
OPENBLAS_L2_SIZE when /proc/cpuinfo lists avx512f: OpenBLAS's runtime
detection does not pick its AVX-512 kernel on every such CPU.
"""
import argparse
import ctypes
import glob
import json
import os
import time

import numpy as np


def blas_core_name():
    """The OpenBLAS core type in use (the library's own get_corename), or None."""
    candidates = glob.glob(os.path.join(os.path.dirname(np.__file__) + ".libs", "*openblas*.so*"))
    for path in candidates:
        try:
            lib = ctypes.CDLL(path)
        except OSError:
            continue
        for symbol in ("scipy_openblas_get_corename64_", "scipy_openblas_get_corename", "openblas_get_corename64_", "openblas_get_corename"):
            function = getattr(lib, symbol, None)
            if function is not None:
                function.restype = ctypes.c_char_p
                return function().decode()
    try:
        from threadpoolctl import threadpool_info

        for info in threadpool_info():
            if info.get("internal_api") == "openblas":
                return info.get("architecture")
    except ImportError:
        pass
    return None


def blas_library():
    try:
        config = np.show_config(mode="dicts")
        blas = config["Build Dependencies"]["blas"]
        return f"{blas.get('name')} {blas.get('version')}"
    except Exception:  # older numpy: no dict mode
        return "unknown"


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--subjects", type=int, required=True)
    parser.add_argument("--edges", type=int, required=True)
    parser.add_argument("--rows", type=int, required=True, help="K·c: permutations times vectors per permutation")
    parser.add_argument("--block-rows", type=int, default=0, help="rows per block (default: about 256 MB of output)")
    parser.add_argument("--repeats", type=int, default=3, help="whole products timed; the fastest is reported")
    args = parser.parse_args()
    S, E, rows = args.subjects, args.edges, args.rows
    block = args.block_rows or max(64, min(rows, (256 * 2**20) // (8 * E)))
    generator = np.random.default_rng(20260101)
    weights = generator.standard_normal((block, S))
    residuals = generator.standard_normal((S, E))
    out = np.empty((block, E))
    np.matmul(weights[: min(block, 64)], residuals, out=out[: min(block, 64)])  # warm up threads and pages
    best = (float("inf"), float("inf"))
    for _ in range(max(1, args.repeats)):
        start, cpu_start = time.perf_counter(), time.process_time()
        done = 0
        while done < rows:
            n = min(block, rows - done)
            np.matmul(weights[:n], residuals, out=out[:n])
            done += n
        best = min(best, (time.perf_counter() - start, time.process_time() - cpu_start))
    seconds, cpu_seconds = best
    flops = 2.0 * S * E * rows
    print(
        json.dumps(
            {
                "seconds": seconds,
                "cpuSeconds": cpu_seconds,
                "gflops": flops / seconds / 1e9,
                "repeats": args.repeats,
                "rows": rows,
                "blockRows": block,
                "blas": blas_library(),
                "coreType": blas_core_name(),
                "numpy": np.__version__,
                "OPENBLAS_CORETYPE": os.environ.get("OPENBLAS_CORETYPE"),
            }
        )
    )


if __name__ == "__main__":
    main()
