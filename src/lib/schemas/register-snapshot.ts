import { z } from 'zod';
import { OPEN_WORK_ORDER_STATUSES, WORK_ORDER_ACTIONS } from '../domain/work-orders';
import { FIXTURE_STATUSES, FIXTURE_TYPES, FLAG_KINDS } from './fixture';

/** The open work order that answers a flag: "planned for DATE · ASSIGNEE". */
export const snapshotPlannedWorkSchema = z.object({
	workOrderId: z.number().int(),
	dueOn: z.string().nullable(),
	assignee: z.string().nullable()
});
export type SnapshotPlannedWork = z.infer<typeof snapshotPlannedWorkSchema>;

/** An open health flag as the card shows it. */
export const snapshotFlagSchema = z.object({
	kind: z.enum(FLAG_KINDS),
	reason: z.string(),
	raisedAt: z.string(),
	/** The open work order that answers it, soonest due first; absent in older copies. */
	plannedWork: snapshotPlannedWorkSchema.optional()
});

/**
 * The fixture's effective health policy, every field, resolved on the server exactly as its health
 * rules resolve it (fixture → class → type → default); null where a rule is switched off.
 */
export const snapshotPolicySchema = z.object({
	repeatabilitySpec_um: z.number().nullable(),
	repeatabilityWindow: z.number().int().nullable(),
	breakInMinCycles: z.number().int().nullable(),
	settleWindow: z.number().int().nullable(),
	settleTolerance_um: z.number().nullable(),
	cleaningIntervalCycles: z.number().int().nullable(),
	cleaningIntervalDays: z.number().int().nullable(),
	inspectionIntervalCycles: z.number().int().nullable(),
	inspectionIntervalDays: z.number().int().nullable(),
	ratedLifeCycles: z.number().int().nullable(),
	wearLimitGrade: z.number().int().nullable(),
	forecastHorizonCycles: z.number().int().nullable(),
	planningHorizonDays: z.number().int().nullable()
});

/** Counters the server derived from the log, as of the snapshot. */
export const snapshotStateSchema = z.object({
	totalCycles: z.number().int(),
	cyclesSinceCleaning: z.number().int(),
	cyclesSinceInspection: z.number().int(),
	repeatability_um: z.number().nullable(),
	lastEventAt: z.string().nullable(),
	lastCleaningAt: z.string().nullable(),
	lastInspectionAt: z.string().nullable()
});

/**
 * The fixture's break-in progress as the server last folded it, and the settle rule of its policy,
 * so a break-in run on the phone is judged by the same fold as on the server. Optional: copies
 * stored before it existed lack it until the next refresh.
 */
export const snapshotBreakInSchema = z.object({
	required: z.boolean(),
	reason: z.enum(['new', 'part-swap', 'relubricated']).nullable(),
	cycles: z.number().int(),
	/** Running sums of the settling window not yet complete (see health.ts WindowAccumulator). */
	acc: z.array(z.number()),
	windows: z.array(z.object({ cycle: z.number(), R: z.number() })),
	rule: z.object({
		repeatabilitySpec_um: z.number(),
		breakInMinCycles: z.number().int(),
		settleWindow: z.number().int(),
		settleTolerance_um: z.number()
	})
});
export type SnapshotBreakIn = z.infer<typeof snapshotBreakInSchema>;

/** One fixture in the device's copy of the register: what the card needs, and no more. */
export const snapshotFixtureSchema = z.object({
	code: z.string(),
	name: z.string(),
	type: z.enum(FIXTURE_TYPES),
	status: z.enum(FIXTURE_STATUSES),
	/** Site / area / location, for "where is it". */
	location: z.object({ site: z.string(), area: z.string(), name: z.string() }),
	flags: z.array(snapshotFlagSchema),
	/** Mass of the moving half, for the heavy-lift caution. */
	mass_kg: z.number().nullable(),
	policy: snapshotPolicySchema,
	state: snapshotStateSchema,
	breakIn: snapshotBreakInSchema.optional(),
	/** Contacts an inspection grades, from the latest saved geometry; null without one. */
	inspectionContacts: z.array(z.string()).nullable().optional(),
	updatedAt: z.string()
});
export type SnapshotFixture = z.infer<typeof snapshotFixtureSchema>;

/** One open work order assigned to the person the copy was made for: what `/work` shows. */
export const snapshotWorkOrderSchema = z.object({
	id: z.number().int(),
	fixtureCode: z.string(),
	fixtureName: z.string(),
	action: z.enum(WORK_ORDER_ACTIONS),
	actionText: z.string().nullable(),
	status: z.enum(OPEN_WORK_ORDER_STATUSES),
	dueOn: z.string().nullable(),
	parts: z.array(
		z.object({
			description: z.string(),
			quantity: z.number(),
			size: z.string().optional(),
			material: z.string().optional()
		})
	),
	notes: z.string().nullable(),
	/** Reasons of the open flags it answers. */
	flagReasons: z.array(z.string())
});
export type SnapshotWorkOrder = z.infer<typeof snapshotWorkOrderSchema>;

/** Body of `GET /api/register-snapshot`; `version` is the same value as the ETag. */
export const registerSnapshotSchema = z.object({
	version: z.string(),
	generatedAt: z.string(),
	fixtures: z.array(snapshotFixtureSchema),
	/**
	 * The open work orders assigned to `workOrdersFor` (the user id the copy was made for).
	 * Absent in answers from before work orders, and in one-fixture answers (`?code=`).
	 */
	workOrders: z.array(snapshotWorkOrderSchema).optional(),
	workOrdersFor: z.string().optional()
});
export type RegisterSnapshot = z.infer<typeof registerSnapshotSchema>;

/** "Site / Area / Location" in one line. */
export function locationPath(f: Pick<SnapshotFixture, 'location'>): string {
	return [f.location.site, f.location.area, f.location.name].join(' / ');
}
