package org.corral.train;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;
import java.util.SplittableRandom;

import org.corral.boxes.Box;
import org.corral.image.PlanarImage;
import org.corral.loss.BackgroundTerm;
import org.corral.loss.CrossEntropyTerm;
import org.corral.supervision.Supervision;

import org.junit.jupiter.api.Test;

/**
 * What the background term reads in a crop: 1 on known background (the ring around a box), the
 * weight {@link LearnSettings#unknownGround} on ground that is neither boxed nor known, 0 inside the
 * box. The instance map learns its target 0 only on known background.
 */
class UnknownGroundTest {
	static final int W = 96, S = 64;
	static final Box BOX = new Box(1, 40, 42, 16, 12);

	static CropSampler sampler(double unknownGround, Supervision.BackgroundMode mode) {
		LearnSettings s = new LearnSettings();
		s.crop = S;
		s.unknownGround = unknownGround;
		s.background = mode;
		float[] px = new float[W * W];
		for (int y = BOX.y() + 2; y < BOX.y1() - 2; y++)
			for (int x = BOX.x() + 2; x < BOX.x1() - 2; x++) px[y * W + x] = 1;
		PlanarImage im = new PlanarImage(W, W, new float[][] {px});
		Supervision sup = s.supervision().forImage(im, List.of(BOX), null);
		return new CropSampler(List.of(new CropSampler.Prepared("field", im, im, sup, new float[][] {{0}, {1}})), s, new SplittableRandom(7), 0);
	}

	@Test
	void groundOutsideBoxesAndRingsIsWeaklyBackground() {
		for (double eps : new double[] {0.1, 0}) {
			CropSampler sampler = sampler(eps, Supervision.BackgroundMode.RING);
			for (int n = 0; n < 20; n++) { // crops of 64 centred within 16 px of the box lie inside the 96 px image
				CropSampler.Crop c = sampler.next();
				float[] bg = c.targets().plane(BackgroundTerm.PLANE).data();
				float[] instanceKnown = c.targets().plane(CrossEntropyTerm.INSTANCE_MAP.known()).data();
				int zero = 0, one = 0, weak = 0;
				for (int i = 0; i < bg.length; i++) {
					if (bg[i] == 0) zero++;
					else if (bg[i] == 1) one++;
					else {
						assertEquals(eps, bg[i], 1e-6, "the only other weight is the unknown ground's");
						weak++;
						assertEquals(0f, instanceKnown[i], "the instance map learns nothing on unknown ground");
					}
					if (bg[i] == 1) assertEquals(1f, instanceKnown[i], "known background is 0 on the instance map");
				}
				assertTrue(one > 0, "the ring around the box is known background");
				if (eps > 0) {
					assertEquals(BOX.width() * BOX.height(), zero, "only the box itself carries no background weight");
					assertTrue(weak > S * S / 2, "most of the crop is unknown ground: " + weak);
				} else {
					assertEquals(0, weak);
					assertTrue(zero > S * S / 2, "with weight 0, unknown ground is left out: " + zero);
				}
			}
		}
	}

	@Test
	void everyObjectBoxedLeavesNoUnknownGround() {
		CropSampler sampler = sampler(0.1, Supervision.BackgroundMode.FULL);
		for (int n = 0; n < 5; n++) {
			float[] bg = sampler.next().targets().plane(BackgroundTerm.PLANE).data();
			int zero = 0;
			for (float v : bg) {
				assertTrue(v == 0 || v == 1, "only known background and the box: " + v);
				if (v == 0) zero++;
			}
			assertEquals(BOX.width() * BOX.height(), zero);
		}
	}
}
