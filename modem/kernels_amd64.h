// Macros shared by the AVX2 kernels of package modem (channel_amd64.s,
// bank_amd64.s).

// ZERO8 clears the accumulators Y0…Y7.
#define ZERO8 \
	VXORPS Y0, Y0, Y0; \
	VXORPS Y1, Y1, Y1; \
	VXORPS Y2, Y2, Y2; \
	VXORPS Y3, Y3, Y3; \
	VXORPS Y4, Y4, Y4; \
	VXORPS Y5, Y5, Y5; \
	VXORPS Y6, Y6, Y6; \
	VXORPS Y7, Y7, Y7

// LANES16DONE stores the sixteen outputs of a lanes kernel's pass
// (Y0…Y3, four complex outputs each) at DI and moves DI and the input SI
// on by sixteen samples, CX down by sixteen outputs.
#define LANES16DONE \
	VMOVUPS Y0, (DI); \
	VMOVUPS Y1, 32(DI); \
	VMOVUPS Y2, 64(DI); \
	VMOVUPS Y3, 96(DI); \
	ADDQ    $128, SI; \
	ADDQ    $128, DI; \
	SUBQ    $16, CX
