;; The hot loop of the surface-test analysis, in WebAssembly with 128-bit SIMD.
;;
;; Source of server/audio/kernel/surfacePassWasm.ts (rebuild with `npm run build:kernel`;
;; tests/unit/audio-kernel.test.ts fails when the two disagree). The plain TypeScript form of the
;; same computation is tests/unit/support/surfacePassReference.ts, and the unit tests check this
;; kernel against it.
;;
;; Two lanes of f64x2: lane 0 and lane 1 filter two different stretches of the recording at the
;; same time (levels.ts decides which, and warms lane 1 up before its stretch begins). The
;; A-weighting filter is recursive, so one stretch cannot be split between lanes; two stretches
;; side by side halve the work per sample.
;;
;; Per sample x (both lanes at once): sum x², max |x|, the step d = x − x[n−1] with max |d| and
;; sum |d| (for the click detector), and the four A-weighting biquads of aWeighting.ts in the
;; shared-history direct form I of levels.ts:
;;   y1 = (d − d1) − a12·y1'' − a11·y1'          (section 1: numerator 1 − 2z⁻¹ + z⁻²)
;;   e  = y1 − y1'
;;   y2 = (e − e1) − a22·y2'' − a21·y2'          (section 2: likewise)
;;   y3 = y2 + c31·y2' + c32·y2'' − a32·y3'' − a31·y3'
;;   y4 = y3 + c41·y3' + c42·y3''                 (gain b0₃·b0₄ applied by the caller)
;; and sum y4². The operations are in the same order as the TypeScript reference, so lane 0 gives
;; bit-for-bit the same numbers.
;;
;; Memory (all offsets are parameters; levels.ts lays them out):
;;   coef:  10 f64   a11 a12 a21 a22 c31 c32 a31 a32 c41 c42
;;   state:  9 f64x2 x1 d1 e1 y1' y1'' y2' y2'' y3' y3''   (read at entry, written at exit)
;;   a, b:  f32 samples of lane 0 and lane 1, frames × frameLength each
;;   out:   per frame 5 f64x2: sum x², sum y4², max |x|, max |d|, sum |d|
(module
  (memory (export "memory") 8)

  ;; f32 ← i16 (little-endian), scaled to full scale ±1; count rounded up to a multiple of 8
  ;; (the caller keeps room for that).
  (func (export "i16ToF32") (param $src i32) (param $dst i32) (param $count i32)
    (local $end i32) (local $v v128) (local $scale v128)
    (local.set $scale (f32x4.splat (f32.const 0x1p-15)))
    (local.set $end (i32.add (local.get $src) (i32.shl (local.get $count) (i32.const 1))))
    (block $done
      (loop $next
        (br_if $done (i32.ge_u (local.get $src) (local.get $end)))
        (local.set $v (v128.load (local.get $src)))
        (v128.store (local.get $dst)
          (f32x4.mul (f32x4.convert_i32x4_s (i32x4.extend_low_i16x8_s (local.get $v))) (local.get $scale)))
        (v128.store offset=16 (local.get $dst)
          (f32x4.mul (f32x4.convert_i32x4_s (i32x4.extend_high_i16x8_s (local.get $v))) (local.get $scale)))
        (local.set $src (i32.add (local.get $src) (i32.const 16)))
        (local.set $dst (i32.add (local.get $dst) (i32.const 32)))
        (br $next))))

  (func (export "pass")
    (param $coef i32) (param $state i32) (param $a i32) (param $b i32)
    (param $frames i32) (param $frameLength i32) (param $out i32)
    (local $a11 v128) (local $a12 v128) (local $a21 v128) (local $a22 v128)
    (local $c31 v128) (local $c32 v128) (local $a31 v128) (local $a32 v128)
    (local $c41 v128) (local $c42 v128)
    (local $x1 v128) (local $d1 v128) (local $e1 v128)
    (local $y1p v128) (local $y1pp v128) (local $y2p v128) (local $y2pp v128) (local $y3p v128) (local $y3pp v128)
    (local $x v128) (local $d v128) (local $step v128) (local $y1 v128) (local $e v128)
    (local $y2 v128) (local $y3 v128) (local $y4 v128)
    (local $sum v128) (local $aSum v128) (local $maxAbs v128) (local $maxStep v128) (local $stepSum v128)
    (local $i i32) (local $frameEnd i32) (local $lastFrame i32)

    (local.set $a11 (v128.load64_splat offset=0 (local.get $coef)))
    (local.set $a12 (v128.load64_splat offset=8 (local.get $coef)))
    (local.set $a21 (v128.load64_splat offset=16 (local.get $coef)))
    (local.set $a22 (v128.load64_splat offset=24 (local.get $coef)))
    (local.set $c31 (v128.load64_splat offset=32 (local.get $coef)))
    (local.set $c32 (v128.load64_splat offset=40 (local.get $coef)))
    (local.set $a31 (v128.load64_splat offset=48 (local.get $coef)))
    (local.set $a32 (v128.load64_splat offset=56 (local.get $coef)))
    (local.set $c41 (v128.load64_splat offset=64 (local.get $coef)))
    (local.set $c42 (v128.load64_splat offset=72 (local.get $coef)))

    (local.set $x1 (v128.load offset=0 (local.get $state)))
    (local.set $d1 (v128.load offset=16 (local.get $state)))
    (local.set $e1 (v128.load offset=32 (local.get $state)))
    (local.set $y1p (v128.load offset=48 (local.get $state)))
    (local.set $y1pp (v128.load offset=64 (local.get $state)))
    (local.set $y2p (v128.load offset=80 (local.get $state)))
    (local.set $y2pp (v128.load offset=96 (local.get $state)))
    (local.set $y3p (v128.load offset=112 (local.get $state)))
    (local.set $y3pp (v128.load offset=128 (local.get $state)))

    ;; $i counts bytes into the f32 sample arrays; a frame ends $frameLength samples later.
    (local.set $lastFrame (i32.mul (local.get $frames) (i32.shl (local.get $frameLength) (i32.const 2))))
    (block $framesDone
      (loop $frame
        (br_if $framesDone (i32.ge_u (local.get $i) (local.get $lastFrame)))
        (local.set $frameEnd (i32.add (local.get $i) (i32.shl (local.get $frameLength) (i32.const 2))))
        (local.set $sum (v128.const f64x2 0 0))
        (local.set $aSum (v128.const f64x2 0 0))
        (local.set $maxAbs (v128.const f64x2 0 0))
        (local.set $maxStep (v128.const f64x2 0 0))
        (local.set $stepSum (v128.const f64x2 0 0))
        (block $samplesDone
          (loop $sample
            (br_if $samplesDone (i32.ge_u (local.get $i) (local.get $frameEnd)))
            ;; x = [a[i], b[i]] as f64
            (local.set $x (f64x2.promote_low_f32x4
              (v128.load32_lane 1
                (i32.add (local.get $b) (local.get $i))
                (v128.load32_zero (i32.add (local.get $a) (local.get $i))))))
            (local.set $sum (f64x2.add (local.get $sum) (f64x2.mul (local.get $x) (local.get $x))))
            (local.set $maxAbs (f64x2.pmax (local.get $maxAbs) (f64x2.abs (local.get $x))))
            (local.set $d (f64x2.sub (local.get $x) (local.get $x1)))
            (local.set $step (f64x2.abs (local.get $d)))
            (local.set $maxStep (f64x2.pmax (local.get $maxStep) (local.get $step)))
            (local.set $stepSum (f64x2.add (local.get $stepSum) (local.get $step)))
            (local.set $y1
              (f64x2.sub
                (f64x2.sub
                  (f64x2.sub (local.get $d) (local.get $d1))
                  (f64x2.mul (local.get $a12) (local.get $y1pp)))
                (f64x2.mul (local.get $a11) (local.get $y1p))))
            (local.set $e (f64x2.sub (local.get $y1) (local.get $y1p)))
            (local.set $y2
              (f64x2.sub
                (f64x2.sub
                  (f64x2.sub (local.get $e) (local.get $e1))
                  (f64x2.mul (local.get $a22) (local.get $y2pp)))
                (f64x2.mul (local.get $a21) (local.get $y2p))))
            (local.set $y3
              (f64x2.sub
                (f64x2.sub
                  (f64x2.add
                    (f64x2.add (local.get $y2) (f64x2.mul (local.get $c31) (local.get $y2p)))
                    (f64x2.mul (local.get $c32) (local.get $y2pp)))
                  (f64x2.mul (local.get $a32) (local.get $y3pp)))
                (f64x2.mul (local.get $a31) (local.get $y3p))))
            (local.set $y4
              (f64x2.add
                (f64x2.add (local.get $y3) (f64x2.mul (local.get $c41) (local.get $y3p)))
                (f64x2.mul (local.get $c42) (local.get $y3pp))))
            (local.set $aSum (f64x2.add (local.get $aSum) (f64x2.mul (local.get $y4) (local.get $y4))))
            (local.set $x1 (local.get $x))
            (local.set $d1 (local.get $d))
            (local.set $e1 (local.get $e))
            (local.set $y1pp (local.get $y1p))
            (local.set $y1p (local.get $y1))
            (local.set $y2pp (local.get $y2p))
            (local.set $y2p (local.get $y2))
            (local.set $y3pp (local.get $y3p))
            (local.set $y3p (local.get $y3))
            (local.set $i (i32.add (local.get $i) (i32.const 4)))
            (br $sample)))
        (v128.store offset=0 (local.get $out) (local.get $sum))
        (v128.store offset=16 (local.get $out) (local.get $aSum))
        (v128.store offset=32 (local.get $out) (local.get $maxAbs))
        (v128.store offset=48 (local.get $out) (local.get $maxStep))
        (v128.store offset=64 (local.get $out) (local.get $stepSum))
        (local.set $out (i32.add (local.get $out) (i32.const 80)))
        (br $frame)))

    (v128.store offset=0 (local.get $state) (local.get $x1))
    (v128.store offset=16 (local.get $state) (local.get $d1))
    (v128.store offset=32 (local.get $state) (local.get $e1))
    (v128.store offset=48 (local.get $state) (local.get $y1p))
    (v128.store offset=64 (local.get $state) (local.get $y1pp))
    (v128.store offset=80 (local.get $state) (local.get $y2p))
    (v128.store offset=96 (local.get $state) (local.get $y2pp))
    (v128.store offset=112 (local.get $state) (local.get $y3p))
    (v128.store offset=128 (local.get $state) (local.get $y3pp)))
)
