/**
 * The planner's pages at the boundary: the list's filters (in the URL), the words for actions and
 * statuses, and reading the create / edit forms into the shapes the work-order schemas check.
 */
import { z } from 'zod';
import {
	WORK_ORDER_ACTIONS,
	WORK_ORDER_STATUSES,
	type WorkOrderAction,
	type WorkOrderStatus
} from '../domain/work-orders';
import { isoDateSchema } from './work-orders';

/** What each action is called on the planner's pages. */
export const ACTION_LABELS: Record<WorkOrderAction, string> = {
	'replace-balls': 'Replace balls and seats',
	'replace-seats': 'Replace seats or vee inserts',
	'replace-fixture': 'Replace the whole fixture',
	're-break-in': 'Break-in run',
	inspect: 'Wear inspection',
	clean: 'Cleaning',
	other: 'Other work'
};

/** What each status is called next to its badge. */
export const STATUS_LABELS: Record<WorkOrderStatus, string> = {
	planned: 'Planned',
	scheduled: 'Scheduled',
	underway: 'Under way',
	done: 'Done',
	cancelled: 'Cancelled'
};

/** Actions that take the contacts or the fixture apart: these show the handling cautions. */
export const REPLACING_ACTIONS: readonly WorkOrderAction[] = [
	'replace-balls',
	'replace-seats',
	'replace-fixture'
];

/** The planner's list shows open orders unless a status is chosen. */
export const PLAN_STATUS_CHOICES = ['open', ...WORK_ORDER_STATUSES] as const;
export type PlanStatusChoice = (typeof PLAN_STATUS_CHOICES)[number];

/** Orders per page of the planner's list. */
export const PLAN_PAGE_SIZE = 50;

const blank = (v: unknown) => (typeof v === 'string' && v.trim() === '' ? undefined : v);

/** The planner's list filters, as they appear in the URL of `/plan`. */
export const planQuerySchema = z.object({
	status: z.preprocess(
		blank,
		z.enum(PLAN_STATUS_CHOICES, { error: 'status is not a status.' }).default('open')
	),
	/** The assignee's e-mail address. */
	assignee: z.preprocess(
		blank,
		z
			.string()
			.trim()
			.toLowerCase()
			.max(255)
			.refine((s) => z.email().safeParse(s).success, {
				message: 'assignee must be an e-mail address.'
			})
			.optional()
	),
	area: z.preprocess(blank, z.coerce.number().int().positive('area is not an area.').optional()),
	action: z.preprocess(
		blank,
		z.enum(WORK_ORDER_ACTIONS, { error: 'action is not an action.' }).optional()
	),
	from: z.preprocess(blank, isoDateSchema('from').optional()),
	to: z.preprocess(blank, isoDateSchema('to').optional()),
	page: z.preprocess(blank, z.coerce.number().int().min(1).max(10_000).default(1))
});
export type PlanQuery = z.output<typeof planQuerySchema>;

/**
 * Reads a page's URL query with `schema`; a bad value is dropped and named (key → message), so a
 * shared link still opens with the rest of it.
 */
export function parseQueryDroppingBad<S extends z.ZodObject>(
	schema: S,
	params: URLSearchParams
): { query: z.output<S>; errors: Record<string, string> | null } {
	const raw: Record<string, string> = {};
	for (const key of Object.keys(schema.shape)) {
		const v = params.get(key);
		if (v !== null) raw[key] = v;
	}
	const errors: Record<string, string> = {};
	for (;;) {
		const parsed = schema.safeParse(raw);
		if (parsed.success)
			return { query: parsed.data, errors: Object.keys(errors).length ? errors : null };
		for (const issue of parsed.error.issues) {
			const key = String(issue.path[0]);
			errors[key] = issue.message;
			delete raw[key];
		}
	}
}

/** Reads the list's filters; a bad one is dropped and named, so a shared link still opens. */
export function parsePlanQuery(params: URLSearchParams): {
	query: PlanQuery;
	errors: Record<string, string> | null;
} {
	return parseQueryDroppingBad(planQuerySchema, params);
}

/** The list's URL query for `q` (defaults left out), "" when nothing is set. */
export function planQueryString(q: Partial<PlanQuery>): string {
	const p = new URLSearchParams();
	if (q.status && q.status !== 'open') p.set('status', q.status);
	if (q.assignee) p.set('assignee', q.assignee);
	if (q.area) p.set('area', String(q.area));
	if (q.action) p.set('action', q.action);
	if (q.from) p.set('from', q.from);
	if (q.to) p.set('to', q.to);
	if (q.page && q.page > 1) p.set('page', String(q.page));
	const s = p.toString();
	return s ? `?${s}` : '';
}

/** Zod issues as field messages keyed by their path ("parts.0.quantity"); "_form" for the whole. */
export function planFieldErrors(error: z.ZodError): Record<string, string[]> {
	const out: Record<string, string[]> = {};
	for (const issue of error.issues) {
		const key = issue.path.length ? issue.path.join('.') : '_form';
		(out[key] ??= []).push(issue.message);
	}
	return out;
}

/** A part line as the form holds it: text in every box. */
export interface PartLine {
	description: string;
	size: string;
	material: string;
	quantity: string;
}

const str = (v: FormDataEntryValue | null) => (typeof v === 'string' ? v : '');

/** The part lines of a form (repeated fields); a line left wholly blank is dropped. */
export function partLines(form: FormData): PartLine[] {
	const col = (name: string) => form.getAll(name).map(str);
	const descriptions = col('partDescription');
	const sizes = col('partSize');
	const materials = col('partMaterial');
	const quantities = col('partQuantity');
	return descriptions
		.map((description, i) => ({
			description,
			size: sizes[i] ?? '',
			material: materials[i] ?? '',
			quantity: quantities[i] ?? ''
		}))
		.filter((l) => Object.values(l).some((v) => v.trim() !== ''));
}

/** Part lines as the work-order schemas take them (quantity a number; a blank one 1). */
export function partsInput(lines: PartLine[]) {
	return lines.map((l) => ({
		description: l.description,
		quantity: l.quantity.trim() === '' ? 1 : Number(l.quantity.trim()),
		size: l.size,
		material: l.material
	}));
}

/** The create form's text values, kept to show the form again. */
export interface CreateFormValues {
	fixtureCode: string;
	action: string;
	actionText: string;
	dueOn: string;
	assigneeEmail: string;
	flagId: string;
	notes: string;
	parts: PartLine[];
}

/** Reads the create form. */
export function createFormValues(form: FormData): CreateFormValues {
	return {
		fixtureCode: str(form.get('fixtureCode')),
		action: str(form.get('action')),
		actionText: str(form.get('actionText')),
		dueOn: str(form.get('dueOn')),
		assigneeEmail: str(form.get('assigneeEmail')),
		flagId: str(form.get('flagId')),
		notes: str(form.get('notes')),
		parts: partLines(form)
	};
}

/** The create form's values as `workOrderCreateSchema` takes them (blank fields left out). */
export function createInput(v: CreateFormValues) {
	const opt = (s: string) => (s.trim() === '' ? undefined : s);
	return {
		fixtureCode: v.fixtureCode,
		action: opt(v.action),
		actionText: v.action === 'other' ? opt(v.actionText) : undefined,
		dueOn: opt(v.dueOn),
		assigneeEmail: opt(v.assigneeEmail),
		flagId: v.flagId.trim() === '' ? undefined : Number(v.flagId),
		parts: partsInput(v.parts),
		notes: opt(v.notes)
	};
}

/** An open work order as shown next to the flag it answers. */
export interface PlannedOrder {
	id: number;
	status: WorkOrderStatus;
	dueOn: string | null;
	assigneeName: string | null;
}
