/**
 * A fixture's recent events as the card lists them: the server's history merged with this
 * device's outbox, so an entry shows the moment it is logged and never twice.
 */

/** Names of event kinds on screen. */
export const EVENT_KIND_LABELS: Record<string, string> = {
	reseat: 'Reseat',
	cleaning: 'Cleaning',
	inspection: 'Inspection',
	'break-in': 'Break-in run',
	'part-swap': 'Part swap',
	move: 'Move',
	hold: 'Hold',
	release: 'Release',
	note: 'Note'
};

/** An event the server has (from `GET /api/fixtures/[code]/events`). */
export interface ServerEvent {
	id: string;
	kind: string;
	occurredAt: string;
	payload: Record<string, unknown>;
	user: { name: string };
}

/** An event still in this device's outbox. */
export interface DeviceEvent {
	id: string;
	kind: string;
	occurredAt: string;
	payload: Record<string, unknown>;
	state: 'waiting' | 'sending' | 'rejected';
	error?: string;
}

export type HistoryRow =
	(ServerEvent & { origin: 'server' }) | (DeviceEvent & { origin: 'device' });

/**
 * Newest first by occurred-at (id breaks ties, as the server orders). Every outbox entry is kept,
 * since a person must see what has not reached the server; of the server's events the newest
 * `limit` are kept. An id on both sides is the server's (it arrived, the outbox had not caught up).
 */
export function mergeHistory(
	server: readonly ServerEvent[],
	device: readonly DeviceEvent[],
	limit: number
): HistoryRow[] {
	const serverIds = new Set(server.map((e) => e.id));
	const rows: HistoryRow[] = [
		...device.filter((e) => !serverIds.has(e.id)).map((e) => ({ ...e, origin: 'device' as const })),
		...newestFirst(server)
			.slice(0, Math.max(0, limit))
			.map((e) => ({ ...e, origin: 'server' as const }))
	];
	return newestFirst(rows);
}

function newestFirst<T extends { occurredAt: string; id: string }>(rows: readonly T[]): T[] {
	return [...rows].sort((a, b) => {
		const t = Date.parse(b.occurredAt) - Date.parse(a.occurredAt);
		return t !== 0 ? t : b.id < a.id ? -1 : b.id > a.id ? 1 : 0;
	});
}

const num = (v: unknown): number | undefined => (typeof v === 'number' ? v : undefined);
const str = (v: unknown): string | undefined => (typeof v === 'string' && v ? v : undefined);
const signed = (v: number) => (v < 0 ? `−${Math.abs(v)}` : `${v}`);
const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`;

/** The readings of one seating as "dx 0.4 µm, dz −0.1 µm", or undefined when there are none. */
export function describeReading(r: unknown): string | undefined {
	if (!r || typeof r !== 'object') return undefined;
	const rec = r as Record<string, unknown>;
	const parts = (['dx', 'dy', 'dz'] as const)
		.filter((k) => num(rec[k]) !== undefined)
		.map((k) => `${k} ${signed(num(rec[k])!)} µm`);
	return parts.length ? parts.join(', ') : undefined;
}

/** One line saying what an event recorded, from its payload (unknown fields are ignored). */
export function describeEvent(kind: string, payload: Record<string, unknown>): string {
	const note = str(payload.note);
	const parts: (string | undefined)[] = [];
	switch (kind) {
		case 'reseat':
			parts.push(plural(num(payload.cycles) ?? 1, 'cycle'), describeReading(payload.readings));
			break;
		case 'cleaning':
			parts.push(
				str(payload.method)?.replace(/-/g, ' '),
				payload.relubricated === true
					? `relubricated${str(payload.lubricant) ? ` (${payload.lubricant})` : ''}`
					: undefined,
				note
			);
			break;
		case 'break-in': {
			const readings = Array.isArray(payload.readings) ? payload.readings.length : 0;
			parts.push(
				plural(num(payload.cycles) ?? 0, 'cycle'),
				readings ? plural(readings, 'reading') : undefined,
				note
			);
			break;
		}
		case 'inspection': {
			const contacts = Array.isArray(payload.contacts) ? payload.contacts.length : 0;
			parts.push(str(payload.verdict), contacts ? plural(contacts, 'contact') : undefined, note);
			break;
		}
		case 'part-swap':
			parts.push(
				Array.isArray(payload.replaced) ? `replaced ${payload.replaced.join(', ')}` : undefined,
				str(payload.description),
				note
			);
			break;
		case 'hold':
			parts.push(str(payload.reason));
			break;
		case 'note':
			parts.push(str(payload.text));
			break;
		default:
			parts.push(note);
	}
	return parts.filter(Boolean).join(' · ');
}
