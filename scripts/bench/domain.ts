/**
 * Computation-core benchmark: fold 1,000,000 synthetic events for 5,000 fixtures through the health
 * rules and evaluate each fixture's flags, against a bare loop that only reads the same events, in
 * the same run. Goal: the fold runs at ≥ 0.25 of the bare loop's rate.
 *
 * Two folds are timed: `applyEvent` one event at a time (immutable states, as the server applies
 * a live event), and `foldEvents` (one copy per fixture, then in place, as for a sync batch or a
 * rebuild). Each measurement is repeated and the fastest run of each kind is reported.
 *
 * The event mix is a few weeks of a busy fixture: a break-in run with readings that settles, then
 * reseats (one in ten with indicator readings), cleanings, inspections, an occasional
 * relubrication or part swap (each followed by a new break-in run), hold/release, move or note.
 */
import v8 from 'node:v8';
import vm from 'node:vm';
import {
	applyEvent,
	DEFAULT_POLICY,
	emptyState,
	evaluateFlags,
	foldEvents
} from '../../src/lib/domain/index';
import type { FixtureEvent, FixtureState } from '../../src/lib/domain/index';

const FIXTURES = 5_000;
const EVENTS_PER_FIXTURE = 200;
const REPEATS = 5;
const GOAL = 0.25;

/** Small seeded generator (mulberry32) so every run folds the same events. */
function prng(seed: number): () => number {
	let a = seed >>> 0;
	return () => {
		a = (a + 0x6d2b79f5) >>> 0;
		let t = a;
		t = Math.imul(t ^ (t >>> 15), t | 1);
		t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
		return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
	};
}

function makeFixture(f: number, rnd: () => number): FixtureEvent[] {
	const events: FixtureEvent[] = [];
	let t = Date.parse('2025-01-06T07:00:00.000Z') + f * 60_000;
	const reading = (scale: number) => ({
		dx: Math.round((rnd() - 0.5) * scale * 1000) / 1000,
		dy: Math.round((rnd() - 0.5) * scale * 1000) / 1000
	});
	const push = (kind: FixtureEvent['kind'], payload: unknown) => {
		t += 30 * 60_000 + Math.floor(rnd() * 3 * 3_600_000);
		events.push({
			id: `f${f}-${events.length}`,
			kind,
			occurredAt: new Date(t).toISOString(),
			payload
		} as FixtureEvent);
	};
	// A technician's run that settles: a rough first window, then two windows of the same scatter.
	const breakInRun = () => {
		const steady = Array.from({ length: 10 }, () => reading(0.3));
		const readings = [
			...Array.from({ length: 10 }, () => reading(1.2)),
			...steady,
			...steady.slice().reverse()
		];
		push('break-in', { cycles: 60, readings });
	};
	breakInRun();
	while (events.length < EVENTS_PER_FIXTURE) {
		const r = rnd();
		if (r < 0.1) push('reseat', { cycles: 1, readings: reading(0.3 + events.length / 500) });
		else if (r < 0.9) push('reseat', { cycles: 1 + Math.floor(rnd() * 4) });
		else if (r < 0.94) {
			const relubricated = rnd() < 0.05;
			push('cleaning', { method: 'dry-wipe', relubricated });
			if (relubricated) breakInRun();
		} else if (r < 0.955) {
			push('inspection', {
				contacts: [1, 2, 3].map((i) => ({
					contact: `ball ${i}`,
					grade: Math.floor(rnd() * 3),
					marks: []
				})),
				verdict: 'serviceable',
				photoIds: []
			});
		} else if (r < 0.96) {
			push('part-swap', { replaced: ['balls'] });
			breakInRun();
		} else if (r < 0.97) push('hold', { reason: 'Waiting for inspection' });
		else if (r < 0.98) push('release', {});
		else if (r < 0.99) push('move', { locationId: 'bay-2' });
		else push('note', { text: 'Seats wiped before seating' });
	}
	return events.slice(0, EVENTS_PER_FIXTURE);
}

const fmt = (n: number) => Math.round(n).toLocaleString('en-GB');

/** Runs the computation-core section of `npm run bench`. */
export async function benchDomain(): Promise<void> {
	console.log('Computation core: fold events and evaluate flags');
	const rnd = prng(20250106);
	const fixtures = Array.from({ length: FIXTURES }, (_, f) => makeFixture(f, rnd));
	const total = FIXTURES * EVENTS_PER_FIXTURE;
	const policy = DEFAULT_POLICY;
	// A day after the latest event, so calendar rules see a register that is in use.
	const latest = Math.max(...fixtures.map((events) => Date.parse(events.at(-1)!.occurredAt)));
	const now = new Date(latest + 86_400_000);

	// Reads what the fold reads — kind, time, cycles, a reading — and nothing more.
	const bare = () => {
		let sum = 0;
		for (const events of fixtures) {
			for (let i = 0; i < events.length; i++) {
				const e = events[i];
				sum += e.kind.length + e.occurredAt.length;
				const p = e.payload as { cycles?: number; readings?: { dx?: number } };
				if (p.cycles !== undefined) sum += p.cycles;
				if (p.readings !== undefined) sum += 1;
			}
		}
		return sum;
	};
	const oneByOne = () => {
		let flags = 0;
		for (const events of fixtures) {
			let s: FixtureState = emptyState();
			for (let i = 0; i < events.length; i++) s = applyEvent(s, events[i], policy);
			flags += evaluateFlags(s, policy, now).length;
		}
		return flags;
	};
	const batch = () => {
		let flags = 0;
		for (const events of fixtures) {
			const s = foldEvents(emptyState(), events, policy);
			flags += evaluateFlags(s, policy, now).length;
		}
		return flags;
	};
	// CPU time of this process (all its threads, so GC helpers count), not wall time: on a shared
	// machine wall time also counts the time spent waiting for a core.
	// A full collection before each run, then a pause for V8's sweeper threads to finish (process
	// CPU time counts every thread), so no run pays for garbage left by the one before or by
	// building the events; each still pays for the garbage it makes itself.
	v8.setFlagsFromString('--expose-gc');
	const gc = vm.runInNewContext('gc') as () => void;
	const settle = () => new Promise((resolve) => setTimeout(resolve, 250));
	const time = async (fn: () => number) => {
		gc();
		await settle();
		const c0 = process.cpuUsage();
		const t0 = performance.now();
		const out = fn();
		const c = process.cpuUsage(c0);
		return { ms: (c.user + c.system) / 1000, wallMs: performance.now() - t0, out };
	};

	const best = { bare: Infinity, one: Infinity, batch: Infinity };
	let flagsRaised = 0;
	for (let r = 0; r < REPEATS; r++) {
		best.bare = Math.min(best.bare, (await time(bare)).ms);
		const one = await time(oneByOne);
		best.one = Math.min(best.one, one.ms);
		const b = await time(batch);
		best.batch = Math.min(best.batch, b.ms);
		if (one.out !== b.out)
			throw new Error('applyEvent and foldEvents disagree on the flags raised');
		flagsRaised = b.out;
	}
	const rate = (ms: number) => (total / ms) * 1000;
	const line = (label: string, ms: number) => {
		const ratio = rate(ms) / rate(best.bare);
		const verdict = ratio >= GOAL ? 'meets' : 'misses';
		console.log(
			`  ${label.padEnd(38)} ${fmt(rate(ms)).padStart(13)} events/s  ratio ${ratio.toFixed(3)} (${verdict} goal ${GOAL})`
		);
	};
	console.log(
		`  ${fmt(total)} events, ${fmt(FIXTURES)} fixtures, ${fmt(flagsRaised)} flags raised; best of ${REPEATS}`
	);
	console.log(
		`  ${'bare loop reading the events'.padEnd(38)} ${fmt(rate(best.bare)).padStart(13)} events/s`
	);
	line('applyEvent one at a time + flags', best.one);
	line('foldEvents per fixture + flags', best.batch);
}
