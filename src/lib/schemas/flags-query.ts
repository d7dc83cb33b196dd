import { z } from 'zod';
import { FLAG_KINDS } from './fixture';

const blank = (v: unknown) =>
	v === null || (typeof v === 'string' && v.trim() === '') ? undefined : v;

/** Query of GET /api/flags: optional flag kind and area id. */
export const flagsQuerySchema = z.object({
	kind: z.preprocess(
		blank,
		z.enum(FLAG_KINDS, { error: `kind must be one of: ${FLAG_KINDS.join(', ')}.` }).optional()
	),
	area: z.preprocess(
		(v) => {
			const b = blank(v);
			return typeof b === 'string' && /^\d+$/.test(b) ? Number(b) : b;
		},
		z.number({ error: 'area must be a numeric area id.' }).int().positive().optional()
	)
});
export type FlagsQuery = z.infer<typeof flagsQuerySchema>;
