/** The cautions Nestmark shows where the work can hurt someone. */
export const CAUTION_KINDS = ['heavy', 'pinch', 'solvent', 'air'] as const;
export type CautionKind = (typeof CAUTION_KINDS)[number];

export const CAUTIONS: Record<CautionKind, { title: string; text: string }> = {
	heavy: {
		title: 'Heavy item',
		text: 'Use lifting aids or a two-person lift as your shop’s procedure requires.'
	},
	pinch: {
		title: 'Pinch points',
		text: 'Keep fingers clear of the balls and grooves while the halves come together.'
	},
	solvent: {
		title: 'Solvents and lubricants',
		text: 'Follow their safety data sheets: ventilation, gloves, no open flames.'
	},
	air: {
		title: 'Compressed air',
		text: 'Wear eye protection and never point the air at skin.'
	}
};

/** Mass at or above which the heavy-lift caution shows (common practice; set by the shop's own lifting rules). */
export const HEAVY_LIFT_KG = 15;

/** The closing line under every set of cautions. */
export const CAUTION_DEFERENCE =
	'Local codes and your shop’s own procedures govern; Nestmark’s flags support, and never replace, a qualified person’s judgement.';
