//go:build amd64 && !noasm

#include "textflag.h"

#define PFD 2048

// The vector loops take the steps of Escape (escape.go) lane by lane,
// with the same constants and the same fused multiply-adds, so they give
// the same bits as the portable Go loop.

// Four copies of each constant, so that they serve as 256-bit memory
// operands (and the first as the source of a broadcast to 512 bits).
#define CONST4(name, bits) \
	DATA name<>+0(SB)/8, $bits \
	DATA name<>+8(SB)/8, $bits \
	DATA name<>+16(SB)/8, $bits \
	DATA name<>+24(SB)/8, $bits \
	GLOBL name<>(SB), RODATA|NOPTR, $32

CONST4(c708, 0x4086200000000000)    // 708
CONST4(sign, 0x8000000000000000)    // sign bit
CONST4(c16ln2, 0x40371547652b82fe)  // 16/ln2
CONST4(shifter, 0x4338000000000000) // 1.5·2^52
CONST4(mln2, 0xbfa62e42fefa39ef)    // −ln2/16
CONST4(c2, 0x3fe0000000000000)      // 1/2
CONST4(c6, 0x3fc5555555555555)      // 1/6
CONST4(c24, 0x3fa5555555555555)     // 1/24
CONST4(c120, 0x3f81111111111111)    // 1/120
CONST4(c720, 0x3f56c16c16c16c17)    // 1/720
CONST4(c5040, 0x3f2a01a01a01a01a)   // 1/5040
CONST4(one, 0x3ff0000000000000)     // 1
CONST4(k1, 0x4337ffffffffc010)      // bits(shifter) − 1023·16
CONST4(pair, 0x0000000100000000)    // dwords 0, 1

// ESCAPE sets Y3 = e^y − 1 for y = −min(Y0, 708) in each of four lanes;
// it uses Y0–Y5, Y13 and Y14 and needs the table 2^(j/16) in Y9–Y12 (four
// entries each, see LOADTABLE). The table is looked up with permutations
// (VPERMD picks dword pairs within one register, VBLENDVPD then picks the
// register by bits 2 and 3 of j): a vector gather costs about three times
// as much on the processors measured.
#define ESCAPE \
	VMINPD      c708<>(SB), Y0, Y0     /* min(τ, 708); NaN → 708 */ \
	VXORPD      sign<>(SB), Y0, Y0     /* y */ \
	VMOVUPD     shifter<>(SB), Y1      \
	VFMADD231PD c16ln2<>(SB), Y0, Y1   /* t = y·16/ln2 + shifter; j = low 4 bits */ \
	VSUBPD      shifter<>(SB), Y1, Y2  /* kf = t − shifter */ \
	VFMADD231PD mln2<>(SB), Y2, Y0     /* r = y − kf·ln2/16 */ \
	VPADDQ      Y1, Y1, Y13            \
	VPSHUFD     $0xA0, Y13, Y13        \
	VPOR        pair<>(SB), Y13, Y13   /* dword indices 2(j&3), 2(j&3)+1 */ \
	VPERMD      Y9, Y13, Y2            /* T[j&3] */ \
	VPERMD      Y10, Y13, Y3           /* T[4 + j&3] */ \
	VPSLLQ      $61, Y1, Y14           /* bit 2 of j to the sign */ \
	VBLENDVPD   Y14, Y3, Y2, Y4        /* T[j&7] */ \
	VPERMD      Y11, Y13, Y2           /* T[8 + j&3] */ \
	VPERMD      Y12, Y13, Y3           /* T[12 + j&3] */ \
	VBLENDVPD   Y14, Y3, Y2, Y5        /* T[8 + j&7] */ \
	VPSLLQ      $60, Y1, Y14           /* bit 3 of j to the sign */ \
	VBLENDVPD   Y14, Y5, Y4, Y4        /* T[j] = 2^(j/16) */ \
	VPSUBQ      k1<>(SB), Y1, Y1       /* k + 1023·16 */ \
	VPSRLQ      $4, Y1, Y1             /* (k >> 4) + 1023 */ \
	VPSLLQ      $52, Y1, Y1            /* 2^m */ \
	VMULPD      Y1, Y4, Y4             /* s = 2^m·2^(j/16) */ \
	VMULPD      Y0, Y0, Y1             /* r² */ \
	VMOVUPD     c2<>(SB), Y2           \
	VFMADD231PD c6<>(SB), Y0, Y2       /* a = r/6 + 1/2 */ \
	VMOVUPD     c24<>(SB), Y3          \
	VFMADD231PD c120<>(SB), Y0, Y3     /* b = r/120 + 1/24 */ \
	VMOVUPD     c720<>(SB), Y5         \
	VFMADD231PD c5040<>(SB), Y0, Y5    /* r/5040 + 1/720 */ \
	VFMADD213PD Y3, Y1, Y5             /* c = r²(r/5040 + 1/720) + b */ \
	VFMADD213PD Y2, Y1, Y5             /* r²c + a */ \
	VFMADD213PD Y0, Y1, Y5             /* q = r²(r²c + a) + r */ \
	VSUBPD      one<>(SB), Y4, Y3      /* s − 1 */ \
	VFMADD231PD Y5, Y4, Y3             // s·q + (s − 1) = e^y − 1

// LOADTABLE puts the 16 entries of expTable16 into Y9–Y12.
#define LOADTABLE \
	VMOVUPD ·expTable16+0(SB), Y9   \
	VMOVUPD ·expTable16+32(SB), Y10 \
	VMOVUPD ·expTable16+64(SB), Y11 \
	VMOVUPD ·expTable16+96(SB), Y12

// func escapesAVX2(dst, tau, wl []float64)
TEXT ·escapesAVX2(SB), NOSPLIT, $0-72
	MOVQ dst_base+0(FP), DI
	MOVQ tau_base+24(FP), SI
	MOVQ wl_base+48(FP), DX
	MOVQ wl_len+56(FP), CX
	SHRQ $2, CX
	JZ   edone
	LOADTABLE

eloop:
	VMOVUPD (SI), Y0
	ESCAPE
	VMULPD  (DX), Y3, Y3       // λ(e^y − 1)
	VXORPD  sign<>(SB), Y3, Y3 // λ(1 − e^y)
	VMOVUPD Y3, (DI)
	ADDQ    $32, SI
	ADDQ    $32, DX
	ADDQ    $32, DI
	DECQ    CX
	JNZ     eloop
	VZEROUPPER

edone:
	RET

// The AVX-512 loops keep every constant in Z16–Z30 for the whole loop and
// the 16-entry table 2^(j/16) in Z29:Z30, where one permutation (VPERMI2PD,
// which reads the low four bits of each index) looks it up for eight lanes
// in place of a gather.
#define LOADCONSTS512 \
	VBROADCASTSD c708<>(SB), Z16           \
	VBROADCASTSD sign<>(SB), Z17           \
	VBROADCASTSD c16ln2<>(SB), Z18         \
	VBROADCASTSD shifter<>(SB), Z19        \
	VBROADCASTSD mln2<>(SB), Z20           \
	VBROADCASTSD c6<>(SB), Z21             \
	VBROADCASTSD c2<>(SB), Z22             \
	VBROADCASTSD c120<>(SB), Z23           \
	VBROADCASTSD c24<>(SB), Z24            \
	VBROADCASTSD one<>(SB), Z25            \
	VBROADCASTSD k1<>(SB), Z26             \
	VBROADCASTSD c720<>(SB), Z27           \
	VBROADCASTSD c5040<>(SB), Z28          \
	VMOVUPD      ·expTable16+0(SB), Z29    \
	VMOVUPD      ·expTable16+64(SB), Z30

// ESCAPE512 sets Z3 = e^y − 1 for y = −min(Z0, 708) in each of eight lanes,
// by the steps of ESCAPE; it uses Z0–Z5.
#define ESCAPE512 \
	VMINPD      Z16, Z0, Z0 /* min(τ, 708); NaN → 708 */ \
	VXORPD      Z17, Z0, Z0 /* y */ \
	VMOVAPD     Z19, Z1     \
	VFMADD231PD Z18, Z0, Z1 /* t = y·16/ln2 + shifter */ \
	VSUBPD      Z19, Z1, Z2 /* kf */ \
	VFMADD231PD Z20, Z2, Z0 /* r */ \
	VMOVAPD     Z1, Z4      \
	VPERMI2PD   Z30, Z29, Z4 /* 2^(j/16), j = low four bits of t */ \
	VPSUBQ      Z26, Z1, Z1 \
	VPSRLQ      $4, Z1, Z1  \
	VPSLLQ      $52, Z1, Z1 /* 2^m */ \
	VMULPD      Z1, Z4, Z4  /* s */ \
	VMULPD      Z0, Z0, Z1  /* r² */ \
	VMOVAPD     Z22, Z2     \
	VFMADD231PD Z21, Z0, Z2 /* a */ \
	VMOVAPD     Z24, Z3     \
	VFMADD231PD Z23, Z0, Z3 /* b */ \
	VMOVAPD     Z27, Z5     \
	VFMADD231PD Z28, Z0, Z5 \
	VFMADD213PD Z3, Z1, Z5  /* c */ \
	VFMADD213PD Z2, Z1, Z5  \
	VFMADD213PD Z0, Z1, Z5  /* q */ \
	VSUBPD      Z25, Z4, Z3 \
	VFMADD231PD Z5, Z4, Z3  // e^y − 1

// func escapesAVX512(dst, tau, wl []float64)
TEXT ·escapesAVX512(SB), NOSPLIT, $0-72
	MOVQ dst_base+0(FP), DI
	MOVQ tau_base+24(FP), SI
	MOVQ wl_base+48(FP), DX
	MOVQ wl_len+56(FP), CX
	SHRQ $3, CX
	JZ   edone512
	LOADCONSTS512

eloop512:
	VMOVUPD (SI), Z0
	ESCAPE512
	VMULPD  (DX), Z3, Z3 // λ(e^y − 1)
	VXORPD  Z17, Z3, Z3  // λ(1 − e^y)
	VMOVUPD Z3, (DI)
	ADDQ    $64, SI
	ADDQ    $64, DX
	ADDQ    $64, DI
	DECQ    CX
	JNZ     eloop512
	VZEROUPPER

edone512:
	RET

// The line loops take a block in two loops, so that each iteration's chain
// of dependent steps is short and the processor overlaps many iterations:
// first the stimulated-emission factors 1 − e^{−x}, x = hc/λkT, into dst;
// then τ = ((λ·gf)·lv)·stim and λ(1 − e^{−τ}) over them, in place.

// func linesAVX2(dst, wl, gf, lv []float64, hck float64)
TEXT ·linesAVX2(SB), NOSPLIT, $0-104
	MOVQ         wl_len+32(FP), CX
	SHRQ         $2, CX
	JZ           ldone
	MOVQ         CX, R9
	MOVQ         dst_base+0(FP), DI
	MOVQ         wl_base+24(FP), DX
	VBROADCASTSD hck+96(FP), Y6
	LOADTABLE

lstim:
	VMOVUPD (DX), Y7
	VDIVPD  Y7, Y6, Y0         // x = hc/λkT
	ESCAPE                     // Y3 = e^{−x} − 1
	VXORPD  sign<>(SB), Y3, Y3 // stim = 1 − e^{−x}
	VMOVUPD Y3, (DI)
	ADDQ    $32, DX
	ADDQ    $32, DI
	DECQ    CX
	JNZ     lstim

	MOVQ dst_base+0(FP), DI
	MOVQ wl_base+24(FP), DX
	MOVQ gf_base+48(FP), SI
	MOVQ lv_base+72(FP), BX

lesc:
	VMOVUPD (DX), Y7
	VMULPD  (SI), Y7, Y0       // λ·gf
	VMULPD  (BX), Y0, Y0       // ·lv
	VMULPD  (DI), Y0, Y0       // τ = ·stim
	ESCAPE                     // Y3 = e^{−τ} − 1
	VMULPD  Y7, Y3, Y3         // λ(e^{−τ} − 1)
	VXORPD  sign<>(SB), Y3, Y3 // λ(1 − e^{−τ})
	VMOVUPD Y3, (DI)
	ADDQ    $32, DX
	ADDQ    $32, SI
	ADDQ    $32, BX
	ADDQ    $32, DI
	DECQ    R9
	JNZ     lesc
	VZEROUPPER

ldone:
	RET

// func linesAVX512(dst, wl, gf, lv []float64, hck float64)
TEXT ·linesAVX512(SB), NOSPLIT, $0-104
	MOVQ         wl_len+32(FP), CX
	SHRQ         $3, CX
	JZ           ldone512
	MOVQ         CX, R9
	MOVQ         dst_base+0(FP), DI
	MOVQ         wl_base+24(FP), DX
	MOVQ         gf_base+48(FP), SI
	VBROADCASTSD hck+96(FP), Z31
	LOADCONSTS512

lstim512:
	PREFETCHT0 PFD(DX)
	PREFETCHT0 PFD(SI)
	VMOVUPD    (DX), Z6
	VDIVPD     Z6, Z31, Z0 // x = hc/λkT
	ESCAPE512              // Z3 = e^{−x} − 1
	VXORPD     Z17, Z3, Z3 // stim = 1 − e^{−x}
	VMOVUPD    Z3, (DI)
	ADDQ       $64, DX
	ADDQ       $64, SI
	ADDQ       $64, DI
	DECQ       CX
	JNZ        lstim512

	MOVQ dst_base+0(FP), DI
	MOVQ wl_base+24(FP), DX
	MOVQ gf_base+48(FP), SI
	MOVQ lv_base+72(FP), BX

lesc512:
	VMOVUPD (DX), Z6
	VMULPD  (SI), Z6, Z0 // λ·gf
	VMULPD  (BX), Z0, Z0 // ·lv
	VMULPD  (DI), Z0, Z0 // τ = ·stim
	ESCAPE512            // Z3 = e^{−τ} − 1
	VMULPD  Z6, Z3, Z3   // λ(e^{−τ} − 1)
	VXORPD  Z17, Z3, Z3  // λ(1 − e^{−τ})
	VMOVUPD Z3, (DI)
	ADDQ    $64, DX
	ADDQ    $64, SI
	ADDQ    $64, BX
	ADDQ    $64, DI
	DECQ    R9
	JNZ     lesc512
	VZEROUPPER

ldone512:
	RET

// The scatter loops take the steps of scatterGo: the escape difference in
// single precision, widened, then products and sums each rounded (no fused
// multiply-adds), so they give the Go loop's bits.

// func scatterAVX2(I []float64, a0, a1 []float32, f, w, c float64)
TEXT ·scatterAVX2(SB), NOSPLIT, $0-96
	MOVQ         I_base+0(FP), DI
	MOVQ         I_len+8(FP), CX
	MOVQ         a0_base+24(FP), SI
	MOVQ         a1_base+48(FP), DX
	SHRQ         $2, CX
	JZ           sdone
	VBROADCASTSD f+72(FP), Y6
	VBROADCASTSD w+80(FP), Y7
	VBROADCASTSD c+88(FP), Y8

sloop:
	VMOVUPS   (SI), X0
	VMOVUPS   (DX), X1
	VSUBPS    X0, X1, X1 // a1 − a0, single precision
	VCVTPS2PD X0, Y0
	VCVTPS2PD X1, Y1
	VMULPD    Y6, Y1, Y1 // f·d
	VADDPD    Y1, Y0, Y0 // a0 + f·d
	VMULPD    Y8, Y0, Y0 // t = c·(a0 + f·d)
	VMOVUPD   (DI), Y2
	VSUBPD    Y2, Y7, Y3 // w − I
	VMULPD    Y0, Y3, Y3 // (w − I)·t
	VADDPD    Y3, Y2, Y2 // I + (w − I)·t
	VMOVUPD   Y2, (DI)
	ADDQ      $16, SI
	ADDQ      $16, DX
	ADDQ      $32, DI
	DECQ      CX
	JNZ       sloop
	VZEROUPPER

sdone:
	RET

// func scatterAVX512(I []float64, a0, a1 []float32, f, w, c float64)
TEXT ·scatterAVX512(SB), NOSPLIT, $0-96
	MOVQ         I_base+0(FP), DI
	MOVQ         I_len+8(FP), CX
	MOVQ         a0_base+24(FP), SI
	MOVQ         a1_base+48(FP), DX
	SHRQ         $3, CX
	JZ           sdone512
	VBROADCASTSD f+72(FP), Z6
	VBROADCASTSD w+80(FP), Z7
	VBROADCASTSD c+88(FP), Z8

sloop512:
	VMOVUPS   (SI), Y0
	VMOVUPS   (DX), Y1
	VSUBPS    Y0, Y1, Y1
	VCVTPS2PD Y0, Z0
	VCVTPS2PD Y1, Z1
	VMULPD    Z6, Z1, Z1
	VADDPD    Z1, Z0, Z0
	VMULPD    Z8, Z0, Z0
	VMOVUPD   (DI), Z2
	VSUBPD    Z2, Z7, Z3
	VMULPD    Z0, Z3, Z3
	VADDPD    Z3, Z2, Z2
	VMOVUPD   Z2, (DI)
	ADDQ      $32, SI
	ADDQ      $32, DX
	ADDQ      $64, DI
	DECQ      CX
	JNZ       sloop512
	VZEROUPPER

sdone512:
	RET

// The run-decay loops: a depth that is not positive becomes 0 (VMAXPD
// returns its second operand, 0, for NaN and for ±0, as the Go loop's
// !(t > 0) does), ESCAPE gives e^{−t} − 1 = −Escape(t), and
// I + (I − w)·(e^{−t} − 1) is the Go loop's I − (I − w)·Escape(t) bit for
// bit (a sign change is exact).

CONST4(zero, 0x0000000000000000)

// func runDecayAVX2(I, t []float64, w float64)
TEXT ·runDecayAVX2(SB), NOSPLIT, $0-56
	MOVQ         I_base+0(FP), DI
	MOVQ         I_len+8(FP), CX
	MOVQ         t_base+24(FP), SI
	SHRQ         $2, CX
	JZ           rdone
	VBROADCASTSD w+48(FP), Y6
	VMOVUPD      zero<>(SB), Y7
	LOADTABLE

rloop:
	VMOVUPD (SI), Y0
	VMAXPD  Y7, Y0, Y0 // max(t, 0); NaN → 0
	ESCAPE
	VMOVUPD (DI), Y8
	VSUBPD  Y6, Y8, Y1 // I − w
	VMULPD  Y3, Y1, Y1 // (I − w)(e^{−t} − 1)
	VADDPD  Y1, Y8, Y8
	VMOVUPD Y8, (DI)
	ADDQ    $32, SI
	ADDQ    $32, DI
	DECQ    CX
	JNZ     rloop
	VZEROUPPER

rdone:
	RET

// func runDecayAVX512(I, t []float64, w float64)
TEXT ·runDecayAVX512(SB), NOSPLIT, $0-56
	MOVQ         I_base+0(FP), DI
	MOVQ         I_len+8(FP), CX
	MOVQ         t_base+24(FP), SI
	SHRQ         $3, CX
	JZ           rdone512
	VBROADCASTSD w+48(FP), Z6
	VBROADCASTSD zero<>(SB), Z7
	LOADCONSTS512

rloop512:
	VMOVUPD (SI), Z0
	VMAXPD  Z7, Z0, Z0
	ESCAPE512
	VMOVUPD (DI), Z8
	VSUBPD  Z6, Z8, Z1
	VMULPD  Z3, Z1, Z1
	VADDPD  Z1, Z8, Z8
	VMOVUPD Z8, (DI)
	ADDQ    $64, SI
	ADDQ    $64, DI
	DECQ    CX
	JNZ     rloop512
	VZEROUPPER

rdone512:
	RET
