;; Hand-written WebAssembly SIMD kernels of the optics engine, run on the memory of the FFT backend (fft.ts) so
;; they work in place on an FFT plan's buffer: every per-pixel step of a phase-retrieval iteration
;; (gerchberg-saxton.ts) and the plan's transposes and column copies. Assembled by
;; `npx tsx scripts/build-kernels.ts` into kernels-wasm.ts (tests/unit/kernels.test.ts checks the two agree and
;; compares each kernel with a scalar reference).
;;
;; Data: complex float32 values interleaved (re, im), two per 128-bit vector, four handled per step; pointers are
;; byte offsets into the backend's memory; counts are complex values, multiples of 4 unless a kernel says
;; otherwise. No helper functions inside the loops: the V8 of Node 20 does not inline WebAssembly calls, and a
;; call passing vectors costs as much as the work.
(module
  (import "env" "memory" (memory 1))

  ;; Device-plane modulus constraint of phase retrieval with one amplitude for every cell: each complex value
  ;; z at p … p + 8·count becomes amplitude·z/|z|, or (amplitude, 0) where z = 0.
  (func (export "normalizeUniform") (param $p i32) (param $count i32) (param $value f32)
    (local $end i32) (local $lo v128) (local $hi v128) (local $a v128) (local $b v128) (local $power v128)
    (local $amplitude v128) (local $s v128) (local $zero v128)
    (local.set $end (i32.add (local.get $p) (i32.shl (local.get $count) (i32.const 3))))
    (local.set $amplitude (f32x4.splat (local.get $value)))
    (block $done
      (loop $next
        (br_if $done (i32.ge_u (local.get $p) (local.get $end)))
        (local.set $lo (v128.load (local.get $p)))
        (local.set $hi (v128.load offset=16 (local.get $p)))
        (local.set $a (f32x4.mul (local.get $lo) (local.get $lo)))
        (local.set $b (f32x4.mul (local.get $hi) (local.get $hi)))
        ;; |z|² of the four values (re0² + im0², re1² + im1², re2² + im2², re3² + im3²)
        (local.set $power
          (f32x4.add
            (i8x16.shuffle 0 1 2 3 8 9 10 11 16 17 18 19 24 25 26 27 (local.get $a) (local.get $b))
            (i8x16.shuffle 4 5 6 7 12 13 14 15 20 21 22 23 28 29 30 31 (local.get $a) (local.get $b))))
        (local.set $s (f32x4.div (local.get $amplitude) (f32x4.sqrt (local.get $power))))
        (local.set $zero (f32x4.eq (local.get $power) (v128.const f32x4 0 0 0 0)))
        ;; z·s, or (amplitude, 0) where $zero
        (v128.store (local.get $p)
          (v128.bitselect
            (i8x16.shuffle 0 1 2 3 16 17 18 19 4 5 6 7 16 17 18 19 (local.get $amplitude) (v128.const i32x4 0 0 0 0))
            (f32x4.mul (local.get $lo) (i8x16.shuffle 0 1 2 3 0 1 2 3 4 5 6 7 4 5 6 7 (local.get $s) (local.get $s)))
            (i8x16.shuffle 0 1 2 3 0 1 2 3 4 5 6 7 4 5 6 7 (local.get $zero) (local.get $zero))))
        (v128.store offset=16 (local.get $p)
          (v128.bitselect
            (i8x16.shuffle 8 9 10 11 16 17 18 19 12 13 14 15 16 17 18 19 (local.get $amplitude) (v128.const i32x4 0 0 0 0))
            (f32x4.mul (local.get $hi) (i8x16.shuffle 8 9 10 11 8 9 10 11 12 13 14 15 12 13 14 15 (local.get $s) (local.get $s)))
            (i8x16.shuffle 8 9 10 11 8 9 10 11 12 13 14 15 12 13 14 15 (local.get $zero) (local.get $zero))))
        (local.set $p (i32.add (local.get $p) (i32.const 32)))
        (br $next))))

  ;; The same with an amplitude per cell: value i becomes a_i·z/|z|, or (a_i, 0) where z = 0; a_i is the
  ;; float32 at $amplitudes + 4·i.
  (func (export "normalize") (param $p i32) (param $count i32) (param $amplitudes i32)
    (local $end i32) (local $lo v128) (local $hi v128) (local $a v128) (local $b v128) (local $power v128)
    (local $amplitude v128) (local $s v128) (local $zero v128)
    (local.set $end (i32.add (local.get $p) (i32.shl (local.get $count) (i32.const 3))))
    (block $done
      (loop $next
        (br_if $done (i32.ge_u (local.get $p) (local.get $end)))
        (local.set $lo (v128.load (local.get $p)))
        (local.set $hi (v128.load offset=16 (local.get $p)))
        (local.set $a (f32x4.mul (local.get $lo) (local.get $lo)))
        (local.set $b (f32x4.mul (local.get $hi) (local.get $hi)))
        ;; |z|² of the four values (re0² + im0², re1² + im1², re2² + im2², re3² + im3²)
        (local.set $power
          (f32x4.add
            (i8x16.shuffle 0 1 2 3 8 9 10 11 16 17 18 19 24 25 26 27 (local.get $a) (local.get $b))
            (i8x16.shuffle 4 5 6 7 12 13 14 15 20 21 22 23 28 29 30 31 (local.get $a) (local.get $b))))
        (local.set $amplitude (v128.load (local.get $amplitudes)))
        (local.set $s (f32x4.div (local.get $amplitude) (f32x4.sqrt (local.get $power))))
        (local.set $zero (f32x4.eq (local.get $power) (v128.const f32x4 0 0 0 0)))
        ;; z·s, or (amplitude, 0) where $zero
        (v128.store (local.get $p)
          (v128.bitselect
            (i8x16.shuffle 0 1 2 3 16 17 18 19 4 5 6 7 16 17 18 19 (local.get $amplitude) (v128.const i32x4 0 0 0 0))
            (f32x4.mul (local.get $lo) (i8x16.shuffle 0 1 2 3 0 1 2 3 4 5 6 7 4 5 6 7 (local.get $s) (local.get $s)))
            (i8x16.shuffle 0 1 2 3 0 1 2 3 4 5 6 7 4 5 6 7 (local.get $zero) (local.get $zero))))
        (v128.store offset=16 (local.get $p)
          (v128.bitselect
            (i8x16.shuffle 8 9 10 11 16 17 18 19 12 13 14 15 16 17 18 19 (local.get $amplitude) (v128.const i32x4 0 0 0 0))
            (f32x4.mul (local.get $hi) (i8x16.shuffle 8 9 10 11 8 9 10 11 12 13 14 15 12 13 14 15 (local.get $s) (local.get $s)))
            (i8x16.shuffle 8 9 10 11 8 9 10 11 12 13 14 15 12 13 14 15 (local.get $zero) (local.get $zero))))
        (local.set $p (i32.add (local.get $p) (i32.const 32)))
        (local.set $amplitudes (i32.add (local.get $amplitudes) (i32.const 16)))
        (br $next))))

  ;; Image-plane modulus constraint of Gerchberg–Saxton, weighted GS and MRAF on `count` complex values G at p,
  ;; with the error sums of the iteration. Code c_i (float32 at $codes + 4·i): c ≥ 0 a pixel of the signal window
  ;; with target amplitude T = c; c = −1 the noise region (rest of the propagating region); any other c < 0 a
  ;; pixel whose field is dropped (evanescent). Outside the window T counts as 0.
  ;;   signal:  G ← A·G/|G|, or (A, 0) where G = 0, with A = mix·T, or A = w·T with weights;
  ;;   noise:   G ← keep·G;   dropped: G ← 0.
  ;; Weights ($weights ≠ 0, float32 per value): where T > 0 and |G| > 0 ("bright"), w ← w·meanRatio/(|G|/T) when
  ;; meanRatio > 0. Sums added (float64) to the slots at $acc + 8·k: 0 Σ(|G| − T)² over every value, 1 Σ_win |G|·T,
  ;; 2 Σ_win |G|², 3 Σ_win T², 4 Σ_bright |G|/T, 5 number of bright values, 6 Σ |G|² over every value. Partial
  ;; sums are kept in float32 lanes over blocks of 32 values, then added in float64.
  (func (export "imagePlane") (param $p i32) (param $count i32) (param $codes i32) (param $weights i32)
    (param $mix f32) (param $keep f32) (param $meanRatio f32) (param $acc i32)
    (local $end i32) (local $blockEnd i32)
    (local $lo v128) (local $hi v128) (local $a v128) (local $b v128) (local $power v128) (local $magnitude v128)
    (local $code v128) (local $inside v128) (local $target v128) (local $difference v128) (local $amplitude v128)
    (local $bright v128) (local $inverse v128) (local $weight v128) (local $s v128) (local $zero v128)
    (local $mixes v128) (local $keeps v128) (local $means v128) (local $update v128) (local $d v128)
    (local $fienup v128) (local $gt v128) (local $gg v128) (local $tt v128) (local $ratios v128)
    (local $brights v128) (local $computed v128)
    (local.set $end (i32.add (local.get $p) (i32.shl (local.get $count) (i32.const 3))))
    (local.set $mixes (f32x4.splat (local.get $mix)))
    (local.set $keeps (f32x4.splat (local.get $keep)))
    (local.set $means (f32x4.splat (local.get $meanRatio)))
    (local.set $update (i32x4.splat (i32.sub (i32.const 0) (f32.gt (local.get $meanRatio) (f32.const 0)))))
    (block $done
      (loop $block
        (br_if $done (i32.ge_u (local.get $p) (local.get $end)))
        (local.set $blockEnd (i32.add (local.get $p) (i32.const 256)))
        (if (i32.gt_u (local.get $blockEnd) (local.get $end)) (then (local.set $blockEnd (local.get $end))))
        (local.set $fienup (v128.const i32x4 0 0 0 0))
        (local.set $gt (v128.const i32x4 0 0 0 0))
        (local.set $gg (v128.const i32x4 0 0 0 0))
        (local.set $tt (v128.const i32x4 0 0 0 0))
        (local.set $ratios (v128.const i32x4 0 0 0 0))
        (local.set $brights (v128.const i32x4 0 0 0 0))
        (local.set $computed (v128.const i32x4 0 0 0 0))
        (loop $next
          (local.set $lo (v128.load (local.get $p)))
          (local.set $hi (v128.load offset=16 (local.get $p)))
          (local.set $a (f32x4.mul (local.get $lo) (local.get $lo)))
          (local.set $b (f32x4.mul (local.get $hi) (local.get $hi)))
          ;; |z|² of the four values (re0² + im0², re1² + im1², re2² + im2², re3² + im3²)
          (local.set $power
            (f32x4.add
              (i8x16.shuffle 0 1 2 3 8 9 10 11 16 17 18 19 24 25 26 27 (local.get $a) (local.get $b))
              (i8x16.shuffle 4 5 6 7 12 13 14 15 20 21 22 23 28 29 30 31 (local.get $a) (local.get $b))))
          (local.set $magnitude (f32x4.sqrt (local.get $power)))
          (local.set $inverse (f32x4.div (v128.const f32x4 1 1 1 1) (local.get $magnitude)))
          (local.set $code (v128.load (local.get $codes)))
          (local.set $inside (f32x4.ge (local.get $code) (v128.const f32x4 0 0 0 0)))
          (local.set $target (v128.and (local.get $code) (local.get $inside)))
          (local.set $difference (f32x4.sub (local.get $magnitude) (local.get $target)))
          (local.set $computed (f32x4.add (local.get $computed) (local.get $power)))
          (local.set $fienup (f32x4.add (local.get $fienup)
            (v128.bitselect (f32x4.mul (local.get $difference) (local.get $difference)) (local.get $power) (local.get $inside))))
          (local.set $gt (f32x4.add (local.get $gt) (f32x4.mul (local.get $magnitude) (local.get $target))))
          (local.set $gg (f32x4.add (local.get $gg) (v128.and (local.get $power) (local.get $inside))))
          (local.set $tt (f32x4.add (local.get $tt) (f32x4.mul (local.get $target) (local.get $target))))
          (if (local.get $weights)
            (then
              (local.set $weight (v128.load (local.get $weights)))
              (local.set $bright
                (v128.and
                  (f32x4.gt (local.get $code) (v128.const f32x4 0 0 0 0))
                  (f32x4.gt (local.get $magnitude) (v128.const f32x4 0 0 0 0))))
              (local.set $ratios (f32x4.add (local.get $ratios)
                (v128.and (f32x4.div (local.get $magnitude) (local.get $code)) (local.get $bright))))
              (local.set $brights (f32x4.add (local.get $brights) (v128.and (local.get $bright) (v128.const f32x4 1 1 1 1))))
              ;; w·meanRatio/(|G|/T) = w·meanRatio·T/|G|
              (local.set $weight
                (v128.bitselect
                  (f32x4.mul (f32x4.mul (local.get $weight) (local.get $means)) (f32x4.mul (local.get $code) (local.get $inverse)))
                  (local.get $weight)
                  (v128.and (local.get $bright) (local.get $update))))
              (v128.store (local.get $weights) (local.get $weight))
              (local.set $amplitude (f32x4.mul (local.get $target) (local.get $weight)))
              (local.set $weights (i32.add (local.get $weights) (i32.const 16))))
            (else
              (local.set $amplitude (f32x4.mul (local.get $target) (local.get $mixes)))))
          (local.set $s
            (v128.bitselect
              (f32x4.mul (local.get $amplitude) (local.get $inverse))
              (v128.and (local.get $keeps) (f32x4.eq (local.get $code) (v128.const f32x4 -1 -1 -1 -1)))
              (local.get $inside)))
          (local.set $zero (v128.and (local.get $inside) (f32x4.eq (local.get $power) (v128.const f32x4 0 0 0 0))))
          ;; z·s, or (amplitude, 0) where $zero
          (v128.store (local.get $p)
            (v128.bitselect
              (i8x16.shuffle 0 1 2 3 16 17 18 19 4 5 6 7 16 17 18 19 (local.get $amplitude) (v128.const i32x4 0 0 0 0))
              (f32x4.mul (local.get $lo) (i8x16.shuffle 0 1 2 3 0 1 2 3 4 5 6 7 4 5 6 7 (local.get $s) (local.get $s)))
              (i8x16.shuffle 0 1 2 3 0 1 2 3 4 5 6 7 4 5 6 7 (local.get $zero) (local.get $zero))))
          (v128.store offset=16 (local.get $p)
            (v128.bitselect
              (i8x16.shuffle 8 9 10 11 16 17 18 19 12 13 14 15 16 17 18 19 (local.get $amplitude) (v128.const i32x4 0 0 0 0))
              (f32x4.mul (local.get $hi) (i8x16.shuffle 8 9 10 11 8 9 10 11 12 13 14 15 12 13 14 15 (local.get $s) (local.get $s)))
              (i8x16.shuffle 8 9 10 11 8 9 10 11 12 13 14 15 12 13 14 15 (local.get $zero) (local.get $zero))))
          (local.set $p (i32.add (local.get $p) (i32.const 32)))
          (local.set $codes (i32.add (local.get $codes) (i32.const 16)))
          (br_if $next (i32.lt_u (local.get $p) (local.get $blockEnd))))
        (local.set $d (f64x2.add (f64x2.promote_low_f32x4 (local.get $fienup))
          (f64x2.promote_low_f32x4 (i8x16.shuffle 8 9 10 11 12 13 14 15 0 1 2 3 4 5 6 7 (local.get $fienup) (local.get $fienup)))))
        (f64.store (local.get $acc) (f64.add (f64.load (local.get $acc))
          (f64.add (f64x2.extract_lane 0 (local.get $d)) (f64x2.extract_lane 1 (local.get $d)))))
        (local.set $d (f64x2.add (f64x2.promote_low_f32x4 (local.get $gt))
          (f64x2.promote_low_f32x4 (i8x16.shuffle 8 9 10 11 12 13 14 15 0 1 2 3 4 5 6 7 (local.get $gt) (local.get $gt)))))
        (f64.store offset=8 (local.get $acc) (f64.add (f64.load offset=8 (local.get $acc))
          (f64.add (f64x2.extract_lane 0 (local.get $d)) (f64x2.extract_lane 1 (local.get $d)))))
        (local.set $d (f64x2.add (f64x2.promote_low_f32x4 (local.get $gg))
          (f64x2.promote_low_f32x4 (i8x16.shuffle 8 9 10 11 12 13 14 15 0 1 2 3 4 5 6 7 (local.get $gg) (local.get $gg)))))
        (f64.store offset=16 (local.get $acc) (f64.add (f64.load offset=16 (local.get $acc))
          (f64.add (f64x2.extract_lane 0 (local.get $d)) (f64x2.extract_lane 1 (local.get $d)))))
        (local.set $d (f64x2.add (f64x2.promote_low_f32x4 (local.get $tt))
          (f64x2.promote_low_f32x4 (i8x16.shuffle 8 9 10 11 12 13 14 15 0 1 2 3 4 5 6 7 (local.get $tt) (local.get $tt)))))
        (f64.store offset=24 (local.get $acc) (f64.add (f64.load offset=24 (local.get $acc))
          (f64.add (f64x2.extract_lane 0 (local.get $d)) (f64x2.extract_lane 1 (local.get $d)))))
        (local.set $d (f64x2.add (f64x2.promote_low_f32x4 (local.get $ratios))
          (f64x2.promote_low_f32x4 (i8x16.shuffle 8 9 10 11 12 13 14 15 0 1 2 3 4 5 6 7 (local.get $ratios) (local.get $ratios)))))
        (f64.store offset=32 (local.get $acc) (f64.add (f64.load offset=32 (local.get $acc))
          (f64.add (f64x2.extract_lane 0 (local.get $d)) (f64x2.extract_lane 1 (local.get $d)))))
        (local.set $d (f64x2.add (f64x2.promote_low_f32x4 (local.get $brights))
          (f64x2.promote_low_f32x4 (i8x16.shuffle 8 9 10 11 12 13 14 15 0 1 2 3 4 5 6 7 (local.get $brights) (local.get $brights)))))
        (f64.store offset=40 (local.get $acc) (f64.add (f64.load offset=40 (local.get $acc))
          (f64.add (f64x2.extract_lane 0 (local.get $d)) (f64x2.extract_lane 1 (local.get $d)))))
        (local.set $d (f64x2.add (f64x2.promote_low_f32x4 (local.get $computed))
          (f64x2.promote_low_f32x4 (i8x16.shuffle 8 9 10 11 12 13 14 15 0 1 2 3 4 5 6 7 (local.get $computed) (local.get $computed)))))
        (f64.store offset=48 (local.get $acc) (f64.add (f64.load offset=48 (local.get $acc))
          (f64.add (f64x2.extract_lane 0 (local.get $d)) (f64x2.extract_lane 1 (local.get $d)))))
        (br $block))))

  ;; The same on values in the FFT backend's internal order (PFFFT's unordered transforms): each group of four
  ;; values is stored as their four real parts, then their four imaginary parts; code i (and weight i) belongs to
  ;; lane (i mod 4) of group (i div 4). No shuffles needed.
  (func (export "imagePlaneSplit") (param $p i32) (param $count i32) (param $codes i32) (param $weights i32)
    (param $mix f32) (param $keep f32) (param $meanRatio f32) (param $acc i32)
    (local $end i32) (local $blockEnd i32)
    (local $lo v128) (local $hi v128) (local $a v128) (local $b v128) (local $power v128) (local $magnitude v128)
    (local $code v128) (local $inside v128) (local $target v128) (local $difference v128) (local $amplitude v128)
    (local $bright v128) (local $inverse v128) (local $weight v128) (local $s v128) (local $zero v128)
    (local $mixes v128) (local $keeps v128) (local $means v128) (local $update v128) (local $d v128)
    (local $fienup v128) (local $gt v128) (local $gg v128) (local $tt v128) (local $ratios v128)
    (local $brights v128) (local $computed v128)
    (local.set $end (i32.add (local.get $p) (i32.shl (local.get $count) (i32.const 3))))
    (local.set $mixes (f32x4.splat (local.get $mix)))
    (local.set $keeps (f32x4.splat (local.get $keep)))
    (local.set $means (f32x4.splat (local.get $meanRatio)))
    (local.set $update (i32x4.splat (i32.sub (i32.const 0) (f32.gt (local.get $meanRatio) (f32.const 0)))))
    (block $done
      (loop $block
        (br_if $done (i32.ge_u (local.get $p) (local.get $end)))
        (local.set $blockEnd (i32.add (local.get $p) (i32.const 256)))
        (if (i32.gt_u (local.get $blockEnd) (local.get $end)) (then (local.set $blockEnd (local.get $end))))
        (local.set $fienup (v128.const i32x4 0 0 0 0))
        (local.set $gt (v128.const i32x4 0 0 0 0))
        (local.set $gg (v128.const i32x4 0 0 0 0))
        (local.set $tt (v128.const i32x4 0 0 0 0))
        (local.set $ratios (v128.const i32x4 0 0 0 0))
        (local.set $brights (v128.const i32x4 0 0 0 0))
        (local.set $computed (v128.const i32x4 0 0 0 0))
        (loop $next
          (local.set $lo (v128.load (local.get $p)))
          (local.set $hi (v128.load offset=16 (local.get $p)))
          (local.set $power (f32x4.add (f32x4.mul (local.get $lo) (local.get $lo)) (f32x4.mul (local.get $hi) (local.get $hi))))
          (local.set $magnitude (f32x4.sqrt (local.get $power)))
          (local.set $inverse (f32x4.div (v128.const f32x4 1 1 1 1) (local.get $magnitude)))
          (local.set $code (v128.load (local.get $codes)))
          (local.set $inside (f32x4.ge (local.get $code) (v128.const f32x4 0 0 0 0)))
          (local.set $target (v128.and (local.get $code) (local.get $inside)))
          (local.set $difference (f32x4.sub (local.get $magnitude) (local.get $target)))
          (local.set $computed (f32x4.add (local.get $computed) (local.get $power)))
          (local.set $fienup (f32x4.add (local.get $fienup)
            (v128.bitselect (f32x4.mul (local.get $difference) (local.get $difference)) (local.get $power) (local.get $inside))))
          (local.set $gt (f32x4.add (local.get $gt) (f32x4.mul (local.get $magnitude) (local.get $target))))
          (local.set $gg (f32x4.add (local.get $gg) (v128.and (local.get $power) (local.get $inside))))
          (local.set $tt (f32x4.add (local.get $tt) (f32x4.mul (local.get $target) (local.get $target))))
          (if (local.get $weights)
            (then
              (local.set $weight (v128.load (local.get $weights)))
              (local.set $bright
                (v128.and
                  (f32x4.gt (local.get $code) (v128.const f32x4 0 0 0 0))
                  (f32x4.gt (local.get $magnitude) (v128.const f32x4 0 0 0 0))))
              (local.set $ratios (f32x4.add (local.get $ratios)
                (v128.and (f32x4.div (local.get $magnitude) (local.get $code)) (local.get $bright))))
              (local.set $brights (f32x4.add (local.get $brights) (v128.and (local.get $bright) (v128.const f32x4 1 1 1 1))))
              ;; w·meanRatio/(|G|/T) = w·meanRatio·T/|G|
              (local.set $weight
                (v128.bitselect
                  (f32x4.mul (f32x4.mul (local.get $weight) (local.get $means)) (f32x4.mul (local.get $code) (local.get $inverse)))
                  (local.get $weight)
                  (v128.and (local.get $bright) (local.get $update))))
              (v128.store (local.get $weights) (local.get $weight))
              (local.set $amplitude (f32x4.mul (local.get $target) (local.get $weight)))
              (local.set $weights (i32.add (local.get $weights) (i32.const 16))))
            (else
              (local.set $amplitude (f32x4.mul (local.get $target) (local.get $mixes)))))
          (local.set $s
            (v128.bitselect
              (f32x4.mul (local.get $amplitude) (local.get $inverse))
              (v128.and (local.get $keeps) (f32x4.eq (local.get $code) (v128.const f32x4 -1 -1 -1 -1)))
              (local.get $inside)))
          (local.set $zero (v128.and (local.get $inside) (f32x4.eq (local.get $power) (v128.const f32x4 0 0 0 0))))
          ;; (re·s, im·s), or (amplitude, 0) where $zero
          (v128.store (local.get $p) (v128.bitselect (local.get $amplitude) (f32x4.mul (local.get $lo) (local.get $s)) (local.get $zero)))
          (v128.store offset=16 (local.get $p) (v128.andnot (f32x4.mul (local.get $hi) (local.get $s)) (local.get $zero)))
          (local.set $p (i32.add (local.get $p) (i32.const 32)))
          (local.set $codes (i32.add (local.get $codes) (i32.const 16)))
          (br_if $next (i32.lt_u (local.get $p) (local.get $blockEnd))))
        (local.set $d (f64x2.add (f64x2.promote_low_f32x4 (local.get $fienup))
          (f64x2.promote_low_f32x4 (i8x16.shuffle 8 9 10 11 12 13 14 15 0 1 2 3 4 5 6 7 (local.get $fienup) (local.get $fienup)))))
        (f64.store (local.get $acc) (f64.add (f64.load (local.get $acc))
          (f64.add (f64x2.extract_lane 0 (local.get $d)) (f64x2.extract_lane 1 (local.get $d)))))
        (local.set $d (f64x2.add (f64x2.promote_low_f32x4 (local.get $gt))
          (f64x2.promote_low_f32x4 (i8x16.shuffle 8 9 10 11 12 13 14 15 0 1 2 3 4 5 6 7 (local.get $gt) (local.get $gt)))))
        (f64.store offset=8 (local.get $acc) (f64.add (f64.load offset=8 (local.get $acc))
          (f64.add (f64x2.extract_lane 0 (local.get $d)) (f64x2.extract_lane 1 (local.get $d)))))
        (local.set $d (f64x2.add (f64x2.promote_low_f32x4 (local.get $gg))
          (f64x2.promote_low_f32x4 (i8x16.shuffle 8 9 10 11 12 13 14 15 0 1 2 3 4 5 6 7 (local.get $gg) (local.get $gg)))))
        (f64.store offset=16 (local.get $acc) (f64.add (f64.load offset=16 (local.get $acc))
          (f64.add (f64x2.extract_lane 0 (local.get $d)) (f64x2.extract_lane 1 (local.get $d)))))
        (local.set $d (f64x2.add (f64x2.promote_low_f32x4 (local.get $tt))
          (f64x2.promote_low_f32x4 (i8x16.shuffle 8 9 10 11 12 13 14 15 0 1 2 3 4 5 6 7 (local.get $tt) (local.get $tt)))))
        (f64.store offset=24 (local.get $acc) (f64.add (f64.load offset=24 (local.get $acc))
          (f64.add (f64x2.extract_lane 0 (local.get $d)) (f64x2.extract_lane 1 (local.get $d)))))
        (local.set $d (f64x2.add (f64x2.promote_low_f32x4 (local.get $ratios))
          (f64x2.promote_low_f32x4 (i8x16.shuffle 8 9 10 11 12 13 14 15 0 1 2 3 4 5 6 7 (local.get $ratios) (local.get $ratios)))))
        (f64.store offset=32 (local.get $acc) (f64.add (f64.load offset=32 (local.get $acc))
          (f64.add (f64x2.extract_lane 0 (local.get $d)) (f64x2.extract_lane 1 (local.get $d)))))
        (local.set $d (f64x2.add (f64x2.promote_low_f32x4 (local.get $brights))
          (f64x2.promote_low_f32x4 (i8x16.shuffle 8 9 10 11 12 13 14 15 0 1 2 3 4 5 6 7 (local.get $brights) (local.get $brights)))))
        (f64.store offset=40 (local.get $acc) (f64.add (f64.load offset=40 (local.get $acc))
          (f64.add (f64x2.extract_lane 0 (local.get $d)) (f64x2.extract_lane 1 (local.get $d)))))
        (local.set $d (f64x2.add (f64x2.promote_low_f32x4 (local.get $computed))
          (f64x2.promote_low_f32x4 (i8x16.shuffle 8 9 10 11 12 13 14 15 0 1 2 3 4 5 6 7 (local.get $computed) (local.get $computed)))))
        (f64.store offset=48 (local.get $acc) (f64.add (f64.load offset=48 (local.get $acc))
          (f64.add (f64x2.extract_lane 0 (local.get $d)) (f64x2.extract_lane 1 (local.get $d)))))
        (br $block))))

  ;; Complex product in place: value i at p becomes z_i·h_i, or z_i·conj(h_i) when $conjugate ≠ 0, with h_i the
  ;; complex float32 at $h + 8·i (the propagation transfer function). count must be even.
  (func (export "multiplyComplex") (param $p i32) (param $count i32) (param $h i32) (param $conjugate i32)
    (local $end i32) (local $v v128) (local $f v128) (local $sign v128)
    (local.set $end (i32.add (local.get $p) (i32.shl (local.get $count) (i32.const 3))))
    (local.set $sign
      (if (result v128) (local.get $conjugate)
        (then (v128.const f32x4 1 -1 1 -1))
        (else (v128.const f32x4 -1 1 -1 1))))
    (block $done
      (loop $next
        (br_if $done (i32.ge_u (local.get $p) (local.get $end)))
        (local.set $v (v128.load (local.get $p)))
        (local.set $f (v128.load (local.get $h)))
        ;; (re·c, im·c) + (im·d, re·d)·(∓1, ±1)
        (v128.store (local.get $p)
          (f32x4.add
            (f32x4.mul (local.get $v) (i8x16.shuffle 0 1 2 3 0 1 2 3 8 9 10 11 8 9 10 11 (local.get $f) (local.get $f)))
            (f32x4.mul
              (f32x4.mul
                (i8x16.shuffle 4 5 6 7 0 1 2 3 12 13 14 15 8 9 10 11 (local.get $v) (local.get $v))
                (i8x16.shuffle 4 5 6 7 4 5 6 7 12 13 14 15 12 13 14 15 (local.get $f) (local.get $f)))
              (local.get $sign))))
        (local.set $p (i32.add (local.get $p) (i32.const 16)))
        (local.set $h (i32.add (local.get $h) (i32.const 16)))
        (br $next))))

  ;; The same on values in the FFT backend's internal order (groups of four real parts, then four imaginary parts;
  ;; h in the same layout). count: multiple of 4.
  (func (export "multiplyComplexSplit") (param $p i32) (param $count i32) (param $h i32) (param $conjugate i32)
    (local $end i32) (local $re v128) (local $im v128) (local $c v128) (local $d v128)
    (local.set $end (i32.add (local.get $p) (i32.shl (local.get $count) (i32.const 3))))
    (block $done
      (loop $next
        (br_if $done (i32.ge_u (local.get $p) (local.get $end)))
        (local.set $re (v128.load (local.get $p)))
        (local.set $im (v128.load offset=16 (local.get $p)))
        (local.set $c (v128.load (local.get $h)))
        (local.set $d (v128.load offset=16 (local.get $h)))
        (if (local.get $conjugate) (then (local.set $d (f32x4.neg (local.get $d)))))
        (v128.store (local.get $p) (f32x4.sub (f32x4.mul (local.get $re) (local.get $c)) (f32x4.mul (local.get $im) (local.get $d))))
        (v128.store offset=16 (local.get $p) (f32x4.add (f32x4.mul (local.get $re) (local.get $d)) (f32x4.mul (local.get $im) (local.get $c))))
        (local.set $p (i32.add (local.get $p) (i32.const 32)))
        (local.set $h (i32.add (local.get $h) (i32.const 32)))
        (br $next))))

  ;; Multiplies the 2·count floats (count complex values, even) at p by $factor (the inverse FFT's 1/N²).
  (func (export "scale") (param $p i32) (param $count i32) (param $factor f32)
    (local $end i32) (local $f v128)
    (local.set $end (i32.add (local.get $p) (i32.shl (local.get $count) (i32.const 3))))
    (local.set $f (f32x4.splat (local.get $factor)))
    (block $done
      (loop $next
        (br_if $done (i32.ge_u (local.get $p) (local.get $end)))
        (v128.store (local.get $p) (f32x4.mul (v128.load (local.get $p)) (local.get $f)))
        (local.set $p (i32.add (local.get $p) (i32.const 16)))
        (br $next))))

  ;; In-place transpose of the n×n matrix of complex values at p (n and $tile even, $tile dividing n), tile pair by
  ;; tile pair: each 2×2 block at (i, j) is swapped with the transpose of the block at (j, i) by vector shuffles.
  (func (export "transpose") (param $p i32) (param $n i32) (param $tile i32)
    (local $stride i32) (local $i0 i32) (local $j0 i32) (local $i i32) (local $j i32) (local $iEnd i32) (local $jEnd i32)
    (local $x i32) (local $y i32) (local $a0 v128) (local $a1 v128) (local $b0 v128) (local $b1 v128)
    (local.set $stride (i32.shl (local.get $n) (i32.const 3)))
    (block $rowsDone
      (loop $rows
        (br_if $rowsDone (i32.ge_u (local.get $i0) (local.get $n)))
        (local.set $iEnd (i32.add (local.get $i0) (local.get $tile)))
        (local.set $j0 (local.get $i0))
        (block $tilesDone
          (loop $tiles
            (br_if $tilesDone (i32.ge_u (local.get $j0) (local.get $n)))
            (local.set $jEnd (i32.add (local.get $j0) (local.get $tile)))
            (local.set $i (local.get $i0))
            (loop $blockRows
              (local.set $j (select (local.get $i) (local.get $j0) (i32.eq (local.get $i0) (local.get $j0))))
              (loop $blocks
                (local.set $x (i32.add (local.get $p) (i32.add (i32.mul (local.get $i) (local.get $stride)) (i32.shl (local.get $j) (i32.const 3)))))
                (local.set $y (i32.add (local.get $p) (i32.add (i32.mul (local.get $j) (local.get $stride)) (i32.shl (local.get $i) (i32.const 3)))))
                (local.set $a0 (v128.load (local.get $x)))
                (local.set $a1 (v128.load (i32.add (local.get $x) (local.get $stride))))
                (local.set $b0 (v128.load (local.get $y)))
                (local.set $b1 (v128.load (i32.add (local.get $y) (local.get $stride))))
                (v128.store (local.get $y) (i8x16.shuffle 0 1 2 3 4 5 6 7 16 17 18 19 20 21 22 23 (local.get $a0) (local.get $a1)))
                (v128.store (i32.add (local.get $y) (local.get $stride)) (i8x16.shuffle 8 9 10 11 12 13 14 15 24 25 26 27 28 29 30 31 (local.get $a0) (local.get $a1)))
                (v128.store (local.get $x) (i8x16.shuffle 0 1 2 3 4 5 6 7 16 17 18 19 20 21 22 23 (local.get $b0) (local.get $b1)))
                (v128.store (i32.add (local.get $x) (local.get $stride)) (i8x16.shuffle 8 9 10 11 12 13 14 15 24 25 26 27 28 29 30 31 (local.get $b0) (local.get $b1)))
                (local.set $j (i32.add (local.get $j) (i32.const 2)))
                (br_if $blocks (i32.lt_u (local.get $j) (local.get $jEnd))))
              (local.set $i (i32.add (local.get $i) (i32.const 2)))
              (br_if $blockRows (i32.lt_u (local.get $i) (local.get $iEnd))))
            (local.set $j0 (local.get $jEnd))
            (br $tiles)))
        (local.set $i0 (local.get $iEnd))
        (br $rows))))

  ;; Columns x … x + width − 1 of the n×n complex grid at $grid (n a multiple of 8) copied into rows 0 … width − 1
  ;; of $columns (n values each), or, with $toColumns = 0, copied back from there into the grid; 2×2 blocks by
  ;; vector shuffles, 8 grid rows at a time so both sides stay in cache.
  (func (export "copyColumns") (param $grid i32) (param $n i32) (param $x i32) (param $width i32) (param $columns i32) (param $toColumns i32)
    (local $stride i32) (local $y0 i32) (local $y i32) (local $k i32) (local $pairs i32) (local $g i32) (local $c i32)
    (local $a0 v128) (local $a1 v128)
    (local.set $stride (i32.shl (local.get $n) (i32.const 3)))
    (local.set $pairs (i32.and (local.get $width) (i32.const -2)))
    (block $done
      (loop $strips
        (br_if $done (i32.ge_u (local.get $y0) (local.get $n)))
        (local.set $k (i32.const 0))
        (block $columnsDone
          (loop $columnPairs
            (br_if $columnsDone (i32.ge_u (local.get $k) (local.get $pairs)))
            (local.set $y (local.get $y0))
            (loop $rows
              (local.set $g (i32.add (local.get $grid)
                (i32.add (i32.mul (local.get $y) (local.get $stride)) (i32.shl (i32.add (local.get $x) (local.get $k)) (i32.const 3)))))
              (local.set $c (i32.add (local.get $columns)
                (i32.add (i32.mul (local.get $k) (local.get $stride)) (i32.shl (local.get $y) (i32.const 3)))))
              (if (local.get $toColumns)
                (then
                  (local.set $a0 (v128.load (local.get $g)))
                  (local.set $a1 (v128.load (i32.add (local.get $g) (local.get $stride))))
                  (v128.store (local.get $c) (i8x16.shuffle 0 1 2 3 4 5 6 7 16 17 18 19 20 21 22 23 (local.get $a0) (local.get $a1)))
                  (v128.store (i32.add (local.get $c) (local.get $stride)) (i8x16.shuffle 8 9 10 11 12 13 14 15 24 25 26 27 28 29 30 31 (local.get $a0) (local.get $a1))))
                (else
                  (local.set $a0 (v128.load (local.get $c)))
                  (local.set $a1 (v128.load (i32.add (local.get $c) (local.get $stride))))
                  (v128.store (local.get $g) (i8x16.shuffle 0 1 2 3 4 5 6 7 16 17 18 19 20 21 22 23 (local.get $a0) (local.get $a1)))
                  (v128.store (i32.add (local.get $g) (local.get $stride)) (i8x16.shuffle 8 9 10 11 12 13 14 15 24 25 26 27 28 29 30 31 (local.get $a0) (local.get $a1)))))
              (local.set $y (i32.add (local.get $y) (i32.const 2)))
              (br_if $rows (i32.lt_u (local.get $y) (i32.add (local.get $y0) (i32.const 8)))))
            (local.set $k (i32.add (local.get $k) (i32.const 2)))
            (br $columnPairs)))
        ;; An odd last column, value by value.
        (if (i32.lt_u (local.get $pairs) (local.get $width))
          (then
            (local.set $y (local.get $y0))
            (loop $single
              (local.set $g (i32.add (local.get $grid)
                (i32.add (i32.mul (local.get $y) (local.get $stride)) (i32.shl (i32.add (local.get $x) (local.get $pairs)) (i32.const 3)))))
              (local.set $c (i32.add (local.get $columns)
                (i32.add (i32.mul (local.get $pairs) (local.get $stride)) (i32.shl (local.get $y) (i32.const 3)))))
              (if (local.get $toColumns)
                (then (i64.store (local.get $c) (i64.load (local.get $g))))
                (else (i64.store (local.get $g) (i64.load (local.get $c)))))
              (local.set $y (i32.add (local.get $y) (i32.const 1)))
              (br_if $single (i32.lt_u (local.get $y) (i32.add (local.get $y0) (i32.const 8)))))))
        (local.set $y0 (i32.add (local.get $y0) (i32.const 8)))
        (br $strips))))

  ;; Column copies of a grid whose rows are in the FFT backend's internal order (blocks of four complex values
  ;; stored as four real parts, then four imaginary parts, 32 bytes): the `count` blocks from block $first — block
  ;; b holds row positions 4b … 4b + 3 — become rows 0 … 4·count − 1 of $columns, one row of n interleaved
  ;; (re, im) values per position (toColumns 1), or go back (0). Rows are taken two at a time in
  ;; strips of 8, so each block of a strip is read and written while its cache lines are loaded.
  (func (export "copyBlocks") (param $grid i32) (param $n i32) (param $first i32) (param $count i32) (param $columns i32) (param $toColumns i32)
    (local $stride i32) (local $y0 i32) (local $y i32) (local $i i32) (local $g i32) (local $c i32)
    (local $re0 v128) (local $im0 v128) (local $re1 v128) (local $im1 v128)
    (local $lo0 v128) (local $hi0 v128) (local $lo1 v128) (local $hi1 v128)
    (local $c0 v128) (local $c1 v128) (local $c2 v128) (local $c3 v128) (local $a v128) (local $b v128)
    (local.set $stride (i32.shl (local.get $n) (i32.const 3)))
    (block $done
      (loop $strips
        (br_if $done (i32.ge_u (local.get $y0) (local.get $n)))
        (local.set $i (i32.const 0))
        (block $blocksDone
          (loop $eachBlock
            (br_if $blocksDone (i32.ge_u (local.get $i) (local.get $count)))
            (local.set $y (local.get $y0))
            (loop $rows
              ;; $g: row y of the block; $c: row y of the block's first column (its four columns $stride apart)
              (local.set $g (i32.add (local.get $grid)
                (i32.add (i32.mul (local.get $y) (local.get $stride))
                  (i32.shl (i32.add (local.get $first) (local.get $i)) (i32.const 5)))))
              (local.set $c (i32.add (local.get $columns)
                (i32.add (i32.mul (i32.shl (local.get $i) (i32.const 2)) (local.get $stride)) (i32.shl (local.get $y) (i32.const 3)))))
              (if (local.get $toColumns)
                (then
                  (local.set $re0 (v128.load (local.get $g)))
                  (local.set $im0 (v128.load offset=16 (local.get $g)))
                  (local.set $re1 (v128.load (i32.add (local.get $g) (local.get $stride))))
                  (local.set $im1 (v128.load offset=16 (i32.add (local.get $g) (local.get $stride))))
                  ;; (re, im) pairs of rows y and y + 1: values 0, 1 and values 2, 3
                  (local.set $lo0 (i8x16.shuffle 0 1 2 3 16 17 18 19 4 5 6 7 20 21 22 23 (local.get $re0) (local.get $im0)))
                  (local.set $hi0 (i8x16.shuffle 8 9 10 11 24 25 26 27 12 13 14 15 28 29 30 31 (local.get $re0) (local.get $im0)))
                  (local.set $lo1 (i8x16.shuffle 0 1 2 3 16 17 18 19 4 5 6 7 20 21 22 23 (local.get $re1) (local.get $im1)))
                  (local.set $hi1 (i8x16.shuffle 8 9 10 11 24 25 26 27 12 13 14 15 28 29 30 31 (local.get $re1) (local.get $im1)))
                  ;; column l gets its value of row y, then of row y + 1
                  (v128.store (local.get $c) (i8x16.shuffle 0 1 2 3 4 5 6 7 16 17 18 19 20 21 22 23 (local.get $lo0) (local.get $lo1)))
                  (local.set $c (i32.add (local.get $c) (local.get $stride)))
                  (v128.store (local.get $c) (i8x16.shuffle 8 9 10 11 12 13 14 15 24 25 26 27 28 29 30 31 (local.get $lo0) (local.get $lo1)))
                  (local.set $c (i32.add (local.get $c) (local.get $stride)))
                  (v128.store (local.get $c) (i8x16.shuffle 0 1 2 3 4 5 6 7 16 17 18 19 20 21 22 23 (local.get $hi0) (local.get $hi1)))
                  (local.set $c (i32.add (local.get $c) (local.get $stride)))
                  (v128.store (local.get $c) (i8x16.shuffle 8 9 10 11 12 13 14 15 24 25 26 27 28 29 30 31 (local.get $hi0) (local.get $hi1))))
                (else
                  ;; column l: (re, im) of row y, then of row y + 1
                  (local.set $c0 (v128.load (local.get $c)))
                  (local.set $c1 (v128.load (i32.add (local.get $c) (local.get $stride))))
                  (local.set $c2 (v128.load (i32.add (local.get $c) (i32.shl (local.get $stride) (i32.const 1)))))
                  (local.set $c3 (v128.load (i32.add (local.get $c) (i32.mul (local.get $stride) (i32.const 3)))))
                  ;; row y: (re0, re1, im0, im1) and (re2, re3, im2, im3)
                  (local.set $a (i8x16.shuffle 0 1 2 3 16 17 18 19 4 5 6 7 20 21 22 23 (local.get $c0) (local.get $c1)))
                  (local.set $b (i8x16.shuffle 0 1 2 3 16 17 18 19 4 5 6 7 20 21 22 23 (local.get $c2) (local.get $c3)))
                  (v128.store (local.get $g) (i8x16.shuffle 0 1 2 3 4 5 6 7 16 17 18 19 20 21 22 23 (local.get $a) (local.get $b)))
                  (v128.store offset=16 (local.get $g) (i8x16.shuffle 8 9 10 11 12 13 14 15 24 25 26 27 28 29 30 31 (local.get $a) (local.get $b)))
                  ;; row y + 1
                  (local.set $a (i8x16.shuffle 8 9 10 11 24 25 26 27 12 13 14 15 28 29 30 31 (local.get $c0) (local.get $c1)))
                  (local.set $b (i8x16.shuffle 8 9 10 11 24 25 26 27 12 13 14 15 28 29 30 31 (local.get $c2) (local.get $c3)))
                  (local.set $g (i32.add (local.get $g) (local.get $stride)))
                  (v128.store (local.get $g) (i8x16.shuffle 0 1 2 3 4 5 6 7 16 17 18 19 20 21 22 23 (local.get $a) (local.get $b)))
                  (v128.store offset=16 (local.get $g) (i8x16.shuffle 8 9 10 11 12 13 14 15 24 25 26 27 28 29 30 31 (local.get $a) (local.get $b)))))
              (local.set $y (i32.add (local.get $y) (i32.const 2)))
              (br_if $rows (i32.lt_u (local.get $y) (i32.add (local.get $y0) (i32.const 8)))))
            (local.set $i (i32.add (local.get $i) (i32.const 1)))
            (br $eachBlock)))
        (local.set $y0 (i32.add (local.get $y0) (i32.const 8)))
        (br $strips))))
)
