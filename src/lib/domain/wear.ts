/**
 * Nestmark's own wear scale for a ball, groove, socket or flat contact, graded by eye under a
 * loupe after wiping the contact clean. It is deliberately short: five grades a technician can tell
 * apart at the bench, each with the cue to look for.
 */
export const WEAR_GRADES = [
	{
		grade: 0,
		name: 'Bright',
		description: 'As made: the contact area is smooth and reflective with no track.',
		cue: 'Mirror finish; no line or band where the ball sits, even under a 10× loupe.'
	},
	{
		grade: 1,
		name: 'Tracked',
		description: 'A polished seating track has formed but the surface is intact.',
		cue: 'A thin, even, shiny band at the contact; no dull or rough spots.'
	},
	{
		grade: 2,
		name: 'Dulled',
		description: 'The track has widened and turned matt; early fretting has begun.',
		cue: 'A grey matt band, perhaps with fine reddish-brown dust that wipes away.'
	},
	{
		grade: 3,
		name: 'Scarred',
		description: 'Pits, dents or fretting scars that change how the ball seats.',
		cue: 'A fingernail drawn across the contact catches; pits or small dents are visible.'
	},
	{
		grade: 4,
		name: 'Spent',
		description: 'Material is lost, cracked or corroded through; the contact no longer locates.',
		cue: 'Flaking, cracks, deep pits, or rust that stays after wiping.'
	}
] as const;

/** Highest grade on the scale. */
export const WEAR_GRADE_MAX = 4;

/** A whole grade from 0 to WEAR_GRADE_MAX. */
export type WearGrade = number;

/** Marks an inspector can tick for a contact (trade terms). */
export const WEAR_MARKS = ['fretting', 'pitting', 'brinelling', 'corrosion', 'debris'] as const;
export type WearMark = (typeof WEAR_MARKS)[number];

/** Overall verdict of an inspection. */
export const INSPECTION_VERDICTS = ['serviceable', 'watch', 'replace'] as const;
export type InspectionVerdict = (typeof INSPECTION_VERDICTS)[number];
