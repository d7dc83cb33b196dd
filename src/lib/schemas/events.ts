/**
 * The zod schemas of event payloads: the sync contract between the phone's outbox and the server,
 * checked at the boundary. Kinds, limits and payload shapes are defined in `$lib/domain/events`;
 * the compile-time check below proves each schema accepts exactly the domain's shape.
 * Every object is strict (unknown fields are rejected) and every number has a unit and a range.
 */
import { z } from 'zod';
import {
	CLEANING_METHODS,
	EVENT_KINDS,
	type EventKind,
	type EventPayloadInputs,
	MAX_CYCLES_PER_EVENT,
	MAX_READINGS_PER_BREAK_IN,
	MAX_READING_UM,
	SWAPPABLE_PARTS
} from '../domain/events';
import { unicodeString } from './text';
import { inspectionVerdictSchema, wearGradeSchema, wearMarkSchema } from './wear';

export {
	CLEANING_METHODS,
	EVENT_KINDS,
	MAX_CYCLES_PER_EVENT,
	MAX_READINGS_PER_BREAK_IN,
	MAX_READING_UM,
	SWAPPABLE_PARTS,
	type EventKind,
	type EventPayloadInputs,
	type FixtureEvent
} from '../domain/events';

/** One of EVENT_KINDS. */
export const eventKindSchema = z.enum(EVENT_KINDS, {
	error: `Kind must be one of: ${EVENT_KINDS.join(', ')}`
});

const micrometres = (field: string) =>
	z
		.number({ error: `${field} must be a number of micrometres` })
		.min(-MAX_READING_UM, `${field} must be between −${MAX_READING_UM} and ${MAX_READING_UM} µm`)
		.max(MAX_READING_UM, `${field} must be between −${MAX_READING_UM} and ${MAX_READING_UM} µm`);

const text = (field: string, max: number) =>
	unicodeString(field, `${field} must be text`)
		.trim()
		.min(1, `${field} must not be empty`)
		.max(max, `${field} must be at most ${max} characters`);

const cycles = (field: string) =>
	z
		.number({ error: `${field} must be a number` })
		.int(`${field} must be a whole number`)
		.min(1, `${field} must be at least 1`)
		.max(MAX_CYCLES_PER_EVENT, `${field} must be at most ${MAX_CYCLES_PER_EVENT}`);

/**
 * The work order an entry carries out (any kind may carry one; optional, so entries of phones
 * from before work orders stay valid). Ingest checks that the order exists and is the fixture's.
 */
const workOrderId = z
	.number({ error: 'Work order id must be a number' })
	.int('Work order id must be a whole number')
	.positive('Work order id must be a work order number')
	.max(2_147_483_647, 'Work order id is too large')
	.optional();

const unique = <T>(items: readonly T[]) => new Set(items).size === items.length;

/** One seating's indicator readings in µm; at least one axis. */
export const readingSchema = z
	.strictObject({
		dx: micrometres('dx').optional(),
		dy: micrometres('dy').optional(),
		dz: micrometres('dz').optional()
	})
	.refine((r) => r.dx !== undefined || r.dy !== undefined || r.dz !== undefined, {
		message: 'A reading needs at least one of dx, dy, dz (µm)'
	});

/** Reseat: cycles (default 1) and optional readings of the last seating. */
export const reseatPayloadSchema = z.strictObject({
	workOrderId,
	cycles: cycles('Cycles').default(1),
	readings: readingSchema.optional()
});

/** Cleaning: method, whether the contacts were relubricated, and with what. */
export const cleaningPayloadSchema = z
	.strictObject({
		workOrderId,
		method: z.enum(CLEANING_METHODS, {
			error: `Method must be one of: ${CLEANING_METHODS.join(', ')}`
		}),
		relubricated: z.boolean({ error: 'Relubricated must be yes or no' }),
		lubricant: text('Lubricant', 120).optional(),
		note: text('Note', 2000).optional()
	})
	.refine((c) => c.relubricated || c.lubricant === undefined, {
		message: 'Lubricant is recorded only when the contacts were relubricated',
		path: ['lubricant']
	});

/** One graded contact of an inspection. */
export const inspectionContactSchema = z.strictObject({
	contact: text('Contact', 40),
	grade: wearGradeSchema,
	marks: z
		.array(wearMarkSchema)
		.max(5)
		.refine(unique, { message: 'Each mark may be ticked once' })
		.default([])
});

/** Inspection: graded contacts, verdict, photo ids. */
export const inspectionPayloadSchema = z.strictObject({
	workOrderId,
	contacts: z
		.array(inspectionContactSchema)
		.min(1, 'Grade at least one contact')
		.max(24, 'At most 24 contacts per inspection')
		.refine((cs) => unique(cs.map((c) => c.contact.toLowerCase())), {
			message: 'Each contact may be graded once per inspection'
		}),
	verdict: inspectionVerdictSchema,
	photoIds: z
		.array(z.uuid({ error: 'Photo id must be a UUID' }))
		.max(20, 'At most 20 photos per inspection')
		.refine(unique, { message: 'A photo may be attached once' })
		.default([]),
	note: text('Note', 2000).optional()
});

/** Break-in run: cycles and the readings taken during it, oldest first. */
export const breakInPayloadSchema = z
	.strictObject({
		workOrderId,
		cycles: cycles('Cycles'),
		readings: z
			.array(readingSchema)
			.max(MAX_READINGS_PER_BREAK_IN, `At most ${MAX_READINGS_PER_BREAK_IN} readings per run`)
			.default([]),
		note: text('Note', 2000).optional()
	})
	.refine((b) => b.readings.length <= b.cycles, {
		message: 'A break-in run cannot have more readings than cycles',
		path: ['readings']
	});

/** Part swap: what was replaced. */
export const partSwapPayloadSchema = z
	.strictObject({
		workOrderId,
		replaced: z
			.array(
				z.enum(SWAPPABLE_PARTS, { error: `Part must be one of: ${SWAPPABLE_PARTS.join(', ')}` })
			)
			.min(1, 'Say what was replaced')
			.max(SWAPPABLE_PARTS.length)
			.refine(unique, { message: 'Each part may be listed once' }),
		description: text('Description', 500).optional(),
		note: text('Note', 2000).optional()
	})
	.refine((p) => !p.replaced.includes('other') || p.description !== undefined, {
		message: "Describe the part when 'other' is replaced",
		path: ['description']
	});

/** Move to another location (by id); a move made in the register also names where it was. */
export const movePayloadSchema = z.strictObject({
	workOrderId,
	locationId: text('Location', 64),
	fromLocationId: text('Previous location', 64).optional(),
	note: text('Note', 500).optional()
});

/** Hold: take out of service, with the reason. */
export const holdPayloadSchema = z.strictObject({ workOrderId, reason: text('Reason', 500) });

/** Release from hold. */
export const releasePayloadSchema = z.strictObject({
	workOrderId,
	note: text('Note', 500).optional()
});

/** Free-text note. */
export const notePayloadSchema = z.strictObject({ workOrderId, text: text('Text', 2000) });

/** Payload schema of each kind. */
export const PAYLOAD_SCHEMAS = {
	reseat: reseatPayloadSchema,
	cleaning: cleaningPayloadSchema,
	inspection: inspectionPayloadSchema,
	'break-in': breakInPayloadSchema,
	'part-swap': partSwapPayloadSchema,
	move: movePayloadSchema,
	hold: holdPayloadSchema,
	release: releasePayloadSchema,
	note: notePayloadSchema
} as const satisfies Record<EventKind, z.ZodType>;

/** Payloads after parsing (defaults applied). */
export type EventPayloads = { [K in EventKind]: z.output<(typeof PAYLOAD_SCHEMAS)[K]> };

/** True only when A and B are identical types (optional fields included, unlike mutual `extends`). */
type Same<A, B> =
	(<T>() => T extends A ? 1 : 2) extends <T>() => T extends B ? 1 : 2 ? true : false;
/**
 * Compile-time proof that each schema accepts exactly the payload shape `$lib/domain/events`
 * declares: a field added to one and not the other fails `npm run check` here.
 */
const PAYLOADS_MATCH_DOMAIN: {
	[K in EventKind]: Same<z.input<(typeof PAYLOAD_SCHEMAS)[K]>, EventPayloadInputs[K]>;
} = {
	reseat: true,
	cleaning: true,
	inspection: true,
	'break-in': true,
	'part-swap': true,
	move: true,
	hold: true,
	release: true,
	note: true
};
void PAYLOADS_MATCH_DOMAIN;

const EARLIEST = Date.parse('2000-01-01T00:00:00Z');
const LATEST = Date.parse('2100-01-01T00:00:00Z');

/**
 * Device time of an event: ISO 8601 with a Z or ±hh:mm offset, normalised to UTC
 * ("2025-03-04T05:06:07.000Z") so that stored times compare as strings.
 */
export const occurredAtSchema = z.iso
	.datetime({
		offset: true,
		error: 'Time must be an ISO 8601 date and time, e.g. 2025-03-04T05:06:07Z'
	})
	.refine(
		(s) => {
			const t = Date.parse(s);
			return t >= EARLIEST && t < LATEST;
		},
		{ message: 'Time must be between the years 2000 and 2100' }
	)
	.transform((s) => new Date(s).toISOString());

/** Fixture code as printed on the label. */
export const fixtureCodeSchema = text('Fixture code', 40);

const envelope = <K extends EventKind, P extends z.ZodType>(kind: K, payload: P) =>
	z.strictObject({
		id: z.uuid({ error: 'Event id must be a UUID' }),
		fixtureCode: fixtureCodeSchema,
		kind: z.literal(kind),
		occurredAt: occurredAtSchema,
		payload
	});

/** One event as the phone sends it; the payload is checked against its kind. */
export const syncEventSchema = z.discriminatedUnion(
	'kind',
	[
		envelope('reseat', reseatPayloadSchema),
		envelope('cleaning', cleaningPayloadSchema),
		envelope('inspection', inspectionPayloadSchema),
		envelope('break-in', breakInPayloadSchema),
		envelope('part-swap', partSwapPayloadSchema),
		envelope('move', movePayloadSchema),
		envelope('hold', holdPayloadSchema),
		envelope('release', releasePayloadSchema),
		envelope('note', notePayloadSchema)
	],
	{ error: `Kind must be one of: ${EVENT_KINDS.join(', ')}` }
);
export type SyncEvent = z.output<typeof syncEventSchema>;

/** Most events in one sync request. */
export const MAX_EVENTS_PER_SYNC = 500;

/**
 * A sync request. Events are only counted here: each is checked on its own with syncEventSchema
 * (see parseSyncEvent) so one bad event is rejected alone and the rest are still accepted.
 */
export const syncRequestSchema = z.strictObject({
	deviceId: text('Device id', 100),
	events: z
		.array(z.unknown())
		.min(1, 'Send at least one event')
		.max(MAX_EVENTS_PER_SYNC, `Send at most ${MAX_EVENTS_PER_SYNC} events per request`)
});
export type SyncRequest = z.output<typeof syncRequestSchema>;

/** Field path → messages, for per-event rejection reasons. */
export type FieldErrors = Record<string, string[]>;

/** Validate one raw event; on failure give its id (if readable) and messages by field path. */
export function parseSyncEvent(
	raw: unknown
): { ok: true; event: SyncEvent } | { ok: false; id: string | null; errors: FieldErrors } {
	if (raw === null || typeof raw !== 'object' || Array.isArray(raw)) {
		return {
			ok: false,
			id: null,
			errors: {
				'(event)': ['An event must be an object { id, fixtureCode, kind, occurredAt, payload }']
			}
		};
	}
	const result = syncEventSchema.safeParse(raw);
	if (result.success) return { ok: true, event: result.data };
	const errors: FieldErrors = {};
	for (const issue of result.error.issues) {
		const key = issue.path.length ? issue.path.join('.') : '(event)';
		(errors[key] ??= []).push(issue.message);
	}
	const id = typeof (raw as { id?: unknown }).id === 'string' ? (raw as { id: string }).id : null;
	return { ok: false, id, errors };
}
