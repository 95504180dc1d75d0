//go:build amd64 && !purego

#include "textflag.h"

// SEC runs one transposed direct form II section on the channel pair at
// (P), with state Z1, Z2 (X registers, two lanes) and coefficients at
// CO(AX). The operation order is that of pairSection:
//	y = b0*x + z1; z1 = (b1*x - a1*y) + z2; z2 = b2*x - a2*y
// IEEE multiplication and addition are commutative, so the operand
// order of MULPD/ADDPD does not change any result.
#define SEC(P, Z1, Z2, CO) \
	MOVUPD (P), X8 \
	MOVUPD 0+CO(AX), X9 \
	MULPD X8, X9 \
	ADDPD Z1, X9 \
	MOVUPD 16+CO(AX), X10 \
	MULPD X8, X10 \
	MOVUPD 48+CO(AX), X11 \
	MULPD X9, X11 \
	SUBPD X11, X10 \
	ADDPD Z2, X10 \
	MOVAPD X10, Z1 \
	MOVUPD 32+CO(AX), X12 \
	MULPD X8, X12 \
	MOVUPD 64+CO(AX), X13 \
	MULPD X9, X13 \
	SUBPD X13, X12 \
	MOVAPD X12, Z2 \
	MOVUPD X9, (P)

// func wave4(x *float64, steps int, stride int, w *float64, z *float64)
TEXT ·wave4(SB), NOSPLIT, $0-40
	MOVQ x+0(FP), SI
	MOVQ steps+8(FP), CX
	MOVQ stride+16(FP), DX
	MOVQ w+24(FP), AX
	MOVQ z+32(FP), BX
	TESTQ CX, CX
	JLE done
	SHLQ $3, DX
	MOVQ SI, R8
	SUBQ DX, R8
	MOVQ R8, R9
	SUBQ DX, R9
	MOVQ R9, R10
	SUBQ DX, R10
	MOVUPD 0(BX), X0
	MOVUPD 16(BX), X1
	MOVUPD 32(BX), X2
	MOVUPD 48(BX), X3
	MOVUPD 64(BX), X4
	MOVUPD 80(BX), X5
	MOVUPD 96(BX), X6
	MOVUPD 112(BX), X7

loop:
	SEC(R10, X6, X7, 240)
	SEC(R9, X4, X5, 160)
	SEC(R8, X2, X3, 80)
	SEC(SI, X0, X1, 0)
	ADDQ DX, SI
	ADDQ DX, R8
	ADDQ DX, R9
	ADDQ DX, R10
	DECQ CX
	JNZ  loop

	MOVUPD X0, 0(BX)
	MOVUPD X1, 16(BX)
	MOVUPD X2, 32(BX)
	MOVUPD X3, 48(BX)
	MOVUPD X4, 64(BX)
	MOVUPD X5, 80(BX)
	MOVUPD X6, 96(BX)
	MOVUPD X7, 112(BX)

done:
	RET
