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
