import { randomUUID } from 'node:crypto';
import { expect, test } from '@playwright/test';
import fc from 'fast-check';
import mysql from 'mysql2/promise';
import { encodePng } from '../../../scripts/demo-photos';
import { generateFixtureCode } from '../../../src/lib/domain/fixture-code';
import { CLEANING_METHODS, EVENT_KINDS, SWAPPABLE_PARTS } from '../../../src/lib/schemas/events';
import { FIXTURE_STATUSES, FIXTURE_TYPES } from '../../../src/lib/schemas/fixture';
import { INSPECTION_VERDICTS, WEAR_MARKS } from '../../../src/lib/schemas/wear';
import { signInAs } from '../helpers/auth';

/*
 * Fuzz of the JSON APIs that take bodies, against the built app and the real database. Bodies are
 * generated with fast-check: valid-ish ones from the schemas' own shapes (so many get past the
 * first check) mixed with garbage — lone surrogates, huge and non-finite numbers, deep nesting,
 * wrong types, prototype keys. Only the contract is asserted: every answer is 2xx or 4xx with a
 * JSON body (`{ error }` on 4xx), never a 5xx, and a refused body writes no row.
 *
 * NESTMARK_FUZZ_RUNS scales the number of bodies per route (default 1; 2 doubles them);
 * NESTMARK_FUZZ_SEED replays a run (the seed is printed on failure).
 */

const scale = Number(process.env.NESTMARK_FUZZ_RUNS || 1);
const seed = process.env.NESTMARK_FUZZ_SEED ? Number(process.env.NESTMARK_FUZZ_SEED) : undefined;
const runs = (n: number) => Math.max(1, Math.round(n * scale));
const origin = process.env.ORIGIN!;

let db: mysql.Connection;
let cookie = '';
let fixtureCode = '';
let fixtureId = 0;
/** Fixtures the sync fuzz logs on: several, so no history grows long enough to slow a batch. */
const syncFixtures: { code: string; id: number }[] = [];
/** Device time of the next in-order event; most events come in order, as from a real phone. */
let clock = Date.now() - 40 * 86_400_000;
let locationIds: number[] = [];
const createdFixtures: number[] = [];

/** Rows in a table (all of them: nothing else writes while this file runs). */
async function count(table: 'events' | 'fixtures' | 'attachments'): Promise<number> {
	const [rows] = await db.query<mysql.RowDataPacket[]>(`SELECT COUNT(*) AS n FROM ${table}`);
	return Number(rows[0].n);
}

/** The answer's status and parsed body; fails the test unless it is 2xx/4xx JSON. */
async function call(
	method: string,
	path: string,
	body: BodyInit,
	contentType?: string
): Promise<{ status: number; body: Record<string, unknown> }> {
	const headers: Record<string, string> = { cookie, origin };
	if (contentType) headers['content-type'] = contentType;
	const res = await fetch(origin + path, { method, headers, body });
	const text = await res.text();
	const what = `${method} ${path} → ${res.status} ${text.slice(0, 300)}`;
	expect(res.status, what).toBeGreaterThanOrEqual(200);
	expect(res.status, what).toBeLessThan(500);
	expect(res.headers.get('content-type'), what).toMatch(/^application\/json/);
	let parsed: unknown;
	expect(() => (parsed = JSON.parse(text)), what).not.toThrow();
	expect(parsed, what).toBeInstanceOf(Object);
	if (res.status >= 400) expect(typeof (parsed as { error?: unknown }).error, what).toBe('string');
	return { status: res.status, body: parsed as Record<string, unknown> };
}

/* ------------------------------------------------------------------------------------------ */
/* Generators                                                                                 */

/** Markers replaced in the JSON text by what JSON.stringify cannot write. */
const RAW: Record<string, string> = {
	'"§huge§"': '1e999',
	'"§tiny§"': '-1e999',
	'"§long§"': '123456789012345678901234567890123456789',
	'"§deep§"': '['.repeat(5000) + ']'.repeat(5000),
	'"§proto§"': '{"__proto__":{"polluted":true},"constructor":{"prototype":{"x":1}}}'
};
const toText = (v: unknown) => {
	let s = JSON.stringify(v) ?? 'null';
	for (const [marker, raw] of Object.entries(RAW)) s = s.split(marker).join(raw);
	return s;
};

const loneSurrogate = fc.constantFrom('\ud800', '\udfff', 'worn \ud83d', '\udc00 seat', 'a\ud800b');
const nastyString = fc.oneof(
	fc.string({ maxLength: 20 }),
	fc.string({ unit: 'binary', maxLength: 20 }),
	loneSurrogate,
	fc.constantFrom('', '   ', '\u0000', '=1+1', "'; DROP TABLE events;--", '<script>x</script>'),
	fc.constantFrom('__proto__', 'constructor', 'toString', 'hasOwnProperty'),
	fc.integer({ min: 2001, max: 6000 }).map((n) => 'x'.repeat(n))
);
const nastyNumber = fc.oneof(
	fc.integer(),
	fc.double(),
	fc.constantFrom(0, -0, 1e308, -1e308, 2 ** 53 + 1, 5e-324, 2 ** 31, -(2 ** 31) - 1),
	fc.constantFrom('§huge§', '§tiny§', '§long§', '12', '1,5', '0x10')
);
const garbage: fc.Arbitrary<unknown> = fc.oneof(
	{ weight: 3, arbitrary: fc.anything({ maxDepth: 3, withNullPrototype: false }) },
	{ weight: 1, arbitrary: nastyString },
	{ weight: 1, arbitrary: nastyNumber },
	{ weight: 1, arbitrary: fc.constantFrom('§deep§', '§proto§', null, true, [], {}) }
);
/** A value that is usually `good`, sometimes anything at all. */
const mostly = <T>(good: fc.Arbitrary<T>, badWeight = 1) =>
	fc.oneof(
		{ weight: 24, arbitrary: good as fc.Arbitrary<unknown> },
		{ weight: badWeight, arbitrary: garbage }
	);
/** `arb` about once in `n` draws, else null (fc.option's `freq` is the odds of null instead). */
const rarely = <T>(arb: fc.Arbitrary<T>, n: number) =>
	fc.oneof({ weight: n - 1, arbitrary: fc.constant(null) }, { weight: 1, arbitrary: arb });
/** An object whose optional keys are sometimes left out, with now and then an extra key. */
const record = (shape: Record<string, fc.Arbitrary<unknown>>, required: string[] = []) =>
	fc
		.tuple(
			fc.record(shape, { requiredKeys: required }),
			rarely(
				fc.tuple(fc.constantFrom('__proto__', 'constructor', 'extra', 'prototype'), garbage),
				30
			)
		)
		.map(([o, extra]) => {
			if (!extra) return o;
			const copy: Record<string, unknown> = { ...o };
			Object.defineProperty(copy, extra[0], {
				value: extra[1],
				enumerable: true,
				writable: true,
				configurable: true
			});
			return copy;
		});

const text = (max: number) =>
	fc.oneof(
		{ weight: 20, arbitrary: fc.string({ minLength: 1, maxLength: Math.min(max, 40) }) },
		{ weight: 1, arbitrary: nastyString }
	);
const micrometres = fc.oneof(
	{ weight: 20, arbitrary: fc.double({ min: -50, max: 50, noNaN: true }) },
	{ weight: 1, arbitrary: nastyNumber }
);
const reading = record({ dx: micrometres, dy: micrometres, dz: micrometres });
const cycles = fc.oneof(
	{ weight: 20, arbitrary: fc.integer({ min: 1, max: 200 }) },
	{ weight: 1, arbitrary: nastyNumber }
);
const uuid = fc.oneof(
	{ weight: 20, arbitrary: fc.constant(null).map(() => randomUUID()) },
	{ weight: 1, arbitrary: nastyString }
);

const payloads: Record<(typeof EVENT_KINDS)[number], fc.Arbitrary<unknown>> = {
	reseat: record({ cycles, readings: reading }),
	cleaning: record(
		{
			method: mostly(fc.constantFrom(...CLEANING_METHODS)),
			relubricated: mostly(fc.boolean()),
			lubricant: text(120),
			note: text(2000)
		},
		['method', 'relubricated']
	),
	inspection: record(
		{
			contacts: mostly(
				fc.array(
					record(
						{
							contact: text(40),
							grade: mostly(fc.integer({ min: 0, max: 4 })),
							marks: mostly(fc.subarray([...WEAR_MARKS]))
						},
						['contact', 'grade']
					),
					{ minLength: 1, maxLength: 4 }
				)
			),
			verdict: mostly(fc.constantFrom(...INSPECTION_VERDICTS)),
			photoIds: mostly(fc.array(uuid, { maxLength: 3 })),
			note: text(2000)
		},
		['contacts', 'verdict']
	),
	'break-in': record(
		{ cycles, readings: mostly(fc.array(reading, { maxLength: 5 })), note: text(2000) },
		['cycles']
	),
	'part-swap': record(
		{
			replaced: mostly(fc.subarray([...SWAPPABLE_PARTS], { minLength: 1 })),
			description: text(500),
			note: text(2000)
		},
		['replaced']
	),
	move: record({ locationId: text(64), note: text(500) }, ['locationId']),
	hold: record({ reason: text(500) }, ['reason']),
	release: record({ note: text(500) }),
	note: record({ text: text(2000) }, ['text'])
};

const occurredAt = fc.oneof(
	{
		weight: 20,
		arbitrary: fc
			.integer({ min: 1, max: 600 })
			.map((step) => new Date(Math.min((clock += step * 1000), Date.now())).toISOString())
	},
	{
		weight: 2,
		arbitrary: fc
			.integer({ min: 1, max: 5_000_000 })
			.map((s) => new Date(Date.now() - s * 1000).toISOString())
	},
	{
		weight: 1,
		arbitrary: fc.constantFrom(
			'2099-01-01T00:00:00Z',
			'1999-12-31T23:59:59Z',
			'2025-02-30T00:00:00Z',
			'yesterday',
			'2025-03-04T05:06:07+14:00'
		)
	},
	{ weight: 1, arbitrary: garbage }
);

const event = fc.constantFrom(...EVENT_KINDS).chain((kind) =>
	record(
		{
			id: uuid,
			fixtureCode: fc.oneof(
				{ weight: 30, arbitrary: fc.nat(15).map((i) => syncFixtures[i].code) },
				{ weight: 1, arbitrary: text(40) }
			),
			kind: mostly(fc.constant(kind), 1),
			occurredAt,
			payload: mostly(payloads[kind], 1)
		},
		['id', 'fixtureCode', 'kind', 'occurredAt', 'payload']
	)
);

const syncBody = fc.oneof(
	{
		weight: 12,
		arbitrary: record(
			{
				deviceId: mostly(fc.constant('fuzz-phone')),
				events: mostly(fc.array(mostly(event, 1), { minLength: 1, maxLength: 4 }))
			},
			['deviceId', 'events']
		).map(toText)
	},
	{ weight: 2, arbitrary: garbage.map(toText) },
	{ weight: 1, arbitrary: fc.string({ unit: 'binary', maxLength: 60 }) },
	{
		weight: 1,
		arbitrary: fc.constantFrom(
			'',
			'{',
			'{"deviceId":"p","events":[',
			'\ufeff{}',
			'{"deviceId":"p","events":[1,2,3]}'
		)
	}
);

const fixtureFields = (required: string[]) =>
	record(
		{
			name: text(160),
			type: mostly(fc.constantFrom(...FIXTURE_TYPES, 'Zero-point pallet', 'THREE-VEE')),
			status: mostly(fc.constantFrom(...FIXTURE_STATUSES)),
			locationId: mostly(
				fc.constant(null).map(() => locationIds[Math.floor(Math.random() * locationIds.length)])
			),
			repeatabilitySpec_um: mostly(
				fc.oneof(
					fc.double({ min: 0.1, max: 1000, noNaN: true }),
					fc.constantFrom('2.5', '2,5', '3 µm', '')
				)
			),
			ratedLifeCycles: mostly(fc.integer({ min: 1, max: 100_000_000 })),
			ballMaterial: mostly(fc.oneof(text(80), fc.constant(null))),
			seatMaterial: mostly(fc.oneof(text(80), fc.constant(null))),
			ballDiameter_mm: mostly(fc.double({ min: 0.1, max: 500, noNaN: true })),
			preload_N: mostly(fc.double({ min: 1, max: 1e6, noNaN: true })),
			mass_kg: mostly(fc.double({ min: 0.1, max: 10_000, noNaN: true })),
			commissionedOn: mostly(
				fc.oneof(
					fc
						.date({ min: new Date('1950-01-02'), max: new Date(), noInvalidDate: true })
						.map((d) => d.toISOString().slice(0, 10)),
					fc.constantFrom('2024-02-30', '18.03.2024', '')
				)
			),
			notes: mostly(fc.oneof(text(5000), fc.constant(null)))
		},
		required
	);
const fixtureBody = (required: string[]) =>
	fc.oneof(
		{ weight: 12, arbitrary: fixtureFields(required).map(toText) },
		{ weight: 2, arbitrary: garbage.map(toText) },
		{
			weight: 1,
			arbitrary: fc.constantFrom('', '{', 'null', '[]', '{"name":"x"', '{"__proto__":{"name":"x"}}')
		}
	);

/* ------------------------------------------------------------------------------------------ */

test.describe.configure({ mode: 'serial' });

test.beforeAll(async ({ browser }) => {
	db = await mysql.createConnection({ uri: process.env.DATABASE_URL! });
	const tag = randomUUID().slice(0, 8);
	const [site] = await db.query<mysql.ResultSetHeader>(
		'INSERT INTO sites (name, created_at) VALUES (?, NOW(3))',
		[`Fuzz site ${tag}`]
	);
	const [area] = await db.query<mysql.ResultSetHeader>(
		'INSERT INTO areas (site_id, name, created_at) VALUES (?, ?, NOW(3))',
		[site.insertId, 'Fuzz bay']
	);
	const [location] = await db.query<mysql.ResultSetHeader>(
		'INSERT INTO locations (area_id, name, created_at) VALUES (?, ?, NOW(3))',
		[area.insertId, 'Fuzz bench']
	);
	const [second] = await db.query<mysql.ResultSetHeader>(
		'INSERT INTO locations (area_id, name, created_at) VALUES (?, ?, NOW(3))',
		[area.insertId, 'Fuzz shelf']
	);
	locationIds = [location.insertId, second.insertId, 999_999_999];
	for (let i = 0; i < 16; i++) {
		let code: string;
		for (;;) {
			code = generateFixtureCode();
			const [taken] = await db.query<mysql.RowDataPacket[]>(
				'SELECT 1 FROM fixtures WHERE code = ?',
				[code]
			);
			if (!taken.length) break;
		}
		const [f] = await db.query<mysql.ResultSetHeader>(
			`INSERT INTO fixtures (code, name, type, status, location_id, created_at, updated_at)
			 VALUES (?, ?, 'three-vee', 'in-service', ?, NOW(3), NOW(3))`,
			[code, `Fuzz target mount ${i + 1}`, location.insertId]
		);
		syncFixtures.push({ code, id: f.insertId });
	}
	({ code: fixtureCode, id: fixtureId } = syncFixtures[0]);

	const page = await browser.newPage();
	await signInAs(page, 'admin');
	cookie = (await page.context().cookies()).map((c) => `${c.name}=${c.value}`).join('; ');
	await page.close();
});

test.afterAll(async () => {
	// Fixtures the fuzz created go again, so later specs see the register they expect.
	if (createdFixtures.length) {
		for (const table of [
			'events',
			'fixture_state',
			'flags',
			'attachments',
			'coupling_geometries'
		]) {
			await db.query(`DELETE FROM ${table} WHERE fixture_id IN (?)`, [createdFixtures]);
		}
		await db.query('DELETE FROM fixtures WHERE id IN (?)', [createdFixtures]);
	}
	await db?.end();
});

const params = (numRuns: number) => ({ numRuns, seed, endOnFailure: true });

test('POST /api/sync: 2xx/4xx JSON, each accepted event stored once, nothing else stored', async () => {
	test.setTimeout(600_000);
	const totals = { requests: 0, accepted: 0, rejected: 0, refused: 0 };
	// Per request the fuzz fixture's events are counted (an index lookup); the whole table is
	// counted at the start and the end, so an event stored anywhere else is caught too.
	const ours = async () => {
		const [rows] = await db.query<mysql.RowDataPacket[]>(
			'SELECT COUNT(*) AS n FROM events WHERE fixture_id IN (?)',
			[syncFixtures.map((f) => f.id)]
		);
		return Number(rows[0].n);
	};
	const startAll = await count('events');
	await fc.assert(
		fc.asyncProperty(syncBody, async (text) => {
			const before = await ours();
			const { status, body } = await call('POST', '/api/sync', text, 'application/json');
			const after = await ours();
			totals.requests += 1;
			if (status !== 200) {
				totals.refused += 1;
				expect(after, `a refused batch stored events: ${text.slice(0, 200)}`).toBe(before);
				return;
			}
			const results = body.results as { id: string; status: string }[];
			expect(Array.isArray(results)).toBe(true);
			expect(results).toHaveLength((JSON.parse(text) as { events: unknown[] }).events.length);
			const accepted = results.filter((r) => r.status === 'accepted');
			totals.accepted += accepted.length;
			totals.rejected += results.filter((r) => r.status === 'rejected').length;
			expect(after - before, `stored ≠ accepted: ${text.slice(0, 200)}`).toBe(accepted.length);
			if (accepted.length) {
				const [rows] = await db.query<mysql.RowDataPacket[]>(
					'SELECT COUNT(*) AS n FROM events WHERE id IN (?) AND fixture_id IN (?)',
					[accepted.map((r) => r.id), syncFixtures.map((f) => f.id)]
				);
				expect(Number(rows[0].n)).toBe(accepted.length);
			}
		}),
		params(runs(600))
	);
	console.log(`fuzz /api/sync: ${JSON.stringify(totals)}`);
	expect(await count('events')).toBe(startAll + totals.accepted);
	expect(totals.accepted).toBeGreaterThan(0);
	expect(totals.rejected).toBeGreaterThan(0);
});

test('POST /api/fixtures: 201 adds one fixture, anything refused adds none', async () => {
	test.setTimeout(600_000);
	const totals = { requests: 0, created: 0 };
	await fc.assert(
		fc.asyncProperty(fixtureBody(['name', 'type', 'locationId']), async (text) => {
			const before = await count('fixtures');
			const { status, body } = await call('POST', '/api/fixtures', text, 'application/json');
			const after = await count('fixtures');
			totals.requests += 1;
			if (status === 201) {
				totals.created += 1;
				createdFixtures.push(Number(body.id));
				expect(after).toBe(before + 1);
			} else expect(after, `refused but written: ${text.slice(0, 200)}`).toBe(before);
		}),
		params(runs(500))
	);
	console.log(`fuzz POST /api/fixtures: ${JSON.stringify(totals)}`);
	expect(createdFixtures.every((id) => Number.isInteger(id) && id > 0)).toBe(true);
	expect(totals.created).toBeGreaterThan(0);
});

test('PATCH /api/fixtures/[code]: a refused change leaves the row and the history as they were', async () => {
	test.setTimeout(600_000);
	const totals = { requests: 0, changed: 0 };
	const history = async () => {
		const [rows] = await db.query<mysql.RowDataPacket[]>(
			'SELECT COUNT(*) AS n FROM events WHERE fixture_id = ?',
			[fixtureId]
		);
		return Number(rows[0].n);
	};
	const row = async () => {
		const [rows] = await db.query<mysql.RowDataPacket[]>('SELECT * FROM fixtures WHERE id = ?', [
			fixtureId
		]);
		return JSON.stringify(rows[0]);
	};
	await fc.assert(
		fc.asyncProperty(fixtureBody([]), async (text) => {
			const [beforeRow, beforeEvents] = await Promise.all([row(), history()]);
			const { status } = await call(
				'PATCH',
				`/api/fixtures/${fixtureCode}`,
				text,
				'application/json'
			);
			totals.requests += 1;
			if (status === 200) {
				totals.changed += 1;
				return;
			}
			expect(await row(), `refused but changed: ${text.slice(0, 200)}`).toBe(beforeRow);
			expect(await history()).toBe(beforeEvents);
		}),
		params(runs(500))
	);
	console.log(`fuzz PATCH /api/fixtures: ${JSON.stringify(totals)}`);
	expect(totals.changed).toBeGreaterThan(0);
});

test('PUT /api/attachments/[id]: a refused upload stores no row', async () => {
	test.setTimeout(600_000);
	const totals = { requests: 0, stored: 0 };
	const pngOf = (w: number, h: number) =>
		new Uint8Array(encodePng(w, h, new Uint8Array(w * h * 3).fill(0x60)));
	const image = fc.oneof(
		{
			weight: 3,
			arbitrary: fc
				.tuple(fc.integer({ min: 1, max: 8 }), fc.integer({ min: 1, max: 8 }))
				.map(([w, h]) => pngOf(w, h))
		},
		{
			weight: 2,
			arbitrary: fc
				.tuple(fc.integer({ min: 0, max: 2 ** 32 - 1 }), fc.integer({ min: 0, max: 2 ** 32 - 1 }))
				.map(([w, h]) => {
					const b = pngOf(2, 2);
					const v = new DataView(b.buffer);
					v.setUint32(16, w);
					v.setUint32(20, h);
					return b;
				})
		},
		{ weight: 1, arbitrary: fc.uint8Array({ maxLength: 64 }) },
		{
			weight: 1,
			arbitrary: fc
				.uint8Array({ maxLength: 40 })
				.map((b) => new Uint8Array([0xff, 0xd8, 0xff, ...b]))
		},
		{
			weight: 1,
			arbitrary: fc
				.uint8Array({ maxLength: 40 })
				.map((b) => new Uint8Array([...Buffer.from('RIFF\0\0\0\0WEBPVP8X'), ...b]))
		}
	);
	const upload = fc.record({
		id: fc.oneof(
			{ weight: 6, arbitrary: fc.constant(null).map(() => randomUUID()) },
			{ weight: 1, arbitrary: nastyString.filter((s) => s.length < 200) }
		),
		fixtureCode: fc.oneof(
			{ weight: 6, arbitrary: fc.constant(null).map(() => fixtureCode) },
			{ weight: 1, arbitrary: nastyString }
		),
		eventId: uuid,
		file: fc.option(image, { freq: 10 }),
		thumb: fc.option(image, { freq: 2 }),
		rawType: fc.constantFrom('text/plain', 'application/json', 'multipart/form-data; boundary=X'),
		raw: rarely(
			fc.oneof(
				fc.string({ maxLength: 80 }),
				fc.constant('--X\r\nContent-Disposition: form-data; name="file"\r\n\r\nab')
			),
			8
		)
	});
	await fc.assert(
		fc.asyncProperty(upload, async (u) => {
			const before = await count('attachments');
			let status: number;
			let segment: string;
			try {
				segment = encodeURIComponent(u.id);
			} catch {
				segment = '%ED%A0%80'; // a lone surrogate cannot be encoded: send its UTF-8-ish bytes
			}
			const path = `/api/attachments/${segment}`;
			if (u.raw !== null) {
				({ status } = await call('PUT', path, u.raw, u.rawType));
			} else {
				const form = new FormData();
				if (typeof u.fixtureCode === 'string') form.set('fixtureCode', u.fixtureCode);
				if (typeof u.eventId === 'string') form.set('eventId', u.eventId);
				if (u.file) form.set('file', new Blob([u.file], { type: 'image/png' }), 'photo.png');
				if (u.thumb) form.set('thumb', new Blob([u.thumb], { type: 'image/png' }), 'thumb.png');
				({ status } = await call('PUT', path, form));
			}
			totals.requests += 1;
			const after = await count('attachments');
			if (status === 201) totals.stored += 1;
			expect(after - before).toBe(status === 201 ? 1 : 0);
		}),
		params(runs(400))
	);
	console.log(`fuzz PUT /api/attachments: ${JSON.stringify(totals)}`);
	expect(totals.stored).toBeGreaterThan(0);
});
