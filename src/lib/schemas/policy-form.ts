import { z } from 'zod';
import { FIXTURE_TYPES } from './fixture';
import { WEAR_GRADE_MAX } from './wear';

/*
 * The policy form (a fixture type's policy) and the per-fixture overrides form. Form fields arrive
 * as text: blank means "off" for the optional intervals, and "inherit" in the overrides form.
 * Ranges are the domain's assertPolicy ranges, so a saved policy can always be evaluated.
 */

const blank = (v: unknown) =>
	v === undefined || v === null || (typeof v === 'string' && v.trim() === '');
const toNumber = (v: unknown) => (typeof v === 'string' ? Number(v.trim().replace(',', '.')) : v);

const positive = (label: string) =>
	z.preprocess(
		toNumber,
		z.number({ error: `${label}: enter a number.` }).positive(`${label} must be more than 0.`)
	);
const nonNegative = (label: string) =>
	z.preprocess(
		toNumber,
		z.number({ error: `${label}: enter a number.` }).min(0, `${label} cannot be negative.`)
	);
const whole = (label: string, min: number, max: number) =>
	z.preprocess(
		toNumber,
		z
			.number({ error: `${label}: enter a whole number.` })
			.int(`${label} must be a whole number.`)
			.min(min, `${label} must be at least ${min}.`)
			.max(max, `${label} must be at most ${max}.`)
	);
/** Blank switches the rule off. */
const optionalInterval = (label: string) =>
	z.preprocess((v) => (blank(v) ? null : v), whole(label, 1, 10_000_000).nullable());

/** The twelve policy values as a form sends them. */
export const policyValuesSchema = z.object({
	repeatabilitySpec_um: positive('Repeatability spec'),
	repeatabilityWindow: whole('Reseats per window', 2, 1000),
	breakInMinCycles: whole('Minimum break-in cycles', 0, 10_000_000),
	settleWindow: whole('Settling window', 2, 1000),
	settleTolerance_um: nonNegative('Settling tolerance'),
	cleaningIntervalCycles: optionalInterval('Cleaning interval (cycles)'),
	cleaningIntervalDays: optionalInterval('Cleaning interval (days)'),
	inspectionIntervalCycles: optionalInterval('Inspection interval (cycles)'),
	inspectionIntervalDays: optionalInterval('Inspection interval (days)'),
	ratedLifeCycles: optionalInterval('Rated seating life'),
	wearLimitGrade: whole('Wear grade limit', 1, WEAR_GRADE_MAX),
	forecastHorizonCycles: whole('Forecast horizon', 0, 10_000_000),
	planningHorizonDays: whole('Planning horizon', 0, 366)
});
export type PolicyValues = z.infer<typeof policyValuesSchema>;
export const POLICY_FIELDS = Object.keys(policyValuesSchema.shape) as (keyof PolicyValues)[];

/** A fixture type's policy (the page's edit form). */
export const typePolicyFormSchema = policyValuesSchema.extend({
	type: z.enum(FIXTURE_TYPES, { error: 'Choose a fixture type.' })
});

/**
 * Per-fixture overrides: every field optional; blank inherits, "off" switches an interval off.
 * The result holds only the fields that are overridden.
 */
export const overridesFormSchema = z.object({
	code: z.string().trim().min(1, 'Enter a fixture code.'),
	...Object.fromEntries(
		POLICY_FIELDS.map((f) => {
			const base = policyValuesSchema.shape[f];
			return [
				f,
				z.preprocess((v) => (blank(v) ? undefined : v === 'off' ? null : v), base.optional())
			];
		})
	)
}) as z.ZodType<{ code: string } & Partial<PolicyValues>>;
