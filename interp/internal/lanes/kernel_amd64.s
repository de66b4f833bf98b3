//go:build !purego

#include "textflag.h"

// go_asm.h gives the offsets of the Go structs: Group_X and so on.
#include "go_asm.h"

// Go assembler order: the destination is the last operand, VSUBPD A, B, D
// is D = B - A, VCMPPD $p, A, B, D is D = B p A, VPCMPGTQ A, B, D is
// D = B > A, VPANDN A, B, D is D = ~B & A, VMAXPD A, B, D is Intel's
// MAXPD(B, A) (B if B > A, else A), VFMADD231PD A, B, D is D = B*A + D,
// VFMADD213PD A, B, D is D = B*D + A, VBLENDVPD M, A, B, D is D = M ? A : B.

// slack, 1 + 1e-12 (Slack in kernel.go).
DATA slack<>+0(SB)/8, $1.000000000001
GLOBL slack<>(SB), RODATA|NOPTR, $8

// func chordsAVX2(grp *Group)
//
// chordsGo, the four cells in the four lanes, one station a step.
// Registers: Y12 the station's number in the row, j0+j, in every lane;
// Y11 the counts (each lane subtracts its mask, -1 where the station
// counts); Y10 .. Y7 the largest chords, largest first (Kept = 4).
// Y15 the limits (lim); Y3, Y4, Y5 the cells' unit vectors. The cells'
// spans (Lom1 at DX, Him1 at R10) are read from memory; the station and
// span pointers start at J0 and C0.
TEXT ·chordsAVX2(SB), NOSPLIT, $0-8
	MOVQ grp+0(FP), R12
	MOVQ Group_J0(R12), SI
	MOVQ Group_X(R12), AX
	LEAQ (AX)(SI*8), AX
	MOVQ Group_Y(R12), BX
	LEAQ (BX)(SI*8), BX
	MOVQ Group_Z(R12), CX
	LEAQ (CX)(SI*8), CX
	MOVQ Group_D2(R12), DI
	MOVQ Group_M(R12), R8
	MOVQ Group_K(R12), R9
	MOVQ Group_C0(R12), SI
	MOVQ Group_Cos(R12), R13
	MOVQ Group_Sin(R12), R11
	// The cells: Y3 = cp cos, Y4 = cp sin (rounded products), Y5 = cz.
	VBROADCASTSD Group_Cp(R12), Y6
	VMULPD (R13)(SI*8), Y6, Y3
	VMULPD (R11)(SI*8), Y6, Y4
	VMOVUPD Group_Cz(R12), Y5
	MOVQ Group_Lom1(R12), DX
	LEAQ (DX)(SI*8), DX
	MOVQ Group_Him1(R12), R10
	LEAQ (R10)(SI*8), R10
	VPBROADCASTQ Group_J0(R12), Y12

	// lim = MINPD((u0 + lanes delta)^2 slack, c2max), rounded as
	// chordsGo rounds it.
	VBROADCASTSD Group_Delta(R12), Y0
	VMULPD Consts_lanes(R9), Y0, Y0
	VBROADCASTSD Group_U0(R12), Y1
	VADDPD Y0, Y1, Y1
	VMULPD Y1, Y1, Y1
	VBROADCASTSD slack<>(SB), Y0
	VMULPD Y0, Y1, Y1
	VMINPD Consts_C2max(R9), Y1, Y15
	VMOVUPD Y15, Group_Lim(R12)

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
	VPADDQ Consts_step(R9), Y12, Y12

	// d2 = in ? c2 : +Inf; Y1 = in ? c2 : +0.
	VANDPD Y2, Y0, Y1
	VANDNPD Consts_posInf(R9), Y2, Y14
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
	VMOVDQU Y11, Group_N(R12)
	VMOVUPD Y10, Group_Top+0(R12)
	VMOVUPD Y9, Group_Top+32(R12)
	VMOVUPD Y8, Group_Top+64(R12)
	VMOVUPD Y7, Group_Top+96(R12)
	VZEROUPPER
	RET

// func sumsAVX2(grp *Group)
//
// sumsGo, the four cells in the four lanes, one station a step.
// Registers: Y15 tau, Y14 one; Y13 sw, Y12 swz, Y11 lo, Y10 hi, Y9 the
// counts.
TEXT ·sumsAVX2(SB), NOSPLIT, $0-8
	MOVQ grp+0(FP), R12
	MOVQ Group_J0(R12), SI
	MOVQ Group_V(R12), DX
	LEAQ (DX)(SI*8), DX
	MOVQ Group_D2(R12), DI
	MOVQ Group_M(R12), R8
	MOVQ Group_K(R12), R9
	VMOVUPD Group_Tau(R12), Y15
	VMOVUPD Consts_one(R9), Y14
	VXORPD Y13, Y13, Y13
	VXORPD Y12, Y12, Y12
	VMOVUPD Consts_posInf(R9), Y11
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
	VMOVUPD Consts_r3(R9), Y4
	VFMADD213PD Consts_r2(R9), Y0, Y4
	VFMADD231PD Consts_r4(R9), Y3, Y4
	VMOVUPD Consts_r1(R9), Y5
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
	VMOVUPD Y0, Group_Val(R12)
	VMOVUPD Y13, Group_Sw(R12)
	VMOVUPD Y12, Group_Swz(R12)
	VMOVUPD Y11, Group_Lo(R12)
	VMOVUPD Y10, Group_Hi(R12)
	VMOVDQU Y9, Group_N2(R12)
	VZEROUPPER
	RET
