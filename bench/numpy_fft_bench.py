#!/usr/bin/env python3
"""Reference timings for bench/fft-bench.ts: numpy complex128 and scipy.fft complex64 (workers=1).

Usage: python3 bench/numpy_fft_bench.py 256 512 1024 2048
Prints one JSON object: {"numpy": ..., "scipy": ..., "sizes": {"N": {numpy_fft_ms, numpy_gs_ms, scipy_fft_ms,
scipy_gs_ms}}}. Median of several runs; buffers allocated once per size and reused where the API allows
(numpy ≥ 2 accepts out=; scipy.fft runs with overwrite_x=True).
GS iteration = forward FFT, amplitude swap (target amplitude, keep phase), inverse FFT, phase-only constraint.
"""
import json
import sys
import time

import numpy as np
import scipy
import scipy.fft


def median_ms(fn, reps):
    fn()
    times = []
    for _ in range(reps):
        t0 = time.perf_counter()
        fn()
        times.append((time.perf_counter() - t0) * 1e3)
    times.sort()
    return times[len(times) // 2]


def reps_for(n):
    return {256: 20, 512: 10, 1024: 6}.get(n, 3)


def bench(n):
    rng = np.random.default_rng(n)
    reps = reps_for(n)
    target = rng.random((n, n))
    result = {}

    # numpy complex128, buffers reused via out=
    g = np.exp(2j * np.pi * rng.random((n, n)))
    spectrum = np.empty_like(g)
    magnitude = np.empty((n, n))
    result["numpy_fft_ms"] = median_ms(lambda: np.fft.fft2(g, out=spectrum), reps)

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

    result["numpy_gs_ms"] = median_ms(numpy_gs, reps)

    # scipy.fft complex64, one worker
    g32 = np.exp(2j * np.pi * rng.random((n, n))).astype(np.complex64)
    target32 = target.astype(np.float32)
    magnitude32 = np.empty((n, n), dtype=np.float32)
    work = g32.copy()
    result["scipy_fft_ms"] = median_ms(lambda: scipy.fft.fft2(work, workers=1, overwrite_x=True), reps)
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

    result["scipy_gs_ms"] = median_ms(scipy_gs, reps)
    return result


def main():
    sizes = [int(a) for a in sys.argv[1:]] or [256, 512, 1024, 2048]
    out = {"numpy": np.__version__, "scipy": scipy.__version__, "sizes": {str(n): bench(n) for n in sizes}}
    print(json.dumps(out))


if __name__ == "__main__":
    main()
