/**
 * What `/work` shows, worked out from the device alone (the register copy and the outbox), so the
 * page opens and answers with no network. Pure.
 */
import { COMPLETING_EVENT_KINDS } from '$lib/domain/work-orders';
import { DUE_WORK_KINDS } from '$lib/domain/flag-urgency';
import type { SnapshotFixture, SnapshotWorkOrder } from '$lib/schemas/register-snapshot';
import { dayWords } from '$lib/work-order-links';

/** The part of an outbox entry the list looks at. */
export interface EntryLike {
	id: string;
	kind: string;
	payload: Record<string, unknown>;
	state: 'waiting' | 'sending' | 'rejected';
	error?: string;
}

/** An order's entries on this phone that the server has not taken yet. */
export interface OrderProgress {
	/** A start (note) waits to sync. */
	startWaiting: boolean;
	/** The completing entry waits to sync. */
	doneWaiting: boolean;
	/** Reasons the server gave for refusing this order's entries. */
	refused: string[];
}

/** What this phone's outbox says about `order`. */
export function orderProgress(order: SnapshotWorkOrder, entries: EntryLike[]): OrderProgress {
	const mine = entries.filter((e) => e.payload.workOrderId === order.id);
	const completes = (e: EntryLike) =>
		(COMPLETING_EVENT_KINDS[order.action] as readonly string[]).includes(e.kind);
	const live = mine.filter((e) => e.state !== 'rejected');
	return {
		startWaiting: live.some((e) => !completes(e)),
		doneWaiting: live.some(completes),
		refused: mine.filter((e) => e.state === 'rejected').map((e) => e.error ?? 'Refused')
	};
}

const DAY = 86_400_000;
const daysBetween = (from: string, to: string) =>
	Math.round((Date.parse(`${to}T00:00:00Z`) - Date.parse(`${from}T00:00:00Z`)) / DAY);

/** The due date in words, overdue said in words (never by colour alone). */
export function dueWords(dueOn: string | null, today: string): { text: string; overdue: boolean } {
	if (!dueOn) return { text: 'No due date yet', overdue: false };
	const d = daysBetween(today, dueOn);
	const on = dayWords(dueOn);
	if (d < 0)
		return { text: `Overdue by ${-d} ${d === -1 ? 'day' : 'days'} (due ${on})`, overdue: true };
	if (d === 0) return { text: `Due today (${on})`, overdue: false };
	if (d === 1) return { text: `Due tomorrow (${on})`, overdue: false };
	return { text: `Due in ${d} days (${on})`, overdue: false };
}

/** Today on the phone's own calendar, as YYYY-MM-DD. */
export function localToday(now = new Date()): string {
	const p = (n: number) => String(n).padStart(2, '0');
	return `${now.getFullYear()}-${p(now.getMonth() + 1)}-${p(now.getDate())}`;
}

/** A fixture with routine work due that no open work order answers yet. */
export interface AlsoDue {
	code: string;
	name: string;
	place: string;
	flags: { kind: SnapshotFixture['flags'][number]['kind']; reason: string; raisedAt: string }[];
	oldestRaisedAt: string;
}

/**
 * Fixtures with break-in, inspection or cleaning due and no work order planned for it, the one
 * due longest first (as the old due list ordered them). Retired fixtures are left out.
 */
export function alsoDue(fixtures: SnapshotFixture[], limit = 50): AlsoDue[] {
	const kinds: readonly string[] = DUE_WORK_KINDS;
	const rows: AlsoDue[] = [];
	for (const f of fixtures) {
		if (f.status === 'retired') continue;
		const flags = f.flags.filter((fl) => kinds.includes(fl.kind) && !fl.plannedWork);
		if (!flags.length) continue;
		rows.push({
			code: f.code,
			name: f.name,
			place: [f.location.site, f.location.area, f.location.name].join(' / '),
			flags: flags.map(({ kind, reason, raisedAt }) => ({ kind, reason, raisedAt })),
			oldestRaisedAt: flags.map((fl) => fl.raisedAt).sort()[0]
		});
	}
	rows.sort(
		(a, b) => a.oldestRaisedAt.localeCompare(b.oldestRaisedAt) || a.code.localeCompare(b.code)
	);
	return rows.slice(0, limit);
}
