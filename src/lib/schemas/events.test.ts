import { describe, expect, it } from 'vitest';
import {
	EVENT_KINDS,
	MAX_EVENTS_PER_SYNC,
	PAYLOAD_SCHEMAS,
	parseSyncEvent,
	syncEventSchema,
	syncRequestSchema
} from './events';

const id = '3f1d2c4b-5a6e-4f70-8a9b-0c1d2e3f4a5b';
const envelope = (kind: string, payload: unknown, extra: Record<string, unknown> = {}) => ({
	id,
	fixtureCode: 'NM-4K7Q',
	kind,
	occurredAt: '2025-03-04T05:06:07Z',
	payload,
	...extra
});

/** Messages of a failed parse, by field path. */
function errorsOf(raw: unknown): Record<string, string[]> {
	const r = parseSyncEvent(raw);
	if (r.ok) throw new Error('expected the event to be rejected');
	return r.errors;
}

describe('event kinds', () => {
	it('has the nine kinds of the sync contract', () => {
		expect(EVENT_KINDS).toEqual([
			'reseat',
			'cleaning',
			'inspection',
			'break-in',
			'part-swap',
			'move',
			'hold',
			'release',
			'note'
		]);
		expect(Object.keys(PAYLOAD_SCHEMAS).sort()).toEqual([...EVENT_KINDS].sort());
	});
});

describe('payloads — valid events, with defaults filled in', () => {
	it.each([
		['reseat', {}, { cycles: 1 }],
		[
			'reseat',
			{ cycles: 5, readings: { dx: -0.4, dz: 1.25 } },
			{ cycles: 5, readings: { dx: -0.4, dz: 1.25 } }
		],
		[
			'cleaning',
			{ method: 'solvent-wipe', relubricated: false },
			{ method: 'solvent-wipe', relubricated: false }
		],
		[
			'cleaning',
			{ method: 'dry-wipe', relubricated: true, lubricant: '  light instrument oil ' },
			{ method: 'dry-wipe', relubricated: true, lubricant: 'light instrument oil' }
		],
		[
			'inspection',
			{ contacts: [{ contact: 'ball 1', grade: 2, marks: ['fretting'] }], verdict: 'watch' },
			{
				contacts: [{ contact: 'ball 1', grade: 2, marks: ['fretting'] }],
				verdict: 'watch',
				photoIds: []
			}
		],
		['break-in', { cycles: 30 }, { cycles: 30, readings: [] }],
		['part-swap', { replaced: ['balls', 'seats'] }, { replaced: ['balls', 'seats'] }],
		['move', { locationId: 'loc-12' }, { locationId: 'loc-12' }],
		['hold', { reason: 'Crashed into the chuck' }, { reason: 'Crashed into the chuck' }],
		['release', {}, {}],
		[
			'note',
			{ text: 'Seats wiped with lint-free cloth' },
			{ text: 'Seats wiped with lint-free cloth' }
		]
	])('%s %j', (kind, payload, expected) => {
		const r = parseSyncEvent(envelope(kind, payload));
		expect(r.ok).toBe(true);
		if (r.ok) expect(r.event.payload).toEqual(expected);
	});

	it('normalises occurredAt to UTC with milliseconds', () => {
		const r = syncEventSchema.parse({
			...envelope('note', { text: 'x' }),
			occurredAt: '2025-03-04T07:06:07.5+02:00'
		});
		expect(r.occurredAt).toBe('2025-03-04T05:06:07.500Z');
	});
});

describe('payloads — rejected with a clear message per field', () => {
	it('unknown fields, in the payload or the envelope', () => {
		expect(errorsOf(envelope('reseat', { cycles: 1, colour: 'red' })).payload[0]).toMatch(/colour/);
		expect(errorsOf(envelope('note', { text: 'x' }, { userId: 7 }))['(event)'][0]).toMatch(
			/userId/
		);
	});

	it('cycles: whole, at least 1, at most 100000', () => {
		expect(errorsOf(envelope('reseat', { cycles: 0 }))['payload.cycles']).toEqual([
			'Cycles must be at least 1'
		]);
		expect(errorsOf(envelope('reseat', { cycles: 1.5 }))['payload.cycles']).toEqual([
			'Cycles must be a whole number'
		]);
		expect(errorsOf(envelope('reseat', { cycles: 100_001 }))['payload.cycles'][0]).toMatch(
			/at most 100000/
		);
		expect(errorsOf(envelope('break-in', {}))['payload.cycles'][0]).toMatch(
			/Cycles must be a number/
		);
	});

	it('readings: µm within ±10000, at least one axis, no more than the cycles of a run', () => {
		expect(
			errorsOf(envelope('reseat', { readings: { dx: 12_000 } }))['payload.readings.dx'][0]
		).toMatch(/between −10000 and 10000 µm/);
		expect(errorsOf(envelope('reseat', { readings: {} }))['payload.readings']).toEqual([
			'A reading needs at least one of dx, dy, dz (µm)'
		]);
		expect(
			errorsOf(envelope('reseat', { readings: { dx: '1' } }))['payload.readings.dx'][0]
		).toMatch(/number of micrometres/);
		expect(
			errorsOf(envelope('break-in', { cycles: 1, readings: [{ dx: 1 }, { dx: 2 }] }))[
				'payload.readings'
			]
		).toEqual(['A break-in run cannot have more readings than cycles']);
	});

	it('cleaning: a known method; a lubricant only when relubricated', () => {
		expect(
			errorsOf(envelope('cleaning', { method: 'spit', relubricated: false }))['payload.method'][0]
		).toMatch(/Method must be one of: dry-wipe/);
		expect(
			errorsOf(
				envelope('cleaning', { method: 'dry-wipe', relubricated: false, lubricant: 'grease' })
			)['payload.lubricant']
		).toEqual(['Lubricant is recorded only when the contacts were relubricated']);
		expect(errorsOf(envelope('cleaning', { method: 'dry-wipe' }))['payload.relubricated']).toEqual([
			'Relubricated must be yes or no'
		]);
	});

	it('inspection: grades 0–4 whole, known marks once each, contacts once each, photo ids as UUIDs', () => {
		const contact = { contact: 'ball 1', grade: 1 };
		const bad = (payload: unknown) =>
			errorsOf(envelope('inspection', { verdict: 'serviceable', ...(payload as object) }));
		expect(bad({ contacts: [{ ...contact, grade: 5 }] })['payload.contacts.0.grade']).toEqual([
			'Wear grade must be from 0 to 4'
		]);
		expect(bad({ contacts: [{ ...contact, grade: 1.5 }] })['payload.contacts.0.grade']).toEqual([
			'Wear grade must be a whole number'
		]);
		expect(
			bad({ contacts: [{ ...contact, marks: ['rust'] }] })['payload.contacts.0.marks.0'][0]
		).toMatch(/Mark must be one of: fretting, pitting, brinelling, corrosion, debris/);
		expect(
			bad({ contacts: [{ ...contact, marks: ['pitting', 'pitting'] }] })['payload.contacts.0.marks']
		).toEqual(['Each mark may be ticked once']);
		expect(
			bad({ contacts: [contact, { ...contact, contact: 'Ball 1' }] })['payload.contacts']
		).toEqual(['Each contact may be graded once per inspection']);
		expect(bad({ contacts: [] })['payload.contacts']).toEqual(['Grade at least one contact']);
		expect(bad({ contacts: [contact], photoIds: ['photo-1'] })['payload.photoIds.0']).toEqual([
			'Photo id must be a UUID'
		]);
		expect(
			errorsOf(envelope('inspection', { contacts: [contact], verdict: 'meh' }))[
				'payload.verdict'
			][0]
		).toMatch(/serviceable, watch, replace/);
	});

	it("part swap: something replaced, each once, and 'other' described", () => {
		expect(errorsOf(envelope('part-swap', { replaced: [] }))['payload.replaced']).toEqual([
			'Say what was replaced'
		]);
		expect(errorsOf(envelope('part-swap', { replaced: ['other'] }))['payload.description']).toEqual(
			["Describe the part when 'other' is replaced"]
		);
		expect(
			errorsOf(envelope('part-swap', { replaced: ['balls', 'balls'] }))['payload.replaced']
		).toEqual(['Each part may be listed once']);
	});

	it('texts are trimmed, not empty and bounded', () => {
		expect(errorsOf(envelope('note', { text: '   ' }))['payload.text']).toEqual([
			'Text must not be empty'
		]);
		expect(errorsOf(envelope('note', { text: 'x'.repeat(2001) }))['payload.text']).toEqual([
			'Text must be at most 2000 characters'
		]);
		expect(errorsOf(envelope('hold', {}))['payload.reason']).toEqual(['Reason must be text']);
	});

	it('texts must be valid Unicode: a lone surrogate is refused with a reason, a pair is kept', () => {
		const notUnicode =
			'Text contains text that is not valid Unicode (a lone surrogate); retype it.';
		expect(errorsOf(envelope('note', { text: 'worn \ud800' }))['payload.text']).toEqual([
			notUnicode
		]);
		expect(errorsOf(envelope('note', { text: '\udc00 at start' }))['payload.text']).toEqual([
			notUnicode
		]);
		expect(
			errorsOf(envelope('cleaning', { method: 'other', relubricated: true, lubricant: 'x\udbff' }))[
				'payload.lubricant'
			]
		).toEqual(['Lubricant contains text that is not valid Unicode (a lone surrogate); retype it.']);
		expect(
			errorsOf({ ...envelope('note', { text: 'ok' }), fixtureCode: 'NM-\ud83d' }).fixtureCode
		).toEqual([
			'Fixture code contains text that is not valid Unicode (a lone surrogate); retype it.'
		]);
		// A surrogate pair is one real character (U+1F527, a wrench) and is fine.
		expect(parseSyncEvent(envelope('note', { text: 'swap \ud83d\udd27 done' })).ok).toBe(true);
	});
});

describe('sync envelope', () => {
	it('checks id, fixture code, kind and time', () => {
		const e = errorsOf({
			id: 'abc',
			fixtureCode: '',
			kind: 'note',
			occurredAt: 'yesterday',
			payload: { text: 'x' }
		});
		expect(e.id).toEqual(['Event id must be a UUID']);
		expect(e.fixtureCode).toEqual(['Fixture code must not be empty']);
		expect(e.occurredAt[0]).toMatch(/ISO 8601/);
		expect(errorsOf(envelope('polish', {})).kind[0]).toMatch(
			/Kind must be one of: reseat, cleaning/
		);
		expect(
			errorsOf({ ...envelope('note', { text: 'x' }), occurredAt: '1999-12-31T23:59:59Z' })
				.occurredAt
		).toEqual(['Time must be between the years 2000 and 2100']);
	});

	it('gives back the id of a rejected event when it can be read, and explains a non-object', () => {
		const r = parseSyncEvent(envelope('reseat', { cycles: 0 }));
		expect(r).toMatchObject({ ok: false, id });
		expect(parseSyncEvent(42)).toEqual({
			ok: false,
			id: null,
			errors: {
				'(event)': ['An event must be an object { id, fixtureCode, kind, occurredAt, payload }']
			}
		});
	});

	it('a request carries a device id and 1–500 events, each judged later on its own', () => {
		expect(syncRequestSchema.safeParse({ deviceId: 'phone-7', events: [{}, 'x'] }).success).toBe(
			true
		);
		const empty = syncRequestSchema.safeParse({ deviceId: '', events: [] });
		expect(empty.error?.issues.map((i) => i.message)).toEqual([
			'Device id must not be empty',
			'Send at least one event'
		]);
		const many = syncRequestSchema.safeParse({
			deviceId: 'd',
			events: Array(MAX_EVENTS_PER_SYNC + 1).fill({})
		});
		expect(many.error?.issues[0].message).toBe('Send at most 500 events per request');
		expect(syncRequestSchema.safeParse({ deviceId: 'x'.repeat(101), events: [{}] }).success).toBe(
			false
		);
		expect(syncRequestSchema.safeParse({ deviceId: 'd', events: [{}], extra: 1 }).success).toBe(
			false
		);
	});
});
