//go:build !purego

#include "textflag.h"

// go_asm.h gives the offsets of the Go structs: windowConsts_r4 and so on.
#include "go_asm.h"

// LANES puts in X2 the lanes of Y (X its low half) as
// OPPD(OPPD(0, 1), OPPD(2, 3)), OPSD the scalar form of OPPD: windowSumsGo's
// order for VMINPD and VMAXPD. X1, X3 are scratch.
#define LANES(OPPD, OPSD, Y, X) \
	VEXTRACTF128 $1, Y, X1 \
	VUNPCKLPD X1, X, X2 \
	VUNPCKHPD X1, X, X3 \
	OPPD X3, X2, X2 \
	VPERMILPD $1, X2, X3 \
	OPSD X3, X2, X2

// func windowSumsAVX2(c *windowCell)
//
// The loop of windowSumsGo, four stations per block. Registers:
// Y15, Y14, Y13 the cell (cx, cy, cz); Y12 sw, Y11 swz, Y10 lo, Y9 hi,
// Y8 far, Y7 the lane numbers j, Y6 the count (each lane subtracts its mask, -1 where
// within the radius). Go assembler order: the destination is the last
// operand, and VSUBPD A, B, D is D = B - A.
TEXT ·windowSumsAVX2(SB), NOSPLIT, $0-8
	MOVQ c+0(FP), R12
	MOVQ windowCell_x(R12), AX
	MOVQ windowCell_y(R12), BX
	MOVQ windowCell_z(R12), CX
	MOVQ windowCell_v(R12), DX
	MOVQ windowCell_d2(R12), DI
	MOVQ windowCell_m(R12), R8
	MOVQ windowCell_lo(R12), R10
	LEAQ (AX)(R10*8), AX
	LEAQ (BX)(R10*8), BX
	LEAQ (CX)(R10*8), CX
	LEAQ (DX)(R10*8), DX
	MOVQ windowCell_k(R12), R9
	VBROADCASTSD windowCell_cx(R12), Y15
	VBROADCASTSD windowCell_cy(R12), Y14
	VBROADCASTSD windowCell_cz(R12), Y13
	// last = m - 1 in every lane, for the lane test below.
	LEAQ -1(R8), R11
	MOVQ R11, windowCell_last+0(R12)
	MOVQ R11, windowCell_last+8(R12)
	MOVQ R11, windowCell_last+16(R12)
	MOVQ R11, windowCell_last+24(R12)
	VMOVDQU windowConsts_lane(R9), Y7
	VXORPD Y12, Y12, Y12
	VXORPD Y11, Y11, Y11
	VMOVUPD windowConsts_posInf(R9), Y10
	VMOVUPD windowConsts_negInf(R9), Y9
	VXORPD Y8, Y8, Y8
	VPXOR Y6, Y6, Y6
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

	// Y2 = the lanes within the radius (c2 <= c2max) and of the window
	// (j <= m - 1: the stations after it may be copies, shifted by 360
	// degrees, of stations in it); count them; far = MAXPD(far, in ? c2 :
	// +0).
	VCMPPD $2, windowConsts_c2max(R9), Y0, Y2
	VPCMPGTQ windowCell_last(R12), Y7, Y3
	VANDNPD Y2, Y3, Y2
	VPADDQ windowConsts_four(R9), Y7, Y7
	VPSUBQ Y2, Y6, Y6
	VANDPD Y2, Y0, Y3
	VMAXPD Y3, Y8, Y8

	// w = (1 / c2) ((1 + r1 c2) + c2^2 ((r2 + r3 c2) + r4 c2^2)), zero
	// outside the lanes of Y2. The division and the polynomial (Estrin's
	// scheme) depend on c2 only, so they overlap.
	VMOVUPD windowConsts_one(R9), Y5
	VDIVPD Y0, Y5, Y5
	VMULPD Y0, Y0, Y3
	VMULPD windowConsts_r3(R9), Y0, Y4
	VADDPD windowConsts_r2(R9), Y4, Y4
	VMULPD windowConsts_r4(R9), Y3, Y1
	VADDPD Y1, Y4, Y4
	VMULPD Y4, Y3, Y4
	VMULPD windowConsts_r1(R9), Y0, Y1
	VADDPD windowConsts_one(R9), Y1, Y1
	VADDPD Y4, Y1, Y1
	VMULPD Y1, Y5, Y1
	VANDPD Y2, Y1, Y1

	// sw += w; swz += w v.
	VADDPD Y1, Y12, Y12
	VMOVUPD (DX)(SI*8), Y4
	VMULPD Y4, Y1, Y1
	VADDPD Y1, Y11, Y11

	// lo = MINPD(lo, in ? v : +Inf); hi = MAXPD(hi, in ? v : -Inf).
	VMOVUPD windowConsts_posInf(R9), Y5
	VBLENDVPD Y2, Y4, Y5, Y5
	VMINPD Y5, Y10, Y10
	VMOVUPD windowConsts_negInf(R9), Y5
	VBLENDVPD Y2, Y4, Y5, Y5
	VMAXPD Y5, Y9, Y9

	ADDQ $4, SI
	JMP loop

done:
	LEAQ windowCell_out(R12), R12
	// sw and swz as (0 + 1) + (2 + 3): VHADDPD makes [sw0+sw1, swz0+swz1,
	// sw2+sw3, swz2+swz3].
	VHADDPD Y11, Y12, Y0
	VEXTRACTF128 $1, Y0, X1
	VADDPD X1, X0, X0
	VMOVUPD X0, windowOut_sw(R12)
	LANES(VMINPD, VMINSD, Y10, X10)
	VMOVSD X2, windowOut_lo(R12)
	LANES(VMAXPD, VMAXSD, Y9, X9)
	VMOVSD X2, windowOut_hi(R12)
	LANES(VMAXPD, VMAXSD, Y8, X8)
	VMOVSD X2, windowOut_far(R12)
	VEXTRACTI128 $1, Y6, X1
	VPADDQ X1, X6, X1
	VPSHUFD $0x4e, X1, X2
	VPADDQ X2, X1, X1
	VMOVQ X1, windowOut_n(R12)
	VZEROUPPER
	RET
