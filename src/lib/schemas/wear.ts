import { z } from 'zod';
import { INSPECTION_VERDICTS, WEAR_GRADE_MAX, WEAR_MARKS } from '../domain/wear';

export {
	INSPECTION_VERDICTS,
	WEAR_GRADES,
	WEAR_GRADE_MAX,
	WEAR_MARKS,
	type InspectionVerdict,
	type WearGrade,
	type WearMark
} from '../domain/wear';

/** A whole grade on WEAR_GRADES. */
export const wearGradeSchema = z
	.number({ error: `Wear grade must be a number from 0 to ${WEAR_GRADE_MAX}` })
	.int('Wear grade must be a whole number')
	.min(0, `Wear grade must be from 0 to ${WEAR_GRADE_MAX}`)
	.max(WEAR_GRADE_MAX, `Wear grade must be from 0 to ${WEAR_GRADE_MAX}`);

/** One of WEAR_MARKS. */
export const wearMarkSchema = z.enum(WEAR_MARKS, {
	error: `Mark must be one of: ${WEAR_MARKS.join(', ')}`
});

/** One of INSPECTION_VERDICTS. */
export const inspectionVerdictSchema = z.enum(INSPECTION_VERDICTS, {
	error: `Verdict must be one of: ${INSPECTION_VERDICTS.join(', ')}`
});
