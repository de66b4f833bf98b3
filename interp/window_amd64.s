//go:build !purego

#include "textflag.h"

// go_asm.h gives the offsets of the Go structs: windowGroup_x and so on.
#include "go_asm.h"

// Go assembler order: the destination is the last operand, VSUBPD A, B, D
// is D = B - A, VCMPPD $p, A, B, D is D = B p A, VPCMPGTQ A, B, D is
// D = B > A, VPANDN A, B, D is D = ~B & A, VMAXPD A, B, D is Intel's
// MAXPD(B, A) (B if B > A, else A), VFMADD231PD A, B, D is D = B*A + D,
// VFMADD213PD A, B, D is D = B*D + A, VBLENDVPD M, A, B, D is D = M ? A : B.

// limSlack, 1 + 1e-12 (window.go).
DATA limSlack<>+0(SB)/8, $1.000000000001
GLOBL limSlack<>(SB), RODATA|NOPTR, $8

// func windowChordsAVX2(grp *windowGroup)
//
// windowChordsGo, the four cells in the four lanes, one station a step.
// Registers: Y12 the station's number in the row, j0+j, in every lane;
// Y11 the counts (each lane subtracts its mask, -1 where the station
// counts); Y10 .. Y7 the largest chords, largest first (windowTop = 4).
// Y15 the limits (lim); Y3, Y4, Y5 the cells' unit vectors. The cells'
// windows (lom1 at DX, him1 at R10) are read from memory; the station and
// window pointers start at j0 and c0.
TEXT ·windowChordsAVX2(SB), NOSPLIT, $0-8
	MOVQ grp+0(FP), R12
	MOVQ windowGroup_j0(R12), SI
	MOVQ windowGroup_x(R12), AX
	LEAQ (AX)(SI*8), AX
	MOVQ windowGroup_y(R12), BX
	LEAQ (BX)(SI*8), BX
	MOVQ windowGroup_z(R12), CX
	LEAQ (CX)(SI*8), CX
	MOVQ windowGroup_d2(R12), DI
	MOVQ windowGroup_m(R12), R8
	MOVQ windowGroup_k(R12), R9
	MOVQ windowGroup_c0(R12), SI
	MOVQ windowGroup_cos(R12), R13
	MOVQ windowGroup_sin(R12), R11
	// The cells: Y3 = cp cos, Y4 = cp sin (rounded products), Y5 = cz.
	VBROADCASTSD windowGroup_cp(R12), Y6
	VMULPD (R13)(SI*8), Y6, Y3
	VMULPD (R11)(SI*8), Y6, Y4
	VMOVUPD windowGroup_cz(R12), Y5
	MOVQ windowGroup_lom1(R12), DX
	LEAQ (DX)(SI*8), DX
	MOVQ windowGroup_him1(R12), R10
	LEAQ (R10)(SI*8), R10
	VPBROADCASTQ windowGroup_j0(R12), Y12

	// lim = MINPD((u0 + lanes delta)^2 slack, c2max), rounded as
	// windowChordsGo rounds it.
	VBROADCASTSD windowGroup_delta(R12), Y0
	VMULPD windowConsts_lanes(R9), Y0, Y0
	VBROADCASTSD windowGroup_u0(R12), Y1
	VADDPD Y0, Y1, Y1
	VMULPD Y1, Y1, Y1
	VBROADCASTSD limSlack<>(SB), Y0
	VMULPD Y0, Y1, Y1
	VMINPD windowConsts_c2max(R9), Y1, Y15
	VMOVUPD Y15, windowGroup_lim(R12)

	VPXOR Y11, Y11, Y11
	VXORPD Y10, Y10, Y10
	VXORPD Y9, Y9, Y9
	VXORPD Y8, Y8, Y8
	VXORPD Y7, Y7, Y7
	XORQ SI, SI

chords:
	CMPQ SI, R8
	JGE chordsDone

	// c2 = (dx^2 + dy^2) + dz^2, rounded after every operation (chordSq).
	VBROADCASTSD (AX)(SI*8), Y0
	VSUBPD Y3, Y0, Y0
	VMULPD Y0, Y0, Y0
	VBROADCASTSD (BX)(SI*8), Y1
	VSUBPD Y4, Y1, Y1
	VMULPD Y1, Y1, Y1
	VADDPD Y1, Y0, Y0
	VBROADCASTSD (CX)(SI*8), Y1
	VSUBPD Y5, Y1, Y1
	VMULPD Y1, Y1, Y1
	VADDPD Y1, Y0, Y0

	// Y2 = the lanes where the station counts: lom1 < j0+j, not j0+j >
	// him1, c2 <= lim. Count them.
	VPCMPGTQ (DX), Y12, Y2
	VPCMPGTQ (R10), Y12, Y14
	VPANDN Y2, Y14, Y2
	VCMPPD $2, Y15, Y0, Y14
	VANDPD Y14, Y2, Y2
	VPSUBQ Y2, Y11, Y11
	VPADDQ windowConsts_step(R9), Y12, Y12

	// d2 = in ? c2 : +Inf; Y1 = in ? c2 : +0.
	VANDPD Y2, Y0, Y1
	VANDNPD windowConsts_posInf(R9), Y2, Y14
	VORPD Y1, Y14, Y14
	VMOVUPD Y14, (DI)

	// The largest chords: each keeps the larger and passes on the smaller.
	VMINPD Y1, Y10, Y13
	VMAXPD Y1, Y10, Y10
	VMINPD Y13, Y9, Y1
	VMAXPD Y13, Y9, Y9
	VMINPD Y1, Y8, Y13
	VMAXPD Y1, Y8, Y8
	VMAXPD Y13, Y7, Y7

	INCQ SI
	ADDQ $32, DI
	JMP chords

chordsDone:
	VMOVDQU Y11, windowGroup_n(R12)
	VMOVUPD Y10, windowGroup_top+0(R12)
	VMOVUPD Y9, windowGroup_top+32(R12)
	VMOVUPD Y8, windowGroup_top+64(R12)
	VMOVUPD Y7, windowGroup_top+96(R12)
	VZEROUPPER
	RET

// func windowSumsAVX2(grp *windowGroup)
//
// windowSumsGo, the four cells in the four lanes, one station a step.
// Registers: Y15 tau, Y14 one; Y13 sw, Y12 swz, Y11 lo, Y10 hi, Y9 the
// counts.
TEXT ·windowSumsAVX2(SB), NOSPLIT, $0-8
	MOVQ grp+0(FP), R12
	MOVQ windowGroup_j0(R12), SI
	MOVQ windowGroup_v(R12), DX
	LEAQ (DX)(SI*8), DX
	MOVQ windowGroup_d2(R12), DI
	MOVQ windowGroup_m(R12), R8
	MOVQ windowGroup_k(R12), R9
	VMOVUPD windowGroup_tau(R12), Y15
	VMOVUPD windowConsts_one(R9), Y14
	VXORPD Y13, Y13, Y13
	VXORPD Y12, Y12, Y12
	VMOVUPD windowConsts_posInf(R9), Y11
	VXORPD Y10, Y10, Y10
	VSUBPD Y11, Y10, Y10
	VPXOR Y9, Y9, Y9
	XORQ SI, SI

sums:
	CMPQ SI, R8
	JGE sumsDone

	// Y1 = the lanes within tau.
	VMOVUPD (DI), Y0
	VCMPPD $2, Y15, Y0, Y1
	VPSUBQ Y1, Y9, Y9

	// w = (1 / c2) ((1 + r1 c2) + c2^2 ((r2 + r3 c2) + r4 c2^2)), zero
	// outside the lanes of Y1. The division and the polynomial (Estrin's
	// scheme) depend on c2 only, so they overlap.
	VDIVPD Y0, Y14, Y2
	VMULPD Y0, Y0, Y3
	VMOVUPD windowConsts_r3(R9), Y4
	VFMADD213PD windowConsts_r2(R9), Y0, Y4
	VFMADD231PD windowConsts_r4(R9), Y3, Y4
	VMOVUPD windowConsts_r1(R9), Y5
	VFMADD213PD Y14, Y0, Y5
	VFMADD231PD Y4, Y3, Y5
	VMULPD Y5, Y2, Y2
	VANDPD Y1, Y2, Y2

	// sw += w; swz += w v (fused).
	VADDPD Y2, Y13, Y13
	VBROADCASTSD (DX)(SI*8), Y3
	VFMADD231PD Y3, Y2, Y12

	// lo = in ? MINPD(lo, v) : lo; hi = in ? MAXPD(hi, v) : hi.
	VMINPD Y3, Y11, Y4
	VBLENDVPD Y1, Y4, Y11, Y11
	VMAXPD Y3, Y10, Y4
	VBLENDVPD Y1, Y4, Y10, Y10

	INCQ SI
	ADDQ $32, DI
	JMP sums

sumsDone:
	// val = MINPD(MAXPD(swz / sw, lo), hi).
	VDIVPD Y13, Y12, Y0
	VMAXPD Y11, Y0, Y0
	VMINPD Y10, Y0, Y0
	VMOVUPD Y0, windowGroup_val(R12)
	VMOVUPD Y13, windowGroup_sw(R12)
	VMOVUPD Y12, windowGroup_swz(R12)
	VMOVUPD Y11, windowGroup_lo(R12)
	VMOVUPD Y10, windowGroup_hi(R12)
	VMOVDQU Y9, windowGroup_n2(R12)
	VZEROUPPER
	RET
