//go:build !purego

#include "textflag.h"

// The weights of the 32 bytes of a block, 32 down to 1, and sixteen 16-bit
// ones.
DATA adlerWeights<>+0(SB)/8, $0x191a1b1c1d1e1f20
DATA adlerWeights<>+8(SB)/8, $0x1112131415161718
DATA adlerWeights<>+16(SB)/8, $0x090a0b0c0d0e0f10
DATA adlerWeights<>+24(SB)/8, $0x0102030405060708
GLOBL adlerWeights<>(SB), RODATA|NOPTR, $32
DATA adlerOnes<>+0(SB)/8, $0x0001000100010001
DATA adlerOnes<>+8(SB)/8, $0x0001000100010001
DATA adlerOnes<>+16(SB)/8, $0x0001000100010001
DATA adlerOnes<>+24(SB)/8, $0x0001000100010001
GLOBL adlerOnes<>(SB), RODATA|NOPTR, $32

// func adlerBlocksAVX2(p []byte) (bytes, prefix, weighted uint64)
//
// adlerBlocksGo over len(p)/32 blocks (at most adlerMaxBlocks). Y0 holds
// the byte sums (VPSADBW: four 64-bit lanes), Y1 their sums before each
// block, Y2 the weighted sums (VPMADDUBSW then VPMADDWD: eight 32-bit
// lanes). With at most 2048 blocks a lane of Y0 stays below 2048 * 2040,
// of Y1 below 2048^2 * 2040 / 2 (< 2^32) and of Y2 below 2048 * 32130.
TEXT ·adlerBlocksAVX2(SB), NOSPLIT, $0-48
	MOVQ p_base+0(FP), SI
	MOVQ p_len+8(FP), CX
	SHRQ $5, CX
	VPXOR Y15, Y15, Y15
	VMOVDQU adlerWeights<>(SB), Y14
	VMOVDQU adlerOnes<>(SB), Y13
	VPXOR Y0, Y0, Y0
	VPXOR Y1, Y1, Y1
	VPXOR Y2, Y2, Y2

loop:
	TESTQ CX, CX
	JZ done
	VMOVDQU (SI), Y3
	VPADDQ Y0, Y1, Y1
	VPSADBW Y15, Y3, Y4
	VPADDQ Y4, Y0, Y0
	VPMADDUBSW Y14, Y3, Y4
	VPMADDWD Y13, Y4, Y4
	VPADDD Y4, Y2, Y2
	ADDQ $32, SI
	DECQ CX
	JMP loop

done:
	// The four 64-bit lanes of Y0 and Y1, the eight 32-bit lanes of Y2
	// (widened to 64 bits first).
	VEXTRACTI128 $1, Y0, X3
	VPADDQ X3, X0, X0
	VPSHUFD $0x4e, X0, X3
	VPADDQ X3, X0, X0
	VMOVQ X0, bytes+24(FP)
	VEXTRACTI128 $1, Y1, X3
	VPADDQ X3, X1, X1
	VPSHUFD $0x4e, X1, X3
	VPADDQ X3, X1, X1
	VMOVQ X1, prefix+32(FP)
	VPMOVZXDQ X2, Y3
	VEXTRACTI128 $1, Y2, X2
	VPMOVZXDQ X2, Y2
	VPADDQ Y3, Y2, Y2
	VEXTRACTI128 $1, Y2, X3
	VPADDQ X3, X2, X2
	VPSHUFD $0x4e, X2, X3
	VPADDQ X3, X2, X2
	VMOVQ X2, weighted+40(FP)
	VZEROUPPER
	RET
