/**
 * The demo's invented year of history: for each demo fixture, the events its people would have
 * logged (operator reseats, cleanings and notes; technician inspections, break-in runs, part
 * swaps, moves, holds), ending in the condition its story names (scripts/demo-scenario.ts).
 *
 * Deterministic: the same fixture, policy and seed time give the same events with the same ids.
 * Times are counted back from the seed time, so the intended flags appear whatever the date.
 * Every history is folded here with the domain's own rules, and a history whose flags on the day
 * of the seed are not the intended ones is drawn again with the next salt (a healthy fixture's
 * random readings can trip a run rule by chance; the demo should not).
 */
import { createHash } from 'node:crypto';
import { seededRandom } from '../src/lib/domain/fixture-code';
import type { EventPayloadInputs, FixtureEvent } from '../src/lib/domain/events';
import type { FixtureType } from '../src/lib/domain/fixture-types';
import type { FlagKind } from '../src/lib/domain/flag-kinds';
import {
	applyEvent,
	evaluateFlags,
	initialState,
	type FixtureState
} from '../src/lib/domain/health';
import type { Policy } from '../src/lib/domain/policy';
import type { WearMark } from '../src/lib/domain/wear';
import type { DemoCondition, DemoFixture, DemoStory } from './demo-scenario';

const DAY_MS = 86_400_000;
/** Attempts at drawing a history that ends in its intended flags. */
const MAX_SALTS = 60;

/** Who logs an event: the demo operator or the demo technician. */
export type DemoRole = 'operator' | 'technician';

/** One generated event, as a phone would send it, with the role of the person who logs it. */
export interface DemoEvent {
	role: DemoRole;
	id: string;
	kind: FixtureEvent['kind'];
	occurredAt: string;
	payload: Record<string, unknown>;
}

/** A generated history and what it leads to. */
export interface DemoHistory {
	events: DemoEvent[];
	flags: FlagKind[];
	salt: number;
}

/** Name-based UUID (RFC 4122 version 5, SHA-1) in Nestmark's own demo namespace. */
export function demoUuid(name: string): string {
	const bytes = createHash('sha1').update(`nestmark-demo-history/${name}`).digest().subarray(0, 16);
	bytes[6] = (bytes[6] & 0x0f) | 0x50;
	bytes[8] = (bytes[8] & 0x3f) | 0x80;
	const hex = bytes.toString('hex');
	return `${hex.slice(0, 8)}-${hex.slice(8, 12)}-${hex.slice(12, 16)}-${hex.slice(16, 20)}-${hex.slice(20)}`;
}

/** FNV-1a of a text, to seed a fixture's random numbers. */
function hash32(s: string): number {
	let h = 0x811c9dc5;
	for (const ch of s) {
		h ^= ch.codePointAt(0)!;
		h = Math.imul(h, 0x01000193) >>> 0;
	}
	return h;
}

/** The flags each condition must show on the day of the seed ('drift' may bring replace-soon). */
const INTENDED: Record<DemoCondition, { exactly?: FlagKind[]; includes?: FlagKind[] }> = {
	healthy: { exactly: [] },
	'cleaning-due-days': { exactly: ['cleaning-due'] },
	'cleaning-due-cycles': { exactly: ['cleaning-due'] },
	'inspection-due': { exactly: ['inspection-due'] },
	'breaking-in-part-swap': { exactly: ['break-in-due'] },
	'breaking-in-relubricated': { exactly: ['break-in-due'] },
	drifting: { includes: ['drift'] },
	'past-rated-life': { exactly: ['replace-now'] },
	'on-hold': { exactly: [] },
	'no-history': { exactly: [] }
};

/** Whether `flags` are the ones `condition` intends. */
export function showsIntendedFlags(condition: DemoCondition, flags: FlagKind[]): boolean {
	const want = INTENDED[condition];
	if (want.exactly) {
		return flags.length === want.exactly.length && want.exactly.every((k) => flags.includes(k));
	}
	const allowed: FlagKind[] = [...want.includes!, 'replace-soon'];
	return want.includes!.every((k) => flags.includes(k)) && flags.every((k) => allowed.includes(k));
}

/** The contacts an inspector grades on each kind of fixture. */
function contactsOf(type: FixtureType, hasBalls: boolean): string[] {
	if (type === 'three-vee') return ['Ball 1', 'Ball 2', 'Ball 3', 'Vee 1', 'Vee 2', 'Vee 3'];
	if (type === 'trihedral-vee-flat') return ['Ball 1', 'Ball 2', 'Ball 3', 'Socket', 'Vee', 'Flat'];
	if (type === 'plate' && hasBalls)
		return ['Ball 1', 'Ball 2', 'Ball 3', 'Seat 1', 'Seat 2', 'Seat 3'];
	if (type === 'pallet') return ['Locating cone', 'Pull stud', 'Clamping face'];
	if (type === 'vise') return ['Fixed jaw', 'Locating keys', 'Base face'];
	return ['Locating face', 'Locating pins'];
}

/**
 * Photo ids for a generated inspection: one close-up of the worst contact when it shows wear worth
 * a picture (ids derived from the event's, so a re-seed names the same photos). The seed renders
 * and uploads the pictures after the inspections are ingested (scripts/seed.ts).
 */
export function demoInspectionPhotoIds(inspection: {
	eventId: string;
	fixtureKey: string;
	wantsPhotos: boolean;
}): string[] {
	return inspection.wantsPhotos ? [demoUuid(`${inspection.eventId}/photo/1`)] : [];
}

const CLEAN_NOTES = [
	'Balls and vees wiped with lint-free tissue.',
	'Coolant film on the seats; wiped twice.',
	'Fine chips in one vee; blown out with the guard on, then wiped.',
	undefined,
	undefined,
	undefined
];
const OPERATOR_NOTES = [
	'Seated with a light rock to settle the balls; reading steady.',
	'Pallet stuck slightly on lifting; checked the preload magnet.',
	'Indicator re-zeroed on the master before the readings.',
	'Dust cover missing; found it in the crib.'
];

interface Ctx {
	key: string;
	f: DemoFixture;
	story: DemoStory;
	policy: Policy;
	now: number;
	rnd: () => number;
	salt: number;
	events: DemoEvent[];
	state: FixtureState;
}

/** Normal deviate (Box–Muller) from the fixture's stream. */
function normal(rnd: () => number): number {
	const u = Math.max(rnd(), 1e-12);
	return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * rnd());
}

const round2 = (x: number) => Math.round(x * 100) / 100 + 0;

/** Adds an event, folding it into the running state with the domain's rules. */
function add(
	c: Ctx,
	role: DemoRole,
	at: number,
	kind: FixtureEvent['kind'],
	payload: Record<string, unknown>
) {
	const event: DemoEvent = {
		role,
		id: demoUuid(`${c.key}/${c.salt}/${c.events.length}`),
		kind,
		occurredAt: new Date(at).toISOString(),
		payload
	};
	c.events.push(event);
	c.state = applyEvent(c.state, event as FixtureEvent, c.policy);
}

/** Generates one fixture's history with the given salt (no check of its flags). */
function draw(
	f: DemoFixture,
	story: DemoStory,
	policy: Policy,
	now: Date,
	salt: number,
	commissionedOn: string | null
): { events: DemoEvent[]; state: FixtureState } {
	const rnd = seededRandom(hash32(`${f.key}#${salt}`));
	const since = commissionedOn ? `${commissionedOn}T00:00:00.000Z` : null;
	const c: Ctx = {
		key: f.key,
		f,
		story,
		policy,
		now: now.getTime(),
		rnd,
		salt,
		events: [],
		state: initialState({ since })
	};
	const cond = story.condition;
	if (cond === 'no-history') return { events: [], state: c.state };

	const spec = policy.repeatabilitySpec_um;
	const hasBalls = f.ball !== undefined;
	const axes = f.type === 'three-vee' || f.type === 'trihedral-vee-flat' ? 3 : 2;
	const offset = [0, 1, 2].map(() => round2((rnd() - 0.5) * 0.6));
	// Service R = 4σ at a third to under a half of the spec, at most 0.4 µm.
	const sigma = Math.min(spec * (0.3 + 0.12 * rnd()), 0.4) / 4;
	const daysPerWeek = story.daysPerWeek ?? 1 + Math.floor(rnd() * 3);
	const seatingsPerDay = story.seatingsPerDay ?? 2 + Math.floor(rnd() * 8);
	const cleanEvery = 12 + Math.floor(rnd() * 8);
	const inspectEvery = 55 + Math.floor(rnd() * 20);
	const cleanAtCycles = Math.round((policy.cleaningIntervalCycles ?? 250) * 0.7);
	const inspectAtCycles = Math.round((policy.inspectionIntervalCycles ?? 2000) * 0.75);

	const midnight = Math.floor(c.now / DAY_MS) * DAY_MS;
	const dayStart = (daysAgo: number) => midnight - daysAgo * DAY_MS;
	const at = (daysAgo: number, hour: number) =>
		dayStart(daysAgo) + hour * 3_600_000 + Math.floor(rnd() * 50) * 60_000;
	const weekday = (daysAgo: number) => {
		const d = new Date(dayStart(daysAgo)).getUTCDay();
		return d >= 1 && d <= 5;
	};

	const commissionedDaysAgo = commissionedOn
		? Math.floor((midnight - Date.parse(`${commissionedOn}T00:00:00Z`)) / DAY_MS)
		: 400;
	const start = Math.max(30, Math.min(365, commissionedDaysAgo - 1));

	const reading = (scale: number, shift = 0) => {
		const r: Record<string, number> = {};
		(['dx', 'dy', 'dz'] as const).slice(0, axes).forEach((k, i) => {
			r[k] = round2(offset[i] + (i === 0 ? shift : 0) + sigma * scale * normal(rnd));
		});
		return r;
	};

	let lastCleanDay = start;
	let lastInspectDay = start;
	let cyclesSinceClean = 0;
	let cyclesSinceInspect = 0;
	let inspections = 0;

	const clean = (daysAgo: number, role: DemoRole, hour = 7) => {
		const note = CLEAN_NOTES[Math.floor(rnd() * CLEAN_NOTES.length)];
		const method = rnd() < 0.75 ? 'dry-wipe' : 'solvent-wipe';
		add(c, role, at(daysAgo, hour), 'cleaning', {
			method,
			relubricated: false,
			...(note ? { note } : {})
		});
		lastCleanDay = daysAgo;
		cyclesSinceClean = 0;
	};

	const inspect = (daysAgo: number) => {
		inspections++;
		const age = c.state.cyclesSinceRenewal;
		const worn = Math.min(2, Math.floor(age / 9000 + rnd() * 1.6));
		const contacts = contactsOf(f.type, hasBalls).map((contact) => {
			const grade = Math.max(0, worn - (rnd() < 0.5 ? 1 : 0));
			const marks: WearMark[] =
				grade >= 2 ? ['fretting'] : grade === 1 && rnd() < 0.2 ? ['debris'] : [];
			return { contact, grade, marks };
		});
		const top = Math.max(...contacts.map((x) => x.grade));
		const eventId = demoUuid(`${c.key}/${c.salt}/${c.events.length}`);
		const payload = {
			contacts,
			verdict: top >= 2 ? 'watch' : 'serviceable',
			photoIds: demoInspectionPhotoIds({ eventId, fixtureKey: f.key, wantsPhotos: top >= 2 }),
			...(top >= 2
				? {
						note: 'Matt band with fine reddish dust on the worst contact; watch at the next inspection.'
					}
				: inspections === 1
					? { note: 'First inspection in the register.' }
					: {})
		} satisfies EventPayloadInputs['inspection'];
		add(c, 'technician', at(daysAgo, 13), 'inspection', payload);
		lastInspectDay = daysAgo;
		cyclesSinceInspect = 0;
	};

	/** Break-in runs on one day until the fold says settled (or `maxRuns`, or the cycles given). */
	const breakIn = (daysAgo: number, note: string, runs: { cycles: number }[] | null) => {
		const planned = runs ?? [{ cycles: 40 }, { cycles: 20 }, { cycles: 20 }, { cycles: 20 }];
		let seated = 0;
		planned.forEach((run, r) => {
			if (runs === null && r > 0 && !c.state.breakIn.required) return;
			const readings = Array.from({ length: run.cycles }, (_, i) => {
				const settle = 1 + 2.5 * Math.exp(-(seated + i) / 10);
				return reading(Math.min(settle, 3.5) * Math.min(1, 0.3 / (4 * sigma)));
			});
			seated += run.cycles;
			add(c, 'technician', at(daysAgo, 9 + 2 * r), 'break-in', {
				cycles: run.cycles,
				readings,
				...(r === 0 ? { note } : {})
			});
		});
		cyclesSinceClean += seated;
		cyclesSinceInspect += seated;
	};

	// Day one in the register: a note, any carried-over count, a cleaning and the acceptance run.
	add(c, 'technician', at(start, 8), 'note', {
		text: 'Entered in the register; acceptance break-in and baseline readings to follow.'
	});
	if (cond === 'past-rated-life' && policy.ratedLifeCycles !== null) {
		const carried = Math.max(1, policy.ratedLifeCycles - 800);
		add(c, 'technician', at(start, 8), 'reseat', { cycles: carried });
		add(c, 'technician', at(start, 8), 'note', {
			text: `About ${carried.toLocaleString('en-GB')} seatings before the register, from the paper log.`
		});
	}
	clean(start, 'technician', 8);
	breakIn(start, 'Acceptance break-in when entered in the register.', null);
	inspect(start);

	const tailQuiet = {
		'breaking-in-part-swap': 8,
		'breaking-in-relubricated': 3,
		'on-hold': 9
	} as Partial<Record<DemoCondition, number>>;
	const quietFrom = tailQuiet[cond] ?? 0;
	const noCleaningWithin =
		cond === 'cleaning-due-days' ? 38 : cond === 'cleaning-due-cycles' ? 12 : 0;
	const noInspectionWithin = cond === 'inspection-due' ? 100 : 0;
	const driftReadings = cond === 'drifting' ? 12 : 0;
	// Days on which the drifting fixture's last readings are taken, newest last.
	const usedDays: number[] = [];
	for (let d = start - 1; d >= 1; d--) {
		if (weekday(d) && d > quietFrom && rnd() < daysPerWeek / 5) usedDays.push(d);
	}
	const driftFrom = usedDays.length - driftReadings;

	for (let d = start - 1; d >= 1; d--) {
		// No service seatings on a day with an episode: a break-in run must not take their readings.
		let episodeToday = false;
		for (const ep of story.episodes ?? []) {
			if (ep.daysAgo !== d) continue;
			episodeToday = true;
			if (ep.kind === 'part-swap') {
				add(c, 'technician', at(d, 8), 'part-swap', { replaced: ep.replaced, note: ep.note });
				breakIn(d, 'Break-in after the part swap.', null);
			} else if (ep.kind === 'relubricated') {
				add(c, 'technician', at(d, 8), 'cleaning', {
					method: 'solvent-wipe',
					relubricated: true,
					lubricant: ep.lubricant
				});
				lastCleanDay = d;
				cyclesSinceClean = 0;
				breakIn(d, 'Break-in after relubrication.', null);
			} else if (ep.kind === 'hold') {
				add(c, 'technician', at(d, 10), 'hold', { reason: ep.reason });
				add(c, 'technician', at(d - ep.releasedAfterDays, 14), 'release', { note: ep.release });
			} else if (ep.kind === 'move') {
				add(c, 'technician', at(d, 8), 'move', { locationId: 'current', note: ep.note });
			} else {
				add(c, 'operator', at(d, 12), 'note', { text: ep.text });
			}
		}
		if (d === quietFrom && cond === 'on-hold') {
			clean(d, 'technician', 9);
			add(c, 'technician', at(d, 11), 'hold', {
				reason: 'One vee insert shows fretting; waiting for inspection.'
			});
		}
		if (d === quietFrom && cond === 'breaking-in-part-swap') {
			add(c, 'technician', at(d, 8), 'part-swap', {
				replaced: ['seats'],
				note: 'New carbide vee inserts fitted.'
			});
		}
		if (d === quietFrom && cond === 'breaking-in-relubricated') {
			add(c, 'technician', at(d, 8), 'cleaning', {
				method: 'ultrasonic-bath',
				relubricated: true,
				lubricant: 'light instrument oil'
			});
			lastCleanDay = d;
			cyclesSinceClean = 0;
		}
		if (!weekday(d)) continue;

		const mayClean = d > noCleaningWithin;
		if (mayClean && (d <= lastCleanDay - cleanEvery || cyclesSinceClean >= cleanAtCycles)) {
			clean(d, 'operator');
		}
		const used = usedDays.indexOf(d);
		if (used >= 0 && !episodeToday) {
			const cycles = Math.max(1, seatingsPerDay + Math.round((rnd() - 0.5) * seatingsPerDay * 0.4));
			const k = used - driftFrom;
			const shift = k >= 0 ? sigma * 3.2 * ((k + 1) / driftReadings) : 0;
			const withReading = k >= 0 || rnd() < 0.85;
			add(c, 'operator', at(d, 10 + Math.floor(rnd() * 5)), 'reseat', {
				cycles,
				...(withReading ? { readings: reading(1, shift) } : {})
			});
			cyclesSinceClean += cycles;
			cyclesSinceInspect += cycles;
			if (rnd() < 0.02) {
				const text = OPERATOR_NOTES[Math.floor(rnd() * OPERATOR_NOTES.length)];
				add(c, 'operator', at(d, 15), 'note', { text });
			}
		}
		if (
			d > noInspectionWithin &&
			(d <= lastInspectDay - inspectEvery || cyclesSinceInspect >= inspectAtCycles)
		) {
			inspect(d);
		}
	}
	// The current break-ins: too few cycles yet to judge settling.
	if (cond === 'breaking-in-part-swap') {
		breakIn(6, 'First run on the new inserts.', [{ cycles: 12 }]);
		breakIn(2, 'Second run; readings still improving.', [{ cycles: 12 }]);
	}
	if (cond === 'breaking-in-relubricated') {
		breakIn(2, 'Break-in after relubrication.', [{ cycles: 20 }]);
	}
	c.events.sort((a, b) => (a.occurredAt < b.occurredAt ? -1 : a.occurredAt > b.occurredAt ? 1 : 0));
	return { events: c.events, state: c.state };
}

/**
 * A demo fixture's history ending in its story's condition, checked by folding it with the
 * domain's rules and evaluating its flags at `now`. `locationId` replaces the placeholder of move
 * events (a demo fixture is moved to where the register has it).
 */
export function demoHistory(
	f: DemoFixture,
	story: DemoStory,
	policy: Policy,
	now: Date,
	locationId: number
): DemoHistory {
	if (story.condition === 'no-history') return { events: [], flags: [], salt: 0 };
	for (let salt = 0; salt < MAX_SALTS; salt++) {
		const { events } = draw(f, story, policy, now, salt, f.commissioned ?? null);
		// Events within a day were added in an order of convenience: fold them in time order.
		let state = initialState({ since: f.commissioned ? `${f.commissioned}T00:00:00.000Z` : null });
		for (const e of events) {
			if (e.kind === 'move') e.payload = { ...e.payload, locationId: String(locationId) };
			state = applyEvent(state, e as FixtureEvent, policy);
		}
		const flags = evaluateFlags(state, policy, now).map((x) => x.kind);
		if (showsIntendedFlags(story.condition, flags)) return { events, flags, salt };
	}
	throw new Error(`demo history for ${f.key}: no draw ended in "${story.condition}"`);
}
