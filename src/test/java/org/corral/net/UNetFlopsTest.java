package org.corral.net;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.Test;

class UNetFlopsTest {
	@Test
	void defaultNetworkCountedByHand() {
		// widths 16, 32, 64, 128; per level: encoder convs in->c, c->c; decoder convs (c + 2c)->c, c->c; 2 * 9 FLOP per weight
		long l0 = 2 * 9 * (1 * 16 + 16 * 16) + 2 * 9 * (48 * 16 + 16 * 16) + 2 * 16; // + 1x1 head
		long l1 = (2 * 9 * (16 * 32 + 32 * 32) + 2 * 9 * (96 * 32 + 32 * 32)) / 4;
		long l2 = (2 * 9 * (32 * 64 + 64 * 64) + 2 * 9 * (192 * 64 + 64 * 64)) / 16;
		long l3 = (2 * 9 * (64 * 128 + 128 * 128)) / 64;
		assertEquals(80_960, l0 + l1 + l2 + l3);
		assertEquals(l0 + l1 + l2 + l3, new UNet(1, 16, 4).flopsPerPixel());
		// three input channels add 2 * 9 * 2 * 16 at full resolution; a second output 2 * 16
		assertEquals(80_960 + 576, new UNet(3, 16, 4).flopsPerPixel());
		assertEquals(80_960 + 32, new UNet(1, 16, 4, 2).flopsPerPixel());
	}
}
