/**
 * Work orders at the boundary: the JSON API's bodies and query (`/api/work-orders`), shared by the
 * planner's forms and the server. Rules (transitions, actions for flags) live in
 * `$lib/domain/work-orders`; this file only checks shapes and gives field messages.
 */
import { z } from 'zod';
import {
	WORK_ORDER_ACTIONS,
	WORK_ORDER_LIMITS as L,
	WORK_ORDER_STATUSES
} from '../domain/work-orders';
import { unicodeString } from './text';

export {
	OPEN_WORK_ORDER_STATUSES,
	WORK_ORDER_ACTIONS,
	WORK_ORDER_LIMITS,
	WORK_ORDER_STATUSES,
	type WorkOrderAction,
	type WorkOrderPart,
	type WorkOrderStatus
} from '../domain/work-orders';

/** A calendar date as the API spells it. */
export const isoDateSchema = (field: string) =>
	z
		.string({ error: `${field} must be a date (YYYY-MM-DD).` })
		.regex(/^\d{4}-\d{2}-\d{2}$/, `${field} must be a date (YYYY-MM-DD).`)
		.refine(
			(s) => {
				const d = new Date(`${s}T00:00:00Z`);
				return !Number.isNaN(d.getTime()) && d.toISOString().slice(0, 10) === s;
			},
			{ message: `${field} is not a date on the calendar.` }
		);

const text = (field: string, max: number) =>
	unicodeString(field, `${field} must be text.`)
		.trim()
		.max(max, `${field} must be at most ${max} characters.`);

const optionalText = (field: string, max: number) =>
	text(field, max)
		.optional()
		.transform((s) => (s ? s : undefined));

export const workOrderActionSchema = z.enum(WORK_ORDER_ACTIONS, {
	error: `action must be one of: ${WORK_ORDER_ACTIONS.join(', ')}.`
});
export const workOrderStatusSchema = z.enum(WORK_ORDER_STATUSES, {
	error: `status must be one of: ${WORK_ORDER_STATUSES.join(', ')}.`
});

/** One line of parts. */
export const workOrderPartSchema = z.strictObject({
	description: text('Part description', L.partDescription).min(1, 'Describe the part.'),
	quantity: z
		.number({ error: 'Quantity must be a number.' })
		.int('Quantity must be a whole number.')
		.min(1, 'Quantity must be at least 1.')
		.max(L.partQuantityMax, `Quantity must be at most ${L.partQuantityMax}.`),
	size: optionalText('Size', L.partSize),
	material: optionalText('Material', L.partMaterial)
});

export const workOrderPartsSchema = z
	.array(workOrderPartSchema, { error: 'parts must be a list.' })
	.max(L.partsMax, `At most ${L.partsMax} part lines.`);

const email = z
	.string({ error: 'assigneeEmail must be an e-mail address.' })
	.trim()
	.toLowerCase()
	.max(255, 'assigneeEmail must be at most 255 characters.')
	.pipe(z.email({ error: 'assigneeEmail must be an e-mail address.' }));

/** `POST /api/work-orders`. */
export const workOrderCreateSchema = z
	.strictObject({
		fixtureCode: z
			.string({ error: 'fixtureCode is required.' })
			.trim()
			.toUpperCase()
			.min(1, 'fixtureCode is required.')
			.max(16, 'fixtureCode must be at most 16 characters.'),
		action: workOrderActionSchema,
		/** What "other" means; required for action "other", refused otherwise. */
		actionText: optionalText('actionText', L.otherActionText),
		dueOn: isoDateSchema('dueOn').optional(),
		assigneeEmail: email.optional(),
		flagId: z
			.number({ error: 'flagId must be a number.' })
			.int('flagId must be a whole number.')
			.positive('flagId must be a flag id.')
			.optional(),
		parts: workOrderPartsSchema.default([]),
		notes: optionalText('notes', L.notes)
	})
	.superRefine((v, ctx) => {
		if (v.action === 'other' && !v.actionText)
			ctx.addIssue({
				code: 'custom',
				path: ['actionText'],
				message: 'Say what the work is (actionText) for action "other".'
			});
		if (v.action !== 'other' && v.actionText)
			ctx.addIssue({
				code: 'custom',
				path: ['actionText'],
				message: 'actionText is only for action "other".'
			});
	});
export type WorkOrderCreate = z.output<typeof workOrderCreateSchema>;

/**
 * `PATCH /api/work-orders/[id]`: any of these; `null` clears the due date or the assignee. A
 * cancellation needs its reason in the same request.
 */
export const workOrderPatchSchema = z
	.strictObject({
		dueOn: isoDateSchema('dueOn').nullable().optional(),
		assigneeEmail: email.nullable().optional(),
		status: workOrderStatusSchema.optional(),
		cancelReason: optionalText('cancelReason', L.cancelReason),
		notes: text('notes', L.notes).nullable().optional(),
		parts: workOrderPartsSchema.optional()
	})
	.superRefine((v, ctx) => {
		if (Object.values(v).every((x) => x === undefined))
			ctx.addIssue({ code: 'custom', path: [], message: 'Nothing to change.' });
		if (v.status === 'cancelled' && !v.cancelReason)
			ctx.addIssue({
				code: 'custom',
				path: ['cancelReason'],
				message: 'Say why the work order is cancelled.'
			});
		if (v.cancelReason && v.status !== 'cancelled')
			ctx.addIssue({
				code: 'custom',
				path: ['cancelReason'],
				message: 'cancelReason goes with status "cancelled".'
			});
	});
export type WorkOrderPatch = z.output<typeof workOrderPatchSchema>;

const blank = (v: unknown) => (typeof v === 'string' && v.trim() === '' ? undefined : v);

/** `GET /api/work-orders` (and the planner's list, which adds its own filters). */
export const workOrderQuerySchema = z.object({
	status: z.preprocess(blank, workOrderStatusSchema.optional()),
	/** "me" or an e-mail address. */
	assignee: z.preprocess(
		blank,
		z
			.string()
			.trim()
			.toLowerCase()
			.max(255, 'assignee must be "me" or an e-mail address.')
			.refine((s) => s === 'me' || z.email().safeParse(s).success, {
				message: 'assignee must be "me" or an e-mail address.'
			})
			.optional()
	),
	fixture: z.preprocess(
		blank,
		z.string().trim().toUpperCase().max(16, 'fixture must be a fixture code.').optional()
	),
	from: z.preprocess(blank, isoDateSchema('from').optional()),
	to: z.preprocess(blank, isoDateSchema('to').optional())
});
export type WorkOrderQuery = z.output<typeof workOrderQuerySchema>;

/** A work order as the API and the pages show it. */
export interface WorkOrderView {
	id: number;
	fixtureCode: string;
	fixtureName: string;
	/** Where the fixture is, "Site / Area / Location". */
	place: string;
	action: (typeof WORK_ORDER_ACTIONS)[number];
	actionText: string | null;
	status: (typeof WORK_ORDER_STATUSES)[number];
	dueOn: string | null;
	assigneeEmail: string | null;
	assigneeName: string | null;
	parts: z.output<typeof workOrderPartSchema>[];
	notes: string | null;
	cancelReason: string | null;
	/** The flags it answers, open or closed. */
	flags: { id: number; kind: string; reason: string; open: boolean }[];
	createdAt: string;
	createdByEmail: string | null;
	updatedAt: string;
	startedAt: string | null;
	completedAt: string | null;
	completedByEmail: string | null;
	/** Work recorded from the phone after the order was cancelled. */
	doneAfterCancel: boolean;
}

/** One row of a work order's history. */
export interface WorkOrderHistoryView {
	at: string;
	byEmail: string | null;
	byName: string | null;
	what: string;
	changes: Record<string, [unknown, unknown]>;
	eventId: string | null;
}

export type WorkOrderWithHistory = WorkOrderView & { history: WorkOrderHistoryView[] };
