#!/usr/bin/env python3
"""Reference timings for bench/fft-bench.ts: numpy complex128 and scipy.fft complex64 (workers=1).

Usage: python3 bench/numpy_fft_bench.py 512 1024 2048 4096
Prints one JSON object: {"numpy": ..., "scipy": ..., "sizes": {"N": {numpy_fft_ms, numpy_gs_ms, scipy_fft_ms,
scipy_gs_ms, and the same keys ending in _cpu_ms}}}. Median of several runs: wall time, and the calling
thread's CPU time (time.thread_time; every call here runs on that one thread), which a shared machine's load
disturbs far less. Buffers allocated once per size and reused where the API allows (numpy ≥ 2 accepts out=;
scipy.fft runs with overwrite_x=True).
GS iteration = forward FFT, amplitude swap (target amplitude, keep phase), inverse FFT, phase-only constraint.
"""
import json
import sys
import time

import numpy as np
import scipy
import scipy.fft


def median_ms(fn, reps):
    """(median wall ms, median thread CPU ms) of reps calls after one warm-up call."""
    fn()
    wall = []
    cpu = []
    for _ in range(reps):
        t0 = time.perf_counter()
        c0 = time.thread_time()
        fn()
        cpu.append((time.thread_time() - c0) * 1e3)
        wall.append((time.perf_counter() - t0) * 1e3)
    wall.sort()
    cpu.sort()
    return wall[len(wall) // 2], cpu[len(cpu) // 2]


def reps_for(n):
    return {256: 20, 512: 10, 1024: 7, 2048: 5}.get(n, 3)


def record(result, key, fn, reps):
    result[key + "_ms"], result[key + "_cpu_ms"] = median_ms(fn, reps)


def bench(n):
    rng = np.random.default_rng(n)
    reps = reps_for(n)
    target = rng.random((n, n))
    result = {}

    # numpy complex128, buffers reused via out=
    g = np.exp(2j * np.pi * rng.random((n, n)))
    spectrum = np.empty_like(g)
    magnitude = np.empty((n, n))
    record(result, "numpy_fft", lambda: np.fft.fft2(g, out=spectrum), reps)

    def numpy_gs():
        np.fft.fft2(g, out=spectrum)
        np.abs(spectrum, out=magnitude)
        np.maximum(magnitude, 1e-30, out=magnitude)
        np.divide(target, magnitude, out=magnitude)
        spectrum.__imul__(magnitude)
        np.fft.ifft2(spectrum, out=g)
        np.abs(g, out=magnitude)
        np.maximum(magnitude, 1e-30, out=magnitude)
        np.reciprocal(magnitude, out=magnitude)
        g.__imul__(magnitude)

    record(result, "numpy_gs", numpy_gs, reps)

    # scipy.fft complex64, one worker
    g32 = np.exp(2j * np.pi * rng.random((n, n))).astype(np.complex64)
    target32 = target.astype(np.float32)
    magnitude32 = np.empty((n, n), dtype=np.float32)
    work = g32.copy()
    record(result, "scipy_fft", lambda: scipy.fft.fft2(work, workers=1, overwrite_x=True), reps)
    state = {"g": g32}

    def scipy_gs():
        spec = scipy.fft.fft2(state["g"], workers=1, overwrite_x=True)
        np.abs(spec, out=magnitude32)
        np.maximum(magnitude32, 1e-30, out=magnitude32)
        np.divide(target32, magnitude32, out=magnitude32)
        spec *= magnitude32
        field = scipy.fft.ifft2(spec, workers=1, overwrite_x=True)
        np.abs(field, out=magnitude32)
        np.maximum(magnitude32, 1e-30, out=magnitude32)
        np.reciprocal(magnitude32, out=magnitude32)
        field *= magnitude32
        state["g"] = field

    record(result, "scipy_gs", scipy_gs, reps)
    return result


def main():
    sizes = [int(a) for a in sys.argv[1:]] or [512, 1024, 2048, 4096]
    out = {"numpy": np.__version__, "scipy": scipy.__version__, "sizes": {str(n): bench(n) for n in sizes}}
    print(json.dumps(out))


if __name__ == "__main__":
    main()
