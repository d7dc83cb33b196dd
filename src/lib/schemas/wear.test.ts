import { describe, expect, it } from 'vitest';
import { WEAR_GRADES, WEAR_GRADE_MAX, WEAR_MARKS, wearGradeSchema } from './wear';

describe("Nestmark's wear scale", () => {
	it('runs 0 to 4 with a distinct name, a description and a visual cue for each grade', () => {
		expect(WEAR_GRADES.map((g) => g.grade)).toEqual([0, 1, 2, 3, 4]);
		expect(WEAR_GRADE_MAX).toBe(4);
		expect(new Set(WEAR_GRADES.map((g) => g.name)).size).toBe(5);
		for (const g of WEAR_GRADES) {
			expect(g.description).toMatch(/^[A-Z].+\.$/);
			expect(g.cue).toMatch(/^[A-Z].+\.$/);
		}
	});

	it('accepts whole grades 0–4 only', () => {
		expect(wearGradeSchema.safeParse(0).success).toBe(true);
		expect(wearGradeSchema.safeParse(4).success).toBe(true);
		expect(wearGradeSchema.safeParse(5).success).toBe(false);
		expect(wearGradeSchema.safeParse(-1).success).toBe(false);
		expect(wearGradeSchema.safeParse(2.5).success).toBe(false);
	});

	it('lists the trade marks an inspector can tick', () => {
		expect(WEAR_MARKS).toEqual(['fretting', 'pitting', 'brinelling', 'corrosion', 'debris']);
	});
});
