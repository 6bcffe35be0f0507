// The rotation kernel for 4 isochromats per instruction, AVX2 and FMA
// (hand-written; see rotateBlock in kernel.go for the scalar form it follows
// operation for operation, so that both round alike, and vector_amd64.go for
// the argument layout).

#include "textflag.h"

#define CONST4(name, bits) \
	DATA name<>+0(SB)/8, $bits \
	DATA name<>+8(SB)/8, $bits \
	DATA name<>+16(SB)/8, $bits \
	DATA name<>+24(SB)/8, $bits \
	GLOBL name<>(SB), RODATA|NOPTR, $32

CONST4(vcos1, 0xBFE0000000000000)
CONST4(vcos2, 0x3FA5555555555555)
CONST4(vcos3, 0xBF56C16C16C16C17)
CONST4(vcos4, 0x3EFA01A01A01A01A)
CONST4(vcos5, 0xBE927E4FB7789F5C)
CONST4(vcos6, 0x3E21EED8EFF8D898)
CONST4(vcos7, 0xBDA93974A8C07C9D)
CONST4(vcos8, 0x3D2AE7F3E733B81F)
CONST4(vcos9, 0xBCA6827863B97D97)
CONST4(vsinc6, 0x3DE6124613A86D09)
CONST4(vsinc7, 0xBD6AE7F3E733B81F)
CONST4(vsinc8, 0x3CE952C77030AD4A)
CONST4(vsinc9, 0xBC62F49B46814157)
CONST4(vsinc1, 0xBFC5555555555555)
CONST4(vsinc2, 0x3F81111111111111)
CONST4(vsinc3, 0xBF2A01A01A01A01A)
CONST4(vsinc4, 0x3EC71DE3A556C734)
CONST4(vsinc5, 0xBE5AE64567F544E4)
CONST4(vone, 0x3FF0000000000000)
CONST4(vsmax, 0x3FF0000000000000)
CONST4(vshort, 0x3F90000000000000)
CONST4(vquarter, 0x3FD0000000000000)
CONST4(vfour, 0x4010000000000000)
CONST4(vmtwo, 0xC000000000000000)
CONST4(vsign, 0x8000000000000000)

// Offsets in vecArgs.
#define A_H 0
#define A_GH 8
#define A_WXH 16
#define A_WYH 24
#define A_P 32
#define A_STEPS 40
#define A_OFF 48
#define A_POS 56
#define A_SCALE 64
#define A_SCALE2 72
#define A_AR 80
#define A_AI 88
#define A_BR 96
#define A_BI 104

// func rotateAVX2(a *vecArgs)
//
// Registers: Y0–Y3 the state ar, ai, br, bi of the 4 spins; Y4 zh then qi; Y5 x
// then ks; Y6 the halving count (int64 lanes) then qr; Y7 mask then qx; Y8 c;
// Y9 s; Y10–Y12 scratch; Y13 the lanes with x ≤ shortMax, then scratch; Y14
// all ones; Y15 zero.
TEXT ·rotateAVX2(SB), NOSPLIT, $0-8
	MOVQ a+0(FP), DI
	MOVQ A_H(DI), R8
	MOVQ A_GH(DI), R9
	MOVQ A_WXH(DI), R10
	MOVQ A_WYH(DI), R11
	MOVQ A_P(DI), R12
	MOVQ A_STEPS(DI), CX
	MOVQ A_OFF(DI), SI
	MOVQ A_POS(DI), BX
	MOVQ A_SCALE(DI), DX
	MOVQ A_SCALE2(DI), R13
	MOVQ A_AR(DI), AX
	VMOVUPD (AX), Y0
	MOVQ A_AI(DI), AX
	VMOVUPD (AX), Y1
	MOVQ A_BR(DI), AX
	VMOVUPD (AX), Y2
	MOVQ A_BI(DI), AX
	VMOVUPD (AX), Y3
	VXORPD Y15, Y15, Y15
	VPCMPEQQ Y14, Y14, Y14
	XORQ AX, AX
	TESTQ CX, CX
	JEQ done

step:
	// zh = FMA(off, h, pos·gh); x = FMA(scale2, p, zh·zh).
	VBROADCASTSD (R9)(AX*8), Y10
	VMULPD (BX), Y10, Y4
	VBROADCASTSD (R8)(AX*8), Y10
	VFMADD231PD (SI), Y10, Y4
	VMULPD Y4, Y4, Y5
	VBROADCASTSD (R12)(AX*8), Y10
	VFMADD231PD (R13), Y10, Y5

	// All lanes with x ≤ shortMax: the short series alone.
	VCMPPD $0x02, vshort<>(SB), Y5, Y13
	VPTEST Y14, Y13
	JCS short

	// Halve while x > seriesMax, counting the halvings per lane.
	VXORPD Y6, Y6, Y6
halve:
	VCMPPD $0x0e, vsmax<>(SB), Y5, Y7
	VPTEST Y7, Y7
	JEQ series
	VMULPD vquarter<>(SB), Y5, Y10
	VBLENDVPD Y7, Y10, Y5, Y5
	VPSUBQ Y7, Y6, Y6
	JMP halve

series:
	// c and s = sin φ / φ by Horner's rule, the long series.
	VMOVUPD vcos9<>(SB), Y8
	VMOVUPD vsinc9<>(SB), Y9
	VFMADD213PD vcos8<>(SB), Y5, Y8
	VFMADD213PD vsinc8<>(SB), Y5, Y9
	VFMADD213PD vcos7<>(SB), Y5, Y8
	VFMADD213PD vsinc7<>(SB), Y5, Y9
	VFMADD213PD vcos6<>(SB), Y5, Y8
	VFMADD213PD vsinc6<>(SB), Y5, Y9
	VFMADD213PD vcos5<>(SB), Y5, Y8
	VFMADD213PD vsinc5<>(SB), Y5, Y9
	VFMADD213PD vcos4<>(SB), Y5, Y8
	VFMADD213PD vsinc4<>(SB), Y5, Y9
	VFMADD213PD vcos3<>(SB), Y5, Y8
	VFMADD213PD vsinc3<>(SB), Y5, Y9
	VFMADD213PD vcos2<>(SB), Y5, Y8
	VFMADD213PD vsinc2<>(SB), Y5, Y9
	VFMADD213PD vcos1<>(SB), Y5, Y8
	VFMADD213PD vsinc1<>(SB), Y5, Y9
	VFMADD213PD vone<>(SB), Y5, Y8
	VFMADD213PD vone<>(SB), Y5, Y9

	// Lanes with x ≤ shortMax (never halved) take the short series, as in
	// the scalar kernel.
	VPTEST Y14, Y13
	JEQ double
	VMOVUPD vcos5<>(SB), Y10
	VMOVUPD vsinc5<>(SB), Y11
	VFMADD213PD vcos4<>(SB), Y5, Y10
	VFMADD213PD vsinc4<>(SB), Y5, Y11
	VFMADD213PD vcos3<>(SB), Y5, Y10
	VFMADD213PD vsinc3<>(SB), Y5, Y11
	VFMADD213PD vcos2<>(SB), Y5, Y10
	VFMADD213PD vsinc2<>(SB), Y5, Y11
	VFMADD213PD vcos1<>(SB), Y5, Y10
	VFMADD213PD vsinc1<>(SB), Y5, Y11
	VFMADD213PD vone<>(SB), Y5, Y10
	VFMADD213PD vone<>(SB), Y5, Y11
	VBLENDVPD Y13, Y10, Y8, Y8
	VBLENDVPD Y13, Y11, Y9, Y9

	// Double the angle back in the lanes whose count is still positive:
	// c, s, x = FMA(−2x·s, s, 1), s·c, 4x.
double:
	VPCMPGTQ Y15, Y6, Y7
	VPTEST Y7, Y7
	JEQ compose
	VMULPD vmtwo<>(SB), Y5, Y10
	VMULPD Y9, Y10, Y10
	VFMADD213PD vone<>(SB), Y9, Y10
	VMULPD Y8, Y9, Y11
	VMULPD vfour<>(SB), Y5, Y12
	VBLENDVPD Y7, Y10, Y8, Y8
	VBLENDVPD Y7, Y11, Y9, Y9
	VBLENDVPD Y7, Y12, Y5, Y5
	VPADDQ Y7, Y6, Y6
	JMP double

	// All lanes short: the scalar kernel's cosSincShort.
short:
	VMOVUPD vcos5<>(SB), Y8
	VMOVUPD vsinc5<>(SB), Y9
	VFMADD213PD vcos4<>(SB), Y5, Y8
	VFMADD213PD vsinc4<>(SB), Y5, Y9
	VFMADD213PD vcos3<>(SB), Y5, Y8
	VFMADD213PD vsinc3<>(SB), Y5, Y9
	VFMADD213PD vcos2<>(SB), Y5, Y8
	VFMADD213PD vsinc2<>(SB), Y5, Y9
	VFMADD213PD vcos1<>(SB), Y5, Y8
	VFMADD213PD vsinc1<>(SB), Y5, Y9
	VFMADD213PD vone<>(SB), Y5, Y8
	VFMADD213PD vone<>(SB), Y5, Y9

compose:
	// qi = zh·s; ks = scale·s; qr = −wyh·ks; qx = wxh·ks.
	VMULPD Y9, Y4, Y4
	VMULPD (DX), Y9, Y5
	VBROADCASTSD (R11)(AX*8), Y10
	VXORPD vsign<>(SB), Y10, Y10
	VMULPD Y5, Y10, Y6
	VBROADCASTSD (R10)(AX*8), Y10
	VMULPD Y5, Y10, Y7

	// ar = FMA(c, a0, −FMA(qi, a1, FMA(qr, b0, qx·b1)))
	VMULPD Y3, Y7, Y10
	VFMADD231PD Y2, Y6, Y10
	VFMADD231PD Y1, Y4, Y10
	VFMSUB231PD Y0, Y8, Y10
	// ai = FMA(c, a1, FMA(qi, a0, FMA(qx, b0, −qr·b1)))
	VMULPD Y3, Y6, Y11
	VFMSUB231PD Y2, Y7, Y11
	VFMADD231PD Y0, Y4, Y11
	VFMADD231PD Y1, Y8, Y11
	// br = FMA(qr, a0, FMA(−qx, a1, FMA(c, b0, qi·b1)))
	VMULPD Y3, Y4, Y12
	VFMADD231PD Y2, Y8, Y12
	VFNMADD231PD Y1, Y7, Y12
	VFMADD231PD Y0, Y6, Y12
	// bi = FMA(qr, a1, FMA(qx, a0, FMA(c, b1, −qi·b0)))
	VMULPD Y2, Y4, Y13
	VFMSUB231PD Y3, Y8, Y13
	VFMADD231PD Y0, Y7, Y13
	VFMADD231PD Y1, Y6, Y13

	VMOVAPD Y10, Y0
	VMOVAPD Y11, Y1
	VMOVAPD Y12, Y2
	VMOVAPD Y13, Y3

	INCQ AX
	CMPQ AX, CX
	JLT step

done:
	MOVQ A_AR(DI), AX
	VMOVUPD Y0, (AX)
	MOVQ A_AI(DI), AX
	VMOVUPD Y1, (AX)
	MOVQ A_BR(DI), AX
	VMOVUPD Y2, (AX)
	MOVQ A_BI(DI), AX
	VMOVUPD Y3, (AX)
	VZEROUPPER
	RET

CONST4(vi1, 0x0000000000000001)

// func rotateAVX512(a *vecArgs)
//
// rotateAVX2 for 8 spins, with the same operations in the same order: the
// constants are broadcast from memory, lane masks live in K registers (K1 the
// lanes to halve, K2 the lanes to double, K3 the lanes with x ≤ shortMax) and
// the masked updates merge. Registers as in rotateAVX2, Z for Y.
TEXT ·rotateAVX512(SB), NOSPLIT, $0-8
	MOVQ a+0(FP), DI
	MOVQ A_H(DI), R8
	MOVQ A_GH(DI), R9
	MOVQ A_WXH(DI), R10
	MOVQ A_WYH(DI), R11
	MOVQ A_P(DI), R12
	MOVQ A_STEPS(DI), CX
	MOVQ A_OFF(DI), SI
	MOVQ A_POS(DI), BX
	MOVQ A_SCALE(DI), DX
	MOVQ A_SCALE2(DI), R13
	MOVQ A_AR(DI), AX
	VMOVUPD (AX), Z0
	MOVQ A_AI(DI), AX
	VMOVUPD (AX), Z1
	MOVQ A_BR(DI), AX
	VMOVUPD (AX), Z2
	MOVQ A_BI(DI), AX
	VMOVUPD (AX), Z3
	VPXORQ Z15, Z15, Z15
	XORQ AX, AX
	TESTQ CX, CX
	JEQ done512

step512:
	VBROADCASTSD (R9)(AX*8), Z10
	VMULPD (BX), Z10, Z4
	VBROADCASTSD (R8)(AX*8), Z10
	VFMADD231PD (SI), Z10, Z4
	VMULPD Z4, Z4, Z5
	VBROADCASTSD (R12)(AX*8), Z10
	VFMADD231PD (R13), Z10, Z5

	VCMPPD.BCST $0x02, vshort<>(SB), Z5, K3
	KORTESTB K3, K3
	JCS short512

	VPXORQ Z6, Z6, Z6
halve512:
	VCMPPD.BCST $0x0e, vsmax<>(SB), Z5, K1
	KORTESTB K1, K1
	JEQ series512
	VMULPD.BCST vquarter<>(SB), Z5, K1, Z5
	VPADDQ.BCST vi1<>(SB), Z6, K1, Z6
	JMP halve512

series512:
	VBROADCASTSD vcos9<>(SB), Z8
	VBROADCASTSD vsinc9<>(SB), Z9
	VFMADD213PD.BCST vcos8<>(SB), Z5, Z8
	VFMADD213PD.BCST vsinc8<>(SB), Z5, Z9
	VFMADD213PD.BCST vcos7<>(SB), Z5, Z8
	VFMADD213PD.BCST vsinc7<>(SB), Z5, Z9
	VFMADD213PD.BCST vcos6<>(SB), Z5, Z8
	VFMADD213PD.BCST vsinc6<>(SB), Z5, Z9
	VFMADD213PD.BCST vcos5<>(SB), Z5, Z8
	VFMADD213PD.BCST vsinc5<>(SB), Z5, Z9
	VFMADD213PD.BCST vcos4<>(SB), Z5, Z8
	VFMADD213PD.BCST vsinc4<>(SB), Z5, Z9
	VFMADD213PD.BCST vcos3<>(SB), Z5, Z8
	VFMADD213PD.BCST vsinc3<>(SB), Z5, Z9
	VFMADD213PD.BCST vcos2<>(SB), Z5, Z8
	VFMADD213PD.BCST vsinc2<>(SB), Z5, Z9
	VFMADD213PD.BCST vcos1<>(SB), Z5, Z8
	VFMADD213PD.BCST vsinc1<>(SB), Z5, Z9
	VFMADD213PD.BCST vone<>(SB), Z5, Z8
	VFMADD213PD.BCST vone<>(SB), Z5, Z9

	KORTESTB K3, K3
	JEQ double512
	VBROADCASTSD vcos5<>(SB), Z10
	VBROADCASTSD vsinc5<>(SB), Z11
	VFMADD213PD.BCST vcos4<>(SB), Z5, Z10
	VFMADD213PD.BCST vsinc4<>(SB), Z5, Z11
	VFMADD213PD.BCST vcos3<>(SB), Z5, Z10
	VFMADD213PD.BCST vsinc3<>(SB), Z5, Z11
	VFMADD213PD.BCST vcos2<>(SB), Z5, Z10
	VFMADD213PD.BCST vsinc2<>(SB), Z5, Z11
	VFMADD213PD.BCST vcos1<>(SB), Z5, Z10
	VFMADD213PD.BCST vsinc1<>(SB), Z5, Z11
	VFMADD213PD.BCST vone<>(SB), Z5, Z10
	VFMADD213PD.BCST vone<>(SB), Z5, Z11
	VBLENDMPD Z10, Z8, K3, Z8
	VBLENDMPD Z11, Z9, K3, Z9

double512:
	VPCMPGTQ Z15, Z6, K2
	KORTESTB K2, K2
	JEQ compose512
	VMULPD.BCST vmtwo<>(SB), Z5, Z10
	VMULPD Z9, Z10, Z10
	VFMADD213PD.BCST vone<>(SB), Z9, Z10
	VMULPD Z8, Z9, Z11
	VMULPD.BCST vfour<>(SB), Z5, K2, Z5
	VBLENDMPD Z10, Z8, K2, Z8
	VBLENDMPD Z11, Z9, K2, Z9
	VPSUBQ.BCST vi1<>(SB), Z6, K2, Z6
	JMP double512

short512:
	VBROADCASTSD vcos5<>(SB), Z8
	VBROADCASTSD vsinc5<>(SB), Z9
	VFMADD213PD.BCST vcos4<>(SB), Z5, Z8
	VFMADD213PD.BCST vsinc4<>(SB), Z5, Z9
	VFMADD213PD.BCST vcos3<>(SB), Z5, Z8
	VFMADD213PD.BCST vsinc3<>(SB), Z5, Z9
	VFMADD213PD.BCST vcos2<>(SB), Z5, Z8
	VFMADD213PD.BCST vsinc2<>(SB), Z5, Z9
	VFMADD213PD.BCST vcos1<>(SB), Z5, Z8
	VFMADD213PD.BCST vsinc1<>(SB), Z5, Z9
	VFMADD213PD.BCST vone<>(SB), Z5, Z8
	VFMADD213PD.BCST vone<>(SB), Z5, Z9

compose512:
	VMULPD Z9, Z4, Z4
	VMULPD (DX), Z9, Z5
	VBROADCASTSD (R11)(AX*8), Z10
	VXORPD.BCST vsign<>(SB), Z10, Z10
	VMULPD Z5, Z10, Z6
	VBROADCASTSD (R10)(AX*8), Z10
	VMULPD Z5, Z10, Z7

	VMULPD Z3, Z7, Z10
	VFMADD231PD Z2, Z6, Z10
	VFMADD231PD Z1, Z4, Z10
	VFMSUB231PD Z0, Z8, Z10
	VMULPD Z3, Z6, Z11
	VFMSUB231PD Z2, Z7, Z11
	VFMADD231PD Z0, Z4, Z11
	VFMADD231PD Z1, Z8, Z11
	VMULPD Z3, Z4, Z12
	VFMADD231PD Z2, Z8, Z12
	VFNMADD231PD Z1, Z7, Z12
	VFMADD231PD Z0, Z6, Z12
	VMULPD Z2, Z4, Z13
	VFMSUB231PD Z3, Z8, Z13
	VFMADD231PD Z0, Z7, Z13
	VFMADD231PD Z1, Z6, Z13

	VMOVAPD Z10, Z0
	VMOVAPD Z11, Z1
	VMOVAPD Z12, Z2
	VMOVAPD Z13, Z3

	INCQ AX
	CMPQ AX, CX
	JLT step512

done512:
	MOVQ A_AR(DI), AX
	VMOVUPD Z0, (AX)
	MOVQ A_AI(DI), AX
	VMOVUPD Z1, (AX)
	MOVQ A_BR(DI), AX
	VMOVUPD Z2, (AX)
	MOVQ A_BI(DI), AX
	VMOVUPD Z3, (AX)
	VZEROUPPER
	RET

// Offsets in relaxArgs and relaxStep.
#define R_REC 0
#define R_STEPS 8
#define R_FACT 16
#define R_OFF 24
#define R_POS 56
#define R_SCALE 88
#define R_R1 120
#define R_R2 152
#define R_MX 184
#define R_MY 216
#define R_MZ 248
#define R_X 280
#define R_Y 312
#define R_Z 344
#define R_A 376
#define R_C 408
#define S_T 0
#define S_WXT 8
#define S_WYT 16
#define S_GT 24
#define S_SUB 32
#define S_TERMS 40
#define S_SIZE 48

// XMUL sets (o0, o1, o2) = X·(i0, i1, i2) for X = [[a, z, −y], [−z, a, x],
// [y, −x, c]] as xMul in relax.go rounds it: ((a·i0 + z·i1) − y·i2,
// (a·i1 − z·i0) + x·i2, (y·i0 − x·i1) + c·i2); t is scratch.
#define XMUL(i0, i1, i2, o0, o1, o2, t) \
	VMULPD R_A(DI), i0, o0 \
	VMULPD R_Z(DI), i1, t \
	VADDPD t, o0, o0 \
	VMULPD R_Y(DI), i2, t \
	VSUBPD t, o0, o0 \
	VMULPD R_A(DI), i1, o1 \
	VMULPD R_Z(DI), i0, t \
	VSUBPD t, o1, o1 \
	VMULPD R_X(DI), i2, t \
	VADDPD t, o1, o1 \
	VMULPD R_Y(DI), i0, o2 \
	VMULPD R_X(DI), i1, t \
	VSUBPD t, o2, o2 \
	VMULPD R_C(DI), i2, t \
	VADDPD t, o2, o2

// func relaxAVX2(a *relaxArgs)
//
// Registers: Y0–Y2 the magnetization; per step Y3–Y7 x, y, z, a, c (kept in
// the argument block's scratch), Y8–Y12 the series' coefficients, Y3–Y5 the
// sums d0, d1, d2; in a substep Y6–Y8 w, Y9–Y11 X·w, Y12, Y14, Y15 X²·w, Y13
// scratch.
TEXT ·relaxAVX2(SB), NOSPLIT, $0-8
	MOVQ a+0(FP), DI
	MOVQ R_REC(DI), R8
	MOVQ R_STEPS(DI), CX
	MOVQ R_FACT(DI), BX
	VMOVUPD R_MX(DI), Y0
	VMOVUPD R_MY(DI), Y1
	VMOVUPD R_MZ(DI), Y2
	TESTQ CX, CX
	JEQ rdone

rstep:
	// x = scale·wxt, y = scale·wyt, z = off·t + pos·gt, a = −r2·t, c = −r1·t.
	VBROADCASTSD S_WXT(R8), Y14
	VMULPD R_SCALE(DI), Y14, Y3
	VBROADCASTSD S_WYT(R8), Y14
	VMULPD R_SCALE(DI), Y14, Y4
	VBROADCASTSD S_T(R8), Y15
	VMULPD R_OFF(DI), Y15, Y5
	VBROADCASTSD S_GT(R8), Y14
	VMULPD R_POS(DI), Y14, Y14
	VADDPD Y14, Y5, Y5
	VMULPD R_R2(DI), Y15, Y6
	VXORPD vsign<>(SB), Y6, Y6
	VMULPD R_R1(DI), Y15, Y7
	VXORPD vsign<>(SB), Y7, Y7
	VMOVUPD Y3, R_X(DI)
	VMOVUPD Y4, R_Y(DI)
	VMOVUPD Y5, R_Z(DI)
	VMOVUPD Y6, R_A(DI)
	VMOVUPD Y7, R_C(DI)

	// xy2 = x·x + y·y (Y8), z2 = z·z (Y9).
	VMULPD Y3, Y3, Y8
	VMULPD Y4, Y4, Y14
	VADDPD Y14, Y8, Y8
	VMULPD Y5, Y5, Y9
	// −q1 = (a + a) + c (Y10).
	VADDPD Y6, Y6, Y10
	VADDPD Y7, Y10, Y10
	// −q2 = −(((a·a + z2) + 2a·c) + xy2) (Y11).
	VMULPD Y6, Y6, Y11
	VADDPD Y9, Y11, Y11
	VADDPD Y6, Y6, Y12
	VMULPD Y7, Y12, Y12
	VADDPD Y12, Y11, Y11
	VADDPD Y8, Y11, Y11
	VXORPD vsign<>(SB), Y11, Y11
	// −q3 = ((a·a)·c + a·xy2) + c·z2 (Y12).
	VMULPD Y6, Y6, Y12
	VMULPD Y7, Y12, Y12
	VMULPD Y8, Y6, Y13
	VADDPD Y13, Y12, Y12
	VMULPD Y9, Y7, Y13
	VADDPD Y13, Y12, Y12

	// Horner: (e0, e1, e2) = (c_K, 0, 0); for k = K−1 … 0:
	// (e0, e1, e2) ← (c_k + q3·e2, e0 + q2·e2, e1 + q1·e2).
	MOVQ S_TERMS(R8), DX
	VBROADCASTSD (BX)(DX*8), Y3
	VXORPD Y4, Y4, Y4
	VXORPD Y5, Y5, Y5
rterm:
	DECQ DX
	JLT rseries
	VBROADCASTSD (BX)(DX*8), Y13
	VMULPD Y5, Y12, Y6
	VADDPD Y6, Y13, Y6
	VMULPD Y5, Y11, Y7
	VADDPD Y7, Y3, Y7
	VMULPD Y5, Y10, Y14
	VADDPD Y14, Y4, Y14
	VMOVAPD Y6, Y3
	VMOVAPD Y7, Y4
	VMOVAPD Y14, Y5
	JMP rterm

rseries:
	// sub substeps: w = X·M + t·b; M ← M + ((d0·w + d1·X·w) + d2·X²·w).
	MOVQ S_SUB(R8), R9
rsub:
	XMUL(Y0, Y1, Y2, Y6, Y7, Y8, Y13)
	VSUBPD R_C(DI), Y8, Y8
	XMUL(Y6, Y7, Y8, Y9, Y10, Y11, Y13)
	XMUL(Y9, Y10, Y11, Y12, Y14, Y15, Y13)
	VMULPD Y6, Y3, Y6
	VMULPD Y9, Y4, Y13
	VADDPD Y13, Y6, Y6
	VMULPD Y12, Y5, Y13
	VADDPD Y13, Y6, Y6
	VADDPD Y6, Y0, Y0
	VMULPD Y7, Y3, Y7
	VMULPD Y10, Y4, Y13
	VADDPD Y13, Y7, Y7
	VMULPD Y14, Y5, Y13
	VADDPD Y13, Y7, Y7
	VADDPD Y7, Y1, Y1
	VMULPD Y8, Y3, Y8
	VMULPD Y11, Y4, Y13
	VADDPD Y13, Y8, Y8
	VMULPD Y15, Y5, Y13
	VADDPD Y13, Y8, Y8
	VADDPD Y8, Y2, Y2
	DECQ R9
	JGT rsub

	ADDQ $S_SIZE, R8
	DECQ CX
	JGT rstep

rdone:
	VMOVUPD Y0, R_MX(DI)
	VMOVUPD Y1, R_MY(DI)
	VMOVUPD Y2, R_MZ(DI)
	VZEROUPPER
	RET
