#include "textflag.h"

// Four copies of each constant, so that they serve as 256-bit memory operands.
#define CONST4(name, bits) \
	DATA name<>+0(SB)/8, $bits \
	DATA name<>+8(SB)/8, $bits \
	DATA name<>+16(SB)/8, $bits \
	DATA name<>+24(SB)/8, $bits \
	GLOBL name<>(SB), RODATA|NOPTR, $32

CONST4(c708, 0x4086200000000000)    // 708
CONST4(sign, 0x8000000000000000)    // sign bit
CONST4(c64ln2, 0x40571547652b82fe)  // 64/ln2
CONST4(shifter, 0x4338000000000000) // 1.5·2^52
CONST4(mln2, 0xbf862e42fefa39ef)    // −ln2/64
CONST4(c6, 0x3fc5555555555555)      // 1/6
CONST4(c2, 0x3fe0000000000000)      // 1/2
CONST4(c120, 0x3f81111111111111)    // 1/120
CONST4(c24, 0x3fa5555555555555)     // 1/24
CONST4(one, 0x3ff0000000000000)     // 1
CONST4(k1, 0x4337ffffffff0040)      // bits(shifter) − 1023·64
CONST4(mask63, 0x000000000000003f)  // 63

// func escapesAVX2(dst, tau, wl []float64)
TEXT ·escapesAVX2(SB), NOSPLIT, $0-72
	MOVQ dst_base+0(FP), DI
	MOVQ tau_base+24(FP), SI
	MOVQ wl_base+48(FP), DX
	MOVQ wl_len+56(FP), CX
	SHRQ $2, CX
	JZ   done
	LEAQ ·expTable(SB), R8

loop:
	VMOVUPD     (SI), Y0
	VMINPD      c708<>(SB), Y0, Y0     // min(τ, 708); NaN → 708
	VXORPD      sign<>(SB), Y0, Y0     // y = −min(τ, 708)
	VMOVUPD     shifter<>(SB), Y1
	VFMADD231PD c64ln2<>(SB), Y0, Y1   // t = y·64/ln2 + shifter
	VSUBPD      shifter<>(SB), Y1, Y2  // kf = t − shifter
	VFMADD231PD mln2<>(SB), Y2, Y0     // r = y − kf·ln2/64
	VPAND       mask63<>(SB), Y1, Y3   // j = k & 63
	VPSUBQ      k1<>(SB), Y1, Y1       // k + 1023·64
	VPSRLQ      $6, Y1, Y1             // (k >> 6) + 1023
	VPSLLQ      $52, Y1, Y1            // 2^m
	VPCMPEQQ    Y2, Y2, Y2             // gather mask: all lanes
	VGATHERQPD  Y2, (R8)(Y3*8), Y4     // 2^(j/64)
	VMULPD      Y1, Y4, Y4             // s = 2^m·2^(j/64)
	VMULPD      Y0, Y0, Y1             // r²
	VMOVUPD     c2<>(SB), Y2
	VFMADD231PD c6<>(SB), Y0, Y2       // r/6 + 1/2
	VMOVUPD     c24<>(SB), Y3
	VFMADD231PD c120<>(SB), Y0, Y3     // r/120 + 1/24
	VFMADD231PD Y3, Y1, Y2             // r²(r/120 + 1/24) + r/6 + 1/2
	VFMADD213PD Y0, Y1, Y2             // q = r²·(…) + r
	VSUBPD      one<>(SB), Y4, Y3      // s − 1
	VFMADD231PD Y2, Y4, Y3             // s·q + (s − 1) = e^y − 1
	VMULPD      (DX), Y3, Y3           // λ(e^y − 1)
	VXORPD      sign<>(SB), Y3, Y3     // λ(1 − e^y)
	VMOVUPD     Y3, (DI)
	ADDQ        $32, SI
	ADDQ        $32, DX
	ADDQ        $32, DI
	DECQ        CX
	JNZ         loop
	VZEROUPPER

done:
	RET

// ESCAPE sets Y3 = e^y − 1 for y = −min(Y0, 708) in each lane, by the steps
// of escape; it uses Y0–Y4.
#define ESCAPE \
	VMINPD      c708<>(SB), Y0, Y0    \
	VXORPD      sign<>(SB), Y0, Y0    \
	VMOVUPD     shifter<>(SB), Y1     \
	VFMADD231PD c64ln2<>(SB), Y0, Y1  \
	VSUBPD      shifter<>(SB), Y1, Y2 \
	VFMADD231PD mln2<>(SB), Y2, Y0    \
	VPAND       mask63<>(SB), Y1, Y3  \
	VPSUBQ      k1<>(SB), Y1, Y1      \
	VPSRLQ      $6, Y1, Y1            \
	VPSLLQ      $52, Y1, Y1           \
	VPCMPEQQ    Y2, Y2, Y2            \
	VGATHERQPD  Y2, (R8)(Y3*8), Y4    \
	VMULPD      Y1, Y4, Y4            \
	VMULPD      Y0, Y0, Y1            \
	VMOVUPD     c2<>(SB), Y2          \
	VFMADD231PD c6<>(SB), Y0, Y2      \
	VMOVUPD     c24<>(SB), Y3         \
	VFMADD231PD c120<>(SB), Y0, Y3    \
	VFMADD231PD Y3, Y1, Y2            \
	VFMADD213PD Y0, Y1, Y2            \
	VSUBPD      one<>(SB), Y4, Y3     \
	VFMADD231PD Y2, Y4, Y3

// func stimAVX2(dst, wl []float64, hck float64)
TEXT ·stimAVX2(SB), NOSPLIT, $0-56
	MOVQ         dst_base+0(FP), DI
	MOVQ         wl_base+24(FP), DX
	MOVQ         wl_len+32(FP), CX
	SHRQ         $2, CX
	JZ           sdone
	VBROADCASTSD hck+48(FP), Y6
	LEAQ         ·expTable(SB), R8

sloop:
	VMOVUPD (DX), Y5           // λ
	VDIVPD  Y5, Y6, Y0         // x = hc/λkT
	ESCAPE                     // Y3 = e^{−x} − 1
	VXORPD  sign<>(SB), Y3, Y3 // 1 − e^{−x}
	VMOVUPD Y3, (DI)
	ADDQ    $32, DX
	ADDQ    $32, DI
	DECQ    CX
	JNZ     sloop
	VZEROUPPER

sdone:
	RET
