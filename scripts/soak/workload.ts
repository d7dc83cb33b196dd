/**
 * What each simulated phone of the soak logs: a shift's worth of events at the fixtures of its
 * station, with the odd visit to another station's fixture (so phones meet on a fixture, and late
 * events make the server refold its history), and the inspection photos. Payloads follow the
 * sync contract (src/lib/schemas/events.ts) and are checked against it here, so a workload bug
 * shows up before the run, not as a rejection during it. Ids are made on the "device".
 */
import { randomUUID } from 'node:crypto';
import { seededRandom } from '../../src/lib/domain/fixture-code.ts';
import { syncEventSchema, type EventKind } from '../../src/lib/schemas/events.ts';
import { renderDemoPhoto } from '../demo-photos.ts';

/** One event as the phone sends it. */
export interface OutEvent {
	id: string;
	fixtureCode: string;
	kind: EventKind;
	occurredAt: string;
	payload: Record<string, unknown>;
}

/** One inspection photo with the thumbnail the phone would make. */
export interface OutPhoto {
	id: string;
	eventId: string;
	fixtureCode: string;
	bytes: Buffer;
	thumb: Buffer;
}

/** A phone's whole shift: its events in the order they are logged, and their photos. */
export interface Work {
	events: OutEvent[];
	photos: OutPhoto[];
}

/** Fixtures at each phone's own station. */
const STATION = 4;

/**
 * The events of phone `device` (0-based): `count` events, mostly at its own station's fixtures,
 * a run of several at one fixture before moving on, the device clock stepping 2–20 s per event.
 */
export function makeWork(device: number, codes: string[], count: number): Work {
	const random = seededRandom(1000 + device);
	const pick = <T>(items: readonly T[]) => items[Math.floor(random() * items.length)];
	const station = Array.from(
		{ length: STATION },
		(_, i) => codes[(device * STATION + i) % codes.length]
	);
	const held = new Set<string>();
	const events: OutEvent[] = [];
	const photos: OutPhoto[] = [];
	// Three days ago, so no event is ahead of the server clock however long the run takes.
	let clock = Date.now() - 3 * 24 * 3600_000 + device * 1000;
	let fixture = station[0];
	let runLeft = 0;
	const um = () => Math.round((random() - 0.5) * 600) / 1000;

	for (let i = 0; i < count; i++) {
		if (runLeft-- <= 0) {
			fixture = random() < 0.9 ? pick(station) : pick(codes);
			runLeft = Math.floor(random() * 12);
		}
		clock += 2_000 + Math.floor(random() * 18_000);
		const id = randomUUID();
		const r = random();
		let kind: EventKind;
		let payload: Record<string, unknown>;
		if (held.has(fixture) && r < 0.5) {
			kind = 'release';
			payload = random() < 0.5 ? { note: 'Cleared after the check.' } : {};
			held.delete(fixture);
		} else if (r < 0.7) {
			kind = 'reseat';
			payload = random() < 0.4 ? { cycles: 1, readings: { dx: um(), dy: um(), dz: um() } } : {};
		} else if (r < 0.8) {
			kind = 'cleaning';
			const relubricated = random() < 0.3;
			payload = {
				method: pick(['dry-wipe', 'solvent-wipe', 'ultrasonic-bath', 'air-blow']),
				relubricated,
				...(relubricated ? { lubricant: 'Light instrument oil' } : {})
			};
		} else if (r < 0.88) {
			kind = 'note';
			payload = {
				text: `Station check ${i}: ${pick(['seated cleanly', 'chip on the plate wiped off', 'preload felt even', 'slight rock, reseated'])}.`
			};
		} else if (r < 0.92) {
			kind = 'inspection';
			const shots = random() < 0.5 ? 1 + Math.floor(random() * 2) : 0;
			const photoIds = Array.from({ length: shots }, () => randomUUID());
			payload = {
				contacts: ['ball 1', 'ball 2', 'ball 3'].map((contact) => ({
					contact,
					grade: Math.floor(random() * 3),
					marks: random() < 0.2 ? ['fretting'] : []
				})),
				verdict: pick(['serviceable', 'serviceable', 'watch']),
				photoIds
			};
			for (const photoId of photoIds) {
				const seed = Math.floor(random() * 1e9);
				const subject = random() < 0.5 ? 'ball' : 'groove';
				photos.push({
					id: photoId,
					eventId: id,
					fixtureCode: fixture,
					bytes: renderDemoPhoto({ subject, grade: 1, seed }, 96),
					thumb: renderDemoPhoto({ subject, grade: 1, seed }, 32)
				});
			}
		} else if (r < 0.97) {
			kind = 'break-in';
			const cycles = 10 + Math.floor(random() * 40);
			payload = { cycles, readings: Array.from({ length: 5 }, () => ({ dx: um(), dy: um() })) };
		} else if (!held.has(fixture)) {
			kind = 'hold';
			payload = { reason: 'Readings out of band; checking the seats.' };
			held.add(fixture);
		} else {
			kind = 'reseat';
			payload = {};
		}
		const event = {
			id,
			fixtureCode: fixture,
			kind,
			occurredAt: new Date(clock).toISOString(),
			payload
		};
		const check = syncEventSchema.safeParse(event);
		if (!check.success)
			throw new Error(`soak workload made an invalid ${kind}: ${check.error.message}`);
		events.push(event);
	}
	return { events, photos };
}
