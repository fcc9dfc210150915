;; The levels of skyfold's source pyramid (src/remap/pyramid.ts is the reference), for 8-bit images
;; with C interleaved channels: reduce8, the 2 x 2 box reduction to half size, and box8, the 2 x 2
;; box at full size (the half level between the source and level 1). Each output sample is
;; (a + b + c + d + 2) >> 2, a missing last column or row replaced by the one before it.
;; Bit-identical to the JavaScript reference.
;;
;; Memory is the caller's: the W x H x C source at $src, the output ((W+1)/2 x (H+1)/2 x C) at $out.
;; The caller leaves 32 bytes of slack after both (whole 16-byte vectors are read and written).
;; $mask (16 bytes) is the i8x16.swizzle mask that gathers, from 16 sums of sample i and i + C,
;; the first sample of each pixel pair; $step source bytes give $take output bytes per vector.
(module
  (memory (export "memory") 1)

  (func (export "reduce8")
    (param $src i32) (param $W i32) (param $H i32) (param $C i32) (param $out i32)
    (param $mask i32) (param $step i32) (param $take i32)
    (local $q i32) (local $h i32) (local $w i32) (local $WC i32) (local $wC i32)
    (local $r0 i32) (local $r1 i32) (local $o i32) (local $x i32) (local $end i32) (local $c i32)
    (local $m v128) (local $two v128)
    (local $a v128) (local $b v128) (local $lo v128) (local $hi v128)
    (local.set $h (i32.shr_u (i32.add (local.get $H) (i32.const 1)) (i32.const 1)))
    (local.set $w (i32.shr_u (i32.add (local.get $W) (i32.const 1)) (i32.const 1)))
    (local.set $WC (i32.mul (local.get $W) (local.get $C)))
    (local.set $wC (i32.mul (local.get $w) (local.get $C)))
    (local.set $m (v128.load (local.get $mask)))
    (local.set $two (i16x8.splat (i32.const 2)))
    (block $rows_done
      (loop $row
        (br_if $rows_done (i32.ge_u (local.get $q) (local.get $h)))
        (local.set $r0 (i32.add (local.get $src) (i32.mul (i32.shl (local.get $q) (i32.const 1)) (local.get $WC))))
        (local.set $r1
          (select
            (i32.add (local.get $r0) (local.get $WC))
            (local.get $r0)
            (i32.lt_u (i32.add (i32.shl (local.get $q) (i32.const 1)) (i32.const 1)) (local.get $H))))
        (local.set $o (i32.add (local.get $out) (i32.mul (local.get $q) (local.get $wC))))
        ;; Pixel pairs with two source columns: source bytes [0, (W >> 1) * 2C) of the row.
        (local.set $end (i32.mul (i32.shr_u (local.get $W) (i32.const 1)) (i32.shl (local.get $C) (i32.const 1))))
        (local.set $x (i32.const 0))
        (block $cols_done
          (loop $col
            (br_if $cols_done (i32.ge_u (local.get $x) (local.get $end)))
            ;; 16 samples i and i + C of both rows, widened to 16 bits and summed.
            (local.set $a (v128.load (i32.add (local.get $r0) (local.get $x))))
            (local.set $b (v128.load (i32.add (i32.add (local.get $r0) (local.get $x)) (local.get $C))))
            (local.set $lo (i16x8.add (i16x8.extend_low_i8x16_u (local.get $a)) (i16x8.extend_low_i8x16_u (local.get $b))))
            (local.set $hi (i16x8.add (i16x8.extend_high_i8x16_u (local.get $a)) (i16x8.extend_high_i8x16_u (local.get $b))))
            (local.set $a (v128.load (i32.add (local.get $r1) (local.get $x))))
            (local.set $b (v128.load (i32.add (i32.add (local.get $r1) (local.get $x)) (local.get $C))))
            (local.set $lo (i16x8.add (local.get $lo)
              (i16x8.add (i16x8.extend_low_i8x16_u (local.get $a)) (i16x8.extend_low_i8x16_u (local.get $b)))))
            (local.set $hi (i16x8.add (local.get $hi)
              (i16x8.add (i16x8.extend_high_i8x16_u (local.get $a)) (i16x8.extend_high_i8x16_u (local.get $b)))))
            (local.set $lo (i16x8.shr_u (i16x8.add (local.get $lo) (local.get $two)) (i32.const 2)))
            (local.set $hi (i16x8.shr_u (i16x8.add (local.get $hi) (local.get $two)) (i32.const 2)))
            (v128.store (local.get $o)
              (i8x16.swizzle (i8x16.narrow_i16x8_u (local.get $lo) (local.get $hi)) (local.get $m)))
            (local.set $o (i32.add (local.get $o) (local.get $take)))
            (local.set $x (i32.add (local.get $x) (local.get $step)))
            (br $col)))
        ;; The vectors may have run past the pairs; the odd last column, if any, is written after them.
        (if (i32.and (local.get $W) (i32.const 1))
          (then
            (local.set $o (i32.add (i32.add (local.get $out) (i32.mul (local.get $q) (local.get $wC)))
              (i32.sub (local.get $wC) (local.get $C))))
            (local.set $c (i32.const 0))
            (loop $ch
              (i32.store8 (i32.add (local.get $o) (local.get $c))
                (i32.shr_u
                  (i32.add
                    (i32.shl
                      (i32.add
                        (i32.load8_u (i32.add (i32.add (local.get $r0) (local.get $end)) (local.get $c)))
                        (i32.load8_u (i32.add (i32.add (local.get $r1) (local.get $end)) (local.get $c))))
                      (i32.const 1))
                    (i32.const 2))
                  (i32.const 2)))
              (local.set $c (i32.add (local.get $c) (i32.const 1)))
              (br_if $ch (i32.lt_u (local.get $c) (local.get $C))))))
        (local.set $q (i32.add (local.get $q) (i32.const 1)))
        (br $row))))

  ;; out[q][p] = the rounded mean of pixels (p, q), (p+1, q), (p, q+1), (p+1, q+1), clamped at the
  ;; last column and row; out is W x H x C like src.
  (func (export "box8")
    (param $src i32) (param $W i32) (param $H i32) (param $C i32) (param $out i32)
    (local $q i32) (local $WC i32) (local $r0 i32) (local $r1 i32) (local $o i32) (local $x i32)
    (local $end i32) (local $c i32) (local $two v128)
    (local $a v128) (local $b v128) (local $lo v128) (local $hi v128)
    (local.set $WC (i32.mul (local.get $W) (local.get $C)))
    (local.set $end (i32.sub (local.get $WC) (local.get $C)))
    (local.set $two (i16x8.splat (i32.const 2)))
    (block $rows_done
      (loop $row
        (br_if $rows_done (i32.ge_u (local.get $q) (local.get $H)))
        (local.set $r0 (i32.add (local.get $src) (i32.mul (local.get $q) (local.get $WC))))
        (local.set $r1
          (select
            (i32.add (local.get $r0) (local.get $WC))
            (local.get $r0)
            (i32.lt_u (i32.add (local.get $q) (i32.const 1)) (local.get $H))))
        (local.set $o (i32.add (local.get $out) (i32.mul (local.get $q) (local.get $WC))))
        (local.set $x (i32.const 0))
        (block $cols_done
          (loop $col
            (br_if $cols_done (i32.ge_u (local.get $x) (local.get $end)))
            (local.set $a (v128.load (i32.add (local.get $r0) (local.get $x))))
            (local.set $b (v128.load (i32.add (i32.add (local.get $r0) (local.get $x)) (local.get $C))))
            (local.set $lo (i16x8.add (i16x8.extend_low_i8x16_u (local.get $a)) (i16x8.extend_low_i8x16_u (local.get $b))))
            (local.set $hi (i16x8.add (i16x8.extend_high_i8x16_u (local.get $a)) (i16x8.extend_high_i8x16_u (local.get $b))))
            (local.set $a (v128.load (i32.add (local.get $r1) (local.get $x))))
            (local.set $b (v128.load (i32.add (i32.add (local.get $r1) (local.get $x)) (local.get $C))))
            (local.set $lo (i16x8.add (local.get $lo)
              (i16x8.add (i16x8.extend_low_i8x16_u (local.get $a)) (i16x8.extend_low_i8x16_u (local.get $b)))))
            (local.set $hi (i16x8.add (local.get $hi)
              (i16x8.add (i16x8.extend_high_i8x16_u (local.get $a)) (i16x8.extend_high_i8x16_u (local.get $b)))))
            (local.set $lo (i16x8.shr_u (i16x8.add (local.get $lo) (local.get $two)) (i32.const 2)))
            (local.set $hi (i16x8.shr_u (i16x8.add (local.get $hi) (local.get $two)) (i32.const 2)))
            (v128.store (i32.add (local.get $o) (local.get $x)) (i8x16.narrow_i16x8_u (local.get $lo) (local.get $hi)))
            (local.set $x (i32.add (local.get $x) (i32.const 16)))
            (br $col)))
        ;; The last column, written after the vectors that may have run over it.
        (local.set $c (i32.const 0))
        (loop $ch
          (i32.store8 (i32.add (i32.add (local.get $o) (local.get $end)) (local.get $c))
            (i32.shr_u
              (i32.add
                (i32.shl
                  (i32.add
                    (i32.load8_u (i32.add (i32.add (local.get $r0) (local.get $end)) (local.get $c)))
                    (i32.load8_u (i32.add (i32.add (local.get $r1) (local.get $end)) (local.get $c))))
                  (i32.const 1))
                (i32.const 2))
              (i32.const 2)))
          (local.set $c (i32.add (local.get $c) (i32.const 1)))
          (br_if $ch (i32.lt_u (local.get $c) (local.get $C))))
        (local.set $q (i32.add (local.get $q) (i32.const 1)))
        (br $row))))
)
