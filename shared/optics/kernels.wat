;; Hand-written WebAssembly SIMD kernels of the optics engine, run on the memory of the FFT backend
;; (fft.ts) so they work in place on an FFT plan's buffer. Assembled by `npx tsx scripts/build-kernels.ts`
;; into kernels-wasm.ts (tests/unit/kernels.test.ts checks the two agree).
(module
  (import "env" "memory" (memory 1))

  ;; Device-plane modulus constraint of phase retrieval with one amplitude a for every cell: each complex
  ;; float32 value (re, im) at p … p + 8·count becomes a·(re, im)/|(re, im)|, or (a, 0) where it is zero.
  ;; Two complex values per 128-bit vector; count must be even.
  (func (export "normalizeUniform") (param $p i32) (param $count i32) (param $a f32)
    (local $end i32) (local $v v128) (local $m v128) (local $amplitude v128) (local $fallback v128)
    (local.set $end (i32.add (local.get $p) (i32.shl (local.get $count) (i32.const 3))))
    (local.set $amplitude (f32x4.splat (local.get $a)))
    (local.set $fallback
      (f32x4.replace_lane 2 (f32x4.replace_lane 0 (v128.const f32x4 0 0 0 0) (local.get $a)) (local.get $a)))
    (block $done
      (loop $next
        (br_if $done (i32.ge_u (local.get $p) (local.get $end)))
        (local.set $v (v128.load (local.get $p)))
        (local.set $m (f32x4.mul (local.get $v) (local.get $v)))
        ;; (re0² + im0², same, re1² + im1², same)
        (local.set $m
          (f32x4.add (local.get $m)
            (i8x16.shuffle 4 5 6 7 0 1 2 3 12 13 14 15 8 9 10 11 (local.get $m) (local.get $m))))
        (v128.store (local.get $p)
          (v128.bitselect
            (local.get $fallback)
            (f32x4.mul (local.get $v) (f32x4.div (local.get $amplitude) (f32x4.sqrt (local.get $m))))
            (f32x4.eq (local.get $m) (v128.const f32x4 0 0 0 0))))
        (local.set $p (i32.add (local.get $p) (i32.const 16)))
        (br $next))))
)
