;; Tricubic (3D grids) and bicubic (planar and axial grids) gradient of φ_dc + cr·φ_rf, the sums
;; of GridInterpolant.gradientOfPair (sim/fields/interpolate.ts) in WebAssembly with 128-bit SIMD:
;; two neighbouring x nodes per f64x2 lane pair. The 6-tap x window splits into the even taps
;; (0, 2, 4) in lane 0 and the odd taps (1, 3, 5) in lane 1, added at the end of each row, so that a
;; row costs three packed products for the combination and six for the two sums instead of
;; eighteen scalar ones. IEEE double arithmetic without contraction (WebAssembly has no fused
;; multiply-add), so the bits are the same on every machine; the C reference of the benchmark
;; (test/bench/c/solved_tricubic_rk4.c) sums in the same order.
;;
;; Memory (bytes): 0..287 the weights written by the caller, per axis a (x, y, z) the value
;; weights at 96a and the derivative weights at 96a + 48, six doubles each; 288..311 the result
;; (∂x, ∂y, ∂z; bicubic: ∂ along the first and second axis); from 512 the dc plane (one double per node, x fastest), then the rf plane at
;; $rf bytes after it. $s1 and $s2: byte strides of a y row and a z plane.
(module
  ;; The memory comes from the caller, made at its full size: growing one would detach its
  ;; buffer, and a detached buffer anywhere makes V8 check every typed-array access for it.
  (import "env" "memory" (memory 1))
  (global $s1 (mut i32) (i32.const 0))
  (global $s2 (mut i32) (i32.const 0))
  (global $rf (mut i32) (i32.const 0))
  (func (export "layout") (param $s1 i32) (param $s2 i32) (param $rf i32)
    (global.set $s1 (local.get $s1))
    (global.set $s2 (local.get $s2))
    (global.set $rf (local.get $rf)))
  ;; base: byte offset of the window's first node (x = b0, y = b1, z = b2) in the dc plane.
  (func (export "gradient") (param $base i32) (param $cr f64)
    (local $k i32) (local $j i32) (local $plane i32) (local $p i32)
    (local $c v128) (local $n0 v128) (local $n1 v128) (local $n2 v128)
    (local $w0 v128) (local $w1 v128) (local $w2 v128) (local $e0 v128) (local $e1 v128) (local $e2 v128)
    (local $av v128) (local $cv v128) (local $a f64) (local $d f64) (local $wv f64)
    (local $pv f64) (local $px f64) (local $py f64) (local $gx f64) (local $gy f64) (local $gz f64)
    (local.set $c (f64x2.splat (local.get $cr)))
    (local.set $w0 (v128.load (i32.const 0)))
    (local.set $w1 (v128.load (i32.const 16)))
    (local.set $w2 (v128.load (i32.const 32)))
    (local.set $e0 (v128.load (i32.const 48)))
    (local.set $e1 (v128.load (i32.const 64)))
    (local.set $e2 (v128.load (i32.const 80)))
    (local.set $plane (local.get $base))
    (local.set $k (i32.const 0))
    (loop $planes
      (local.set $pv (f64.const 0)) (local.set $px (f64.const 0)) (local.set $py (f64.const 0))
      (local.set $p (local.get $plane))
      (local.set $j (i32.const 0))
      (loop $rows
        ;; n = φ_dc + cr·φ_rf at the six x nodes of the row, two at a time.
        (local.set $n0 (f64x2.add (v128.load (local.get $p))
          (f64x2.mul (local.get $c) (v128.load (i32.add (local.get $p) (global.get $rf))))))
        (local.set $n1 (f64x2.add (v128.load offset=16 (local.get $p))
          (f64x2.mul (local.get $c) (v128.load offset=16 (i32.add (local.get $p) (global.get $rf))))))
        (local.set $n2 (f64x2.add (v128.load offset=32 (local.get $p))
          (f64x2.mul (local.get $c) (v128.load offset=32 (i32.add (local.get $p) (global.get $rf))))))
        (local.set $av (f64x2.add (f64x2.add (f64x2.mul (local.get $w0) (local.get $n0))
          (f64x2.mul (local.get $w1) (local.get $n1))) (f64x2.mul (local.get $w2) (local.get $n2))))
        (local.set $cv (f64x2.add (f64x2.add (f64x2.mul (local.get $e0) (local.get $n0))
          (f64x2.mul (local.get $e1) (local.get $n1))) (f64x2.mul (local.get $e2) (local.get $n2))))
        (local.set $a (f64.add (f64x2.extract_lane 0 (local.get $av)) (f64x2.extract_lane 1 (local.get $av))))
        (local.set $d (f64.add (f64x2.extract_lane 0 (local.get $cv)) (f64x2.extract_lane 1 (local.get $cv))))
        ;; y weights of row j at 96 + 8j (value) and 144 + 8j (derivative).
        (local.set $wv (f64.load offset=96 (i32.shl (local.get $j) (i32.const 3))))
        (local.set $pv (f64.add (local.get $pv) (f64.mul (local.get $wv) (local.get $a))))
        (local.set $px (f64.add (local.get $px) (f64.mul (local.get $wv) (local.get $d))))
        (local.set $py (f64.add (local.get $py)
          (f64.mul (f64.load offset=144 (i32.shl (local.get $j) (i32.const 3))) (local.get $a))))
        (local.set $p (i32.add (local.get $p) (global.get $s1)))
        (br_if $rows (i32.lt_u (local.tee $j (i32.add (local.get $j) (i32.const 1))) (i32.const 6))))
      ;; z weights of plane k at 192 + 8k (value) and 240 + 8k (derivative).
      (local.set $wv (f64.load offset=192 (i32.shl (local.get $k) (i32.const 3))))
      (local.set $gx (f64.add (local.get $gx) (f64.mul (local.get $wv) (local.get $px))))
      (local.set $gy (f64.add (local.get $gy) (f64.mul (local.get $wv) (local.get $py))))
      (local.set $gz (f64.add (local.get $gz)
        (f64.mul (f64.load offset=240 (i32.shl (local.get $k) (i32.const 3))) (local.get $pv))))
      (local.set $plane (i32.add (local.get $plane) (global.get $s2)))
      (br_if $planes (i32.lt_u (local.tee $k (i32.add (local.get $k) (i32.const 1))) (i32.const 6))))
    (f64.store (i32.const 288) (local.get $gx))
    (f64.store (i32.const 296) (local.get $gy))
    (f64.store (i32.const 304) (local.get $gz)))
  ;; The bicubic form: one plane of six rows, the second axis's weights at 96 + 8j and 144 + 8j.
  (func (export "gradient2") (param $base i32) (param $cr f64)
    (local $j i32) (local $p i32)
    (local $c v128) (local $n0 v128) (local $n1 v128) (local $n2 v128)
    (local $w0 v128) (local $w1 v128) (local $w2 v128) (local $e0 v128) (local $e1 v128) (local $e2 v128)
    (local $av v128) (local $cv v128) (local $a f64) (local $d f64) (local $gx f64) (local $gy f64)
    (local.set $c (f64x2.splat (local.get $cr)))
    (local.set $w0 (v128.load (i32.const 0)))
    (local.set $w1 (v128.load (i32.const 16)))
    (local.set $w2 (v128.load (i32.const 32)))
    (local.set $e0 (v128.load (i32.const 48)))
    (local.set $e1 (v128.load (i32.const 64)))
    (local.set $e2 (v128.load (i32.const 80)))
    (local.set $p (local.get $base))
    (local.set $j (i32.const 0))
    (loop $rows
      (local.set $n0 (f64x2.add (v128.load (local.get $p))
        (f64x2.mul (local.get $c) (v128.load (i32.add (local.get $p) (global.get $rf))))))
      (local.set $n1 (f64x2.add (v128.load offset=16 (local.get $p))
        (f64x2.mul (local.get $c) (v128.load offset=16 (i32.add (local.get $p) (global.get $rf))))))
      (local.set $n2 (f64x2.add (v128.load offset=32 (local.get $p))
        (f64x2.mul (local.get $c) (v128.load offset=32 (i32.add (local.get $p) (global.get $rf))))))
      (local.set $av (f64x2.add (f64x2.add (f64x2.mul (local.get $w0) (local.get $n0))
        (f64x2.mul (local.get $w1) (local.get $n1))) (f64x2.mul (local.get $w2) (local.get $n2))))
      (local.set $cv (f64x2.add (f64x2.add (f64x2.mul (local.get $e0) (local.get $n0))
        (f64x2.mul (local.get $e1) (local.get $n1))) (f64x2.mul (local.get $e2) (local.get $n2))))
      (local.set $a (f64.add (f64x2.extract_lane 0 (local.get $av)) (f64x2.extract_lane 1 (local.get $av))))
      (local.set $d (f64.add (f64x2.extract_lane 0 (local.get $cv)) (f64x2.extract_lane 1 (local.get $cv))))
      (local.set $gx (f64.add (local.get $gx)
        (f64.mul (f64.load offset=96 (i32.shl (local.get $j) (i32.const 3))) (local.get $d))))
      (local.set $gy (f64.add (local.get $gy)
        (f64.mul (f64.load offset=144 (i32.shl (local.get $j) (i32.const 3))) (local.get $a))))
      (local.set $p (i32.add (local.get $p) (global.get $s1)))
      (br_if $rows (i32.lt_u (local.tee $j (i32.add (local.get $j) (i32.const 1))) (i32.const 6))))
    (f64.store (i32.const 288) (local.get $gx))
    (f64.store (i32.const 296) (local.get $gy))))
