//go:build !purego

#include "textflag.h"

// Offsets in windowConsts (32 bytes each) and windowOut.
#define QUARTER 0
#define R4 32
#define R3 64
#define R2 96
#define R1 128
#define ONE 160
#define POSINF 192
#define NEGINF 224
#define FOUR 256
#define C2MAX 288
#define EXACT 320
#define LANE 352

// func windowSumsAVX2(x, y, z, v, d2 *float64, m int, cx, cy, cz float64, k *windowConsts, out *windowOut)
//
// The loop of windowSumsGo, four stations per block. Registers:
// Y15, Y14, Y13 the cell (cx, cy, cz); Y12 sw, Y11 swz, Y10 lo, Y9 hi,
// Y8 the largest chord squared within the radius, Y7 the lane numbers j,
// Y6 m; R10 the count, R13 the 1 m flags.
// Go assembler order: the destination is the last operand, and
// VSUBPD A, B, D is D = B - A.
TEXT ·windowSumsAVX2(SB), NOSPLIT, $0-88
	MOVQ x+0(FP), AX
	MOVQ y+8(FP), BX
	MOVQ z+16(FP), CX
	MOVQ v+24(FP), DX
	MOVQ d2+32(FP), DI
	MOVQ m+40(FP), R8
	MOVQ k+72(FP), R9
	MOVQ out+80(FP), R12

	VBROADCASTSD cx+48(FP), Y15
	VBROADCASTSD cy+56(FP), Y14
	VBROADCASTSD cz+64(FP), Y13
	VXORPD Y12, Y12, Y12
	VXORPD Y11, Y11, Y11
	VMOVUPD POSINF(R9), Y10
	VMOVUPD NEGINF(R9), Y9
	VXORPD Y8, Y8, Y8
	VMOVDQU LANE(R9), Y7
	VPBROADCASTQ m+40(FP), Y6
	XORQ R10, R10
	XORQ R13, R13
	XORQ SI, SI

loop:
	CMPQ SI, R8
	JGE done

	// c2 = (x-cx)^2 + (y-cy)^2 + (z-cz)^2, stored to d2.
	VMOVUPD (AX)(SI*8), Y0
	VSUBPD Y15, Y0, Y0
	VMULPD Y0, Y0, Y0
	VMOVUPD (BX)(SI*8), Y1
	VSUBPD Y14, Y1, Y1
	VMULPD Y1, Y1, Y1
	VADDPD Y1, Y0, Y0
	VMOVUPD (CX)(SI*8), Y1
	VSUBPD Y13, Y1, Y1
	VMULPD Y1, Y1, Y1
	VADDPD Y1, Y0, Y0
	VMOVUPD Y0, (DI)(SI*8)

	// Y2 = the lanes within the radius (c2 <= c2max) and before m.
	VCMPPD $2, C2MAX(R9), Y0, Y2
	VPCMPGTQ Y7, Y6, Y3
	VANDPD Y3, Y2, Y2
	VPADDQ FOUR(R9), Y7, Y7
	VMOVMSKPD Y2, R11
	POPCNTL R11, R11
	ADDQ R11, R10

	// The 1 m rule: c2 < exact in a lane within the radius.
	VCMPPD $1, EXACT(R9), Y0, Y3
	VANDPD Y2, Y3, Y3
	VMOVMSKPD Y3, R11
	ORQ R11, R13

	// The largest chord squared within the radius (a chord squared is
	// not negative, so the lanes outside count as +0).
	VANDPD Y2, Y0, Y3
	VMAXPD Y3, Y8, Y8

	// w = (1 / c2) ((1 + r1 t) + t^2 ((r2 + r3 t) + r4 t^2)), t = c2 / 4,
	// zero outside the lanes of Y2. The division and the polynomial
	// (Estrin's scheme) depend on c2 only, so they overlap.
	VMOVUPD ONE(R9), Y5
	VDIVPD Y0, Y5, Y5
	VMULPD QUARTER(R9), Y0, Y1
	VMULPD Y1, Y1, Y3
	VMULPD R3(R9), Y1, Y4
	VADDPD R2(R9), Y4, Y4
	VMULPD R4(R9), Y3, Y0
	VADDPD Y0, Y4, Y4
	VMULPD Y4, Y3, Y4
	VMULPD R1(R9), Y1, Y1
	VADDPD ONE(R9), Y1, Y1
	VADDPD Y4, Y1, Y1
	VMULPD Y1, Y5, Y1
	VANDPD Y2, Y1, Y1

	// sw += w; swz += w v.
	VADDPD Y1, Y12, Y12
	VMOVUPD (DX)(SI*8), Y4
	VMULPD Y4, Y1, Y1
	VADDPD Y1, Y11, Y11

	// lo = MINPD(lo, in ? v : +Inf); hi = MAXPD(hi, in ? v : -Inf).
	VMOVUPD POSINF(R9), Y5
	VBLENDVPD Y2, Y4, Y5, Y5
	VMINPD Y5, Y10, Y10
	VMOVUPD NEGINF(R9), Y5
	VBLENDVPD Y2, Y4, Y5, Y5
	VMAXPD Y5, Y9, Y9

	ADDQ $4, SI
	JMP loop

done:
	// The lanes in their fixed order: sw and swz as (0 + 1) + (2 + 3),
	// VHADDPD making [sw0+sw1, swz0+swz1, sw2+sw3, swz2+swz3]; lo and hi
	// as MINPD(MINPD(0, 1), MINPD(2, 3)) and the same with MAXPD.
	VHADDPD Y11, Y12, Y0
	VEXTRACTF128 $1, Y0, X1
	VADDPD X1, X0, X0
	VMOVUPD X0, 0(R12)
	VEXTRACTF128 $1, Y10, X1
	VUNPCKLPD X1, X10, X2
	VUNPCKHPD X1, X10, X3
	VMINPD X3, X2, X2
	VPERMILPD $1, X2, X3
	VMINSD X3, X2, X2
	MOVSD X2, 16(R12)
	VEXTRACTF128 $1, Y9, X1
	VUNPCKLPD X1, X9, X2
	VUNPCKHPD X1, X9, X3
	VMAXPD X3, X2, X2
	VPERMILPD $1, X2, X3
	VMAXSD X3, X2, X2
	MOVSD X2, 24(R12)
	VEXTRACTF128 $1, Y8, X1
	VUNPCKLPD X1, X8, X2
	VUNPCKHPD X1, X8, X3
	VMAXPD X3, X2, X2
	VPERMILPD $1, X2, X3
	VMAXSD X3, X2, X2
	MOVSD X2, 32(R12)
	MOVQ R13, 40(R12)
	MOVQ R10, 48(R12)
	VZEROUPPER
	RET
