import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { FixtureEvent } from './events';
import { evaluateFlags } from './flag-rules';
import { applyEvent, compareEvents, foldEvents, isOutOfOrder, recompute } from './fold';
import { type FixtureState, cloneState, emptyState, initialState } from './fold-state';
import { T0, brokenIn, flag, history, kinds, policy, settled, xs } from './health-test-history';
import { DEFAULT_POLICY, type Policy } from './policy';

describe('a new fixture', () => {
	it('needs a break-in and says so with the numbers', () => {
		const s = emptyState();
		expect(s.status).toBe('breaking-in');
		const flags = evaluateFlags(s, policy, new Date(T0));
		expect(kinds(flags)).toEqual(['break-in-due']);
		expect(flags[0].reason).toBe(
			'New fixture: break-in required — 0 of at least 10 cycles run; no settling window yet (5 seatings with readings each).'
		);
		expect(flags[0].figures).toMatchObject({ reason: 'new', cycles: 0, minCycles: 10, windows: 0 });
	});

	it('can start in service when imported as already broken in', () => {
		const s = initialState({ since: '2024-06-01T00:00:00.000Z', breakInRequired: false });
		expect(s.status).toBe('in-service');
		expect(s.since).toBe('2024-06-01T00:00:00.000Z');
		expect(evaluateFlags(s, policy, new Date('2024-06-02T00:00:00Z'))).toEqual([]);
	});

	it('takes the first event time as its start when no commissioning date is known', () => {
		const h = history();
		h.note('Arrived from the maker');
		expect(recompute(h.events, policy).since).toBe(h.events[0].occurredAt);
	});
});

describe('break-in', () => {
	it('completes once minimum cycles are run and the last two windows agree within tolerance and spec', () => {
		const h = brokenIn();
		const s = recompute(h.events, policy);
		expect(s.breakIn).toMatchObject({
			required: false,
			completedAtCycle: 10,
			completedAt: h.events[0].occurredAt
		});
		expect(s.breakIn.windows.map((w) => [w.cycle, w.R])).toEqual([
			[5, expect.closeTo(0.4, 12)],
			[10, expect.closeTo(0.4, 12)]
		]);
		expect(s.status).toBe('in-service');
		expect(kinds(evaluateFlags(s, policy, new Date(h.now())))).toEqual([]);
	});

	it('is not settled while windowed R still falls by more than the tolerance', () => {
		const h = history();
		h.breakIn(10, xs([0, 0.4, 0.2, 0, 0.4, ...settled])); // R 0.8 → 0.4
		const s = recompute(h.events, policy);
		expect(s.breakIn.required).toBe(true);
		const f = flag(evaluateFlags(s, policy, new Date(h.now())), 'break-in-due')!;
		expect(f.reason).toBe(
			'New fixture: break-in required — 10 of at least 10 cycles run; windowed R 0.8 → 0.4 µm (change 0.4 µm, tolerance 0.1 µm); spec 1 µm.'
		);
		expect(f.figures).toMatchObject({
			lastWindowR_um: expect.closeTo(0.4, 12),
			change_um: expect.closeTo(0.4, 12)
		});
	});

	it('is not settled when R is steady but above spec', () => {
		const h = history();
		const wide = [0, 1, 0.5, 0, 1]; // s = 0.5, R = 2
		h.breakIn(10, xs([...wide, ...wide]));
		expect(recompute(h.events, policy).breakIn.required).toBe(true);
	});

	it('waits for the minimum cycles even when readings have settled; reseats count', () => {
		const h = history();
		h.breakIn(6, xs([...settled, ...settled].slice(0, 6)));
		h.reseat(1, { dx: 0.1 });
		h.reseat(1, { dx: 0 });
		h.reseat(1, { dx: 0.2 });
		h.reseat(1, { dx: 0.2 }); // closes the second window, R 0.4 µm again, at cycle 10
		let s = recompute(h.events, policy);
		expect(s.totalCycles).toBe(10);
		expect(s.breakIn.required).toBe(false);
		// With a higher minimum the same history is still breaking in until more cycles are run.
		const strict = { ...policy, breakInMinCycles: 15 };
		s = recompute(h.events, strict);
		expect(s.breakIn).toMatchObject({ required: true, cycles: 10 });
		h.reseat(5);
		s = recompute(h.events, strict);
		expect(s.breakIn).toMatchObject({ required: false, completedAtCycle: 15 });
	});

	it('is required again after a part swap or a relubricating cleaning, not after a plain cleaning', () => {
		const h = brokenIn();
		h.cleaning(false);
		expect(recompute(h.events, policy).status).toBe('in-service');
		h.cleaning(true);
		let s = recompute(h.events, policy);
		expect(s.breakIn).toMatchObject({ required: true, reason: 'relubricated', cycles: 0 });
		expect(s.lastRelubricatedAt).toBe(h.events.at(-1)!.occurredAt);
		expect(flag(evaluateFlags(s, policy, new Date(h.now())), 'break-in-due')!.reason).toMatch(
			/^After relubrication: break-in required/
		);
		h.breakIn(10, xs([...settled, ...settled]));
		h.partSwap(['preload']);
		s = recompute(h.events, policy);
		expect(s.breakIn).toMatchObject({ required: true, reason: 'part-swap' });
		expect(s.status).toBe('breaking-in');
	});
});

describe('hold, release and the rest', () => {
	it('hold and release set the status; a break-in still pending shows again on release', () => {
		const h = history();
		h.hold('Dropped on the floor');
		let s = recompute(h.events, policy);
		expect(s).toMatchObject({ status: 'on-hold', holdReason: 'Dropped on the floor' });
		h.release();
		s = recompute(h.events, policy);
		expect(s).toMatchObject({ status: 'breaking-in', onHold: false, holdReason: null });
		h.breakIn(10, xs([...settled, ...settled]));
		h.hold('Waiting for a new seat');
		h.release();
		expect(recompute(h.events, policy).status).toBe('in-service');
	});

	it('moves and notes count as events and change nothing else', () => {
		const h = brokenIn();
		const before = recompute(h.events, policy);
		h.move();
		h.note('Looks fine');
		const after = recompute(h.events, policy);
		expect(after.eventCount).toBe(before.eventCount + 2);
		expect(after.lastMoveAt).toBe(h.events[1].occurredAt);
		expect({
			...after,
			eventCount: 0,
			lastEventId: null,
			lastEventAt: null,
			lastMoveAt: null
		}).toEqual({
			...before,
			eventCount: 0,
			lastEventId: null,
			lastEventAt: null
		});
	});

	it('orders events by time then id, and spots a late event', () => {
		const a = { id: 'b', occurredAt: '2025-01-01T00:00:00.000Z' };
		const b = { id: 'a', occurredAt: '2025-01-01T00:00:01.000Z' };
		const c = { id: 'c', occurredAt: '2025-01-01T00:00:00.000Z' };
		expect([b, c, a].sort(compareEvents).map((e) => e.id)).toEqual(['b', 'c', 'a']);
		const h = brokenIn();
		const s = recompute(h.events, policy);
		expect(isOutOfOrder(s, { occurredAt: '2024-12-31T00:00:00Z' })).toBe(true);
		expect(isOutOfOrder(s, { occurredAt: new Date(h.now()).toISOString() })).toBe(false);
		expect(isOutOfOrder(emptyState(), { occurredAt: '2000-01-01T00:00:00Z' })).toBe(false);
	});
});

describe('errors', () => {
	it('an unknown kind, a bad time, a bad reading or a bad policy throw clearly', () => {
		const s = emptyState();
		const good = {
			id: 'x',
			kind: 'reseat',
			occurredAt: '2025-01-01T00:00:00Z',
			payload: {}
		} as FixtureEvent;
		expect(() =>
			applyEvent(s, { ...good, kind: 'polish' } as unknown as FixtureEvent, policy)
		).toThrow(/event.kind: unknown kind "polish"/);
		expect(() => applyEvent(s, { ...good, occurredAt: 'soon' }, policy)).toThrow(
			/event.occurredAt/
		);
		expect(() =>
			applyEvent(s, { ...good, payload: { readings: { dx: NaN } } } as FixtureEvent, policy)
		).toThrow(/payload.readings.dx: must be a finite number/);
		expect(() =>
			applyEvent(s, { ...good, payload: { cycles: 0 } } as FixtureEvent, policy)
		).toThrow(/payload.cycles/);
		expect(() => applyEvent(s, good, { ...policy, repeatabilityWindow: 1 })).toThrow(
			/policy.repeatabilityWindow/
		);
		expect(() => initialState({ since: 'yesterday' })).toThrow(/since/);
	});
});

// ————————————————————————————————————————————————————————————————————————————————
// Properties over random histories.

const reading = fc
	.record(
		{
			dx: fc.integer({ min: -3000, max: 3000 }).map((i) => i / 1000),
			dy: fc.integer({ min: -3000, max: 3000 }).map((i) => i / 1000),
			dz: fc.integer({ min: -3000, max: 3000 }).map((i) => i / 1000)
		},
		{ requiredKeys: [] }
	)
	.filter((r) => Object.keys(r).length > 0);

const payloadArb: fc.Arbitrary<Pick<FixtureEvent, 'kind' | 'payload'>> = fc.oneof(
	{
		weight: 12,
		arbitrary: fc
			.record({
				cycles: fc.integer({ min: 1, max: 40 }),
				readings: fc.option(reading, { nil: undefined })
			})
			.map((p) => ({ kind: 'reseat' as const, payload: p.readings ? p : { cycles: p.cycles } }))
	},
	{
		weight: 2,
		arbitrary: fc
			.integer({ min: 1, max: 30 })
			.chain((cycles) =>
				fc
					.array(reading, { maxLength: Math.min(cycles, 12) })
					.map((readings) => ({ cycles, readings }))
			)
			.map((payload) => ({ kind: 'break-in' as const, payload }))
	},
	{
		weight: 2,
		arbitrary: fc.boolean().map((relubricated) => ({
			kind: 'cleaning' as const,
			payload: { method: 'dry-wipe' as const, relubricated }
		}))
	},
	{
		weight: 1,
		arbitrary: fc
			.array(fc.integer({ min: 0, max: 4 }), { minLength: 1, maxLength: 6 })
			.chain((grades) =>
				fc.constantFrom('serviceable', 'watch', 'replace').map((verdict) => ({
					kind: 'inspection' as const,
					payload: {
						contacts: grades.map((grade, i) => ({
							contact: `c${i}`,
							grade,
							marks: grade > 1 ? (['pitting', 'corrosion'] as const).slice(0, grade - 1) : []
						})),
						verdict: verdict as 'serviceable' | 'watch' | 'replace'
					}
				}))
			)
	},
	{
		weight: 1,
		arbitrary: fc
			.subarray(['balls', 'seats', 'preload', 'whole-fixture'] as const, { minLength: 1 })
			.map((replaced) => ({ kind: 'part-swap' as const, payload: { replaced: [...replaced] } }))
	},
	{ weight: 1, arbitrary: fc.constant({ kind: 'hold' as const, payload: { reason: 'checking' } }) },
	{ weight: 1, arbitrary: fc.constant({ kind: 'release' as const, payload: {} }) },
	{ weight: 1, arbitrary: fc.constant({ kind: 'move' as const, payload: { locationId: 'lab' } }) },
	{ weight: 1, arbitrary: fc.constant({ kind: 'note' as const, payload: { text: 'ok' } }) }
) as fc.Arbitrary<Pick<FixtureEvent, 'kind' | 'payload'>>;

const historyArb = fc
	.array(fc.tuple(payloadArb, fc.integer({ min: 1, max: 72 * 3600 })), { maxLength: 120 })
	.map((items) => {
		let t = T0;
		return items.map(([e, dt], i) => {
			t += dt * 1000;
			return { ...e, id: `e${i}`, occurredAt: new Date(t).toISOString() } as FixtureEvent;
		});
	});

const policyArb = fc.record({
	...Object.fromEntries(Object.entries(DEFAULT_POLICY).map(([k, v]) => [k, fc.constant(v)])),
	repeatabilitySpec_um: fc.constantFrom(0.5, 1, 2, 4),
	repeatabilityWindow: fc.integer({ min: 2, max: 8 }),
	breakInMinCycles: fc.integer({ min: 0, max: 60 }),
	settleWindow: fc.integer({ min: 2, max: 8 }),
	settleTolerance_um: fc.constantFrom(0, 0.2, 1, 5),
	ratedLifeCycles: fc.constantFrom(null, 300, 2000),
	forecastHorizonCycles: fc.constantFrom(0, 100, 5000)
}) as fc.Arbitrary<Policy>;

function deepFreeze<T>(value: T): T {
	if (value && typeof value === 'object') {
		Object.freeze(value);
		for (const v of Object.values(value)) deepFreeze(v);
	}
	return value;
}

const hasBadNumber = (s: unknown) =>
	/NaN|Infinity/.test(
		JSON.stringify(s, (_, v) => (typeof v === 'number' && !Number.isFinite(v) ? `${v}` : v))
	);

describe('folding properties (fast-check)', () => {
	it('one by one through JSON (as the server stores it) equals recompute from scratch', () => {
		fc.assert(
			fc.property(historyArb, policyArb, (events, p) => {
				let s: FixtureState = emptyState();
				for (const e of events) s = JSON.parse(JSON.stringify(applyEvent(s, e, p)));
				expect(s).toEqual(recompute(events, p));
			}),
			{ numRuns: 300 }
		);
	});

	it('applyEvent never changes its input (deep-frozen states and events)', () => {
		fc.assert(
			fc.property(historyArb, policyArb, (events, p) => {
				let s: FixtureState = deepFreeze(emptyState());
				for (const e of events) s = deepFreeze(applyEvent(s, deepFreeze(e), p));
				expect(s.eventCount).toBe(events.length);
			}),
			{ numRuns: 200 }
		);
	});

	it('a history split anywhere folds to the same state; states are plain finite JSON', () => {
		fc.assert(
			fc.property(historyArb, policyArb, fc.nat(), (events, p, cut) => {
				const k = events.length ? cut % (events.length + 1) : 0;
				const whole = recompute(events, p);
				const split = foldEvents(recompute(events.slice(0, k), p), events.slice(k), p);
				expect(split).toEqual(whole);
				expect(JSON.parse(JSON.stringify(whole))).toEqual(whole);
				expect(hasBadNumber(whole)).toBe(false);
				expect(cloneState(whole)).toEqual(whole);
			}),
			{ numRuns: 200 }
		);
	});

	it('evaluateFlags gives known kinds with finite figures and never throws on a folded state', () => {
		fc.assert(
			fc.property(historyArb, policyArb, fc.integer({ min: 0, max: 400 }), (events, p, days) => {
				const s = recompute(events, p);
				const now = new Date((s.lastEventAt ? Date.parse(s.lastEventAt) : T0) + days * 86_400_000);
				const flags = evaluateFlags(s, p, now);
				expect(new Set(kinds(flags)).size).toBe(flags.length);
				for (const f of flags) {
					expect(f.reason.length).toBeGreaterThan(10);
					expect(hasBadNumber(f.figures)).toBe(false);
				}
				expect(kinds(flags).includes('replace-now') && kinds(flags).includes('replace-soon')).toBe(
					false
				);
				expect(s.status === 'breaking-in').toBe(s.breakIn.required && !s.onHold);
			}),
			{ numRuns: 300 }
		);
	});
});

describe('bounded state (O(1) per event)', () => {
	it('20,000 seatings with readings leave a state of a few kilobytes', () => {
		const h = brokenIn();
		for (let i = 0; i < 20_000; i++)
			h.reseat(1, { dx: Math.sin(i) * 0.2, dy: Math.cos(i * 0.7) * 0.2, dz: 0.1 });
		const s = foldEvents(emptyState(), h.events, DEFAULT_POLICY);
		expect(s.readingsTotal).toBe(20_010);
		expect(JSON.stringify(s).length).toBeLessThan(8000);
	});
});
