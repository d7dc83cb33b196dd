/**
 * Work orders as iCalendar (RFC 5545), built with ical-generator: one VEVENT per order, all-day on
 * its due date. The feeds (`/api/feeds/...`) and the notices' .ics attachments (METHOD:REQUEST or
 * CANCEL, RFC 5546) both come from here, so a calendar app sees the same event either way.
 */
import ical, { ICalCalendarMethod, ICalEventStatus } from 'ical-generator';
import { ACTION_LABELS } from '../schemas/plan';
import type { WorkOrderView } from '../schemas/work-orders';
import type { IcsMethod } from '../domain/mail';
import { count, inArray } from 'drizzle-orm';
import { db, type Db } from './db';
import { workOrderHistory } from './db/schema';
import { workOrderViews } from './work-order-reads';

/** An order as the calendar shows it; `sequence` grows with every change (its history rows − 1). */
export type IcsOrder = WorkOrderView & { sequence: number };

/** The product identifier every calendar names (RFC 5545 §3.7.3). */
const PROD_ID = { company: 'Nestmark', product: 'Work orders', language: 'EN' };

/** A stable UID: the same order keeps it when it moves, across feeds and mails. */
export function workOrderUid(id: number, origin: string): string {
	return `work-order-${id}@${new URL(origin).hostname}`;
}

export function workOrderUrl(id: number, origin: string): string {
	return new URL(`/plan/${id}`, origin).href;
}

/** "Replace balls and seats · TS-A4K2 Transmission sphere mount" (the action, then the fixture). */
export function workOrderSummary(
	o: Pick<IcsOrder, 'action' | 'actionText' | 'fixtureCode' | 'fixtureName'>
): string {
	const action = o.action === 'other' && o.actionText ? o.actionText : ACTION_LABELS[o.action];
	return `${action} · ${o.fixtureCode} ${o.fixtureName}`;
}

/** The order's facts in plain text: parts, notes, the flags' reasons, status. */
export function workOrderDescription(o: IcsOrder): string {
	const lines: string[] = [];
	if (o.assigneeName) lines.push(`Assigned to: ${o.assigneeName}`);
	if (o.parts.length) {
		lines.push('Parts:');
		for (const p of o.parts) {
			const detail = [p.size, p.material].filter(Boolean).join(', ');
			lines.push(`- ${p.quantity} × ${p.description}${detail ? ` (${detail})` : ''}`);
		}
	}
	const reasons = o.flags.map((f) => f.reason).filter(Boolean);
	if (reasons.length) lines.push(`Why: ${reasons.join('; ')}`);
	if (o.notes) lines.push(`Notes: ${o.notes}`);
	if (o.status === 'cancelled' && o.cancelReason) lines.push(`Cancelled: ${o.cancelReason}`);
	return lines.join('\n');
}

/**
 * Views of these orders with their SEQUENCE: the number of changes after the one that created the
 * order (history is append-only, so it only grows). Three statements whatever the number of ids.
 */
export async function icsOrders(ids: number[], q: Db = db): Promise<IcsOrder[]> {
	if (!ids.length) return [];
	const [views, counts] = await Promise.all([
		workOrderViews(ids, q),
		q
			.select({ id: workOrderHistory.workOrderId, n: count() })
			.from(workOrderHistory)
			.where(inArray(workOrderHistory.workOrderId, ids))
			.groupBy(workOrderHistory.workOrderId)
	]);
	const changes = new Map(counts.map((c) => [c.id, c.n]));
	return views.map((v) => ({ ...v, sequence: Math.max(0, (changes.get(v.id) ?? 1) - 1) }));
}

const DAY_MS = 86_400_000;

/**
 * A calendar of these orders. Orders without a due date have no place on a calendar and are left
 * out. With `method`, the calendar is an iTIP message (a notice's attachment).
 */
export function workOrderCalendar(
	orders: IcsOrder[],
	options: {
		name: string;
		origin: string;
		method?: IcsMethod;
		now?: Date;
		/** Who sends an iTIP message (RFC 5546 wants ORGANIZER and ATTENDEE on REQUEST and CANCEL). */
		organizer?: { name: string; email: string };
	}
): string {
	const cal = ical({ name: options.name, prodId: PROD_ID });
	if (options.method) {
		cal.method(
			options.method === 'CANCEL' ? ICalCalendarMethod.CANCEL : ICalCalendarMethod.REQUEST
		);
	}
	for (const o of orders) {
		if (!o.dueOn) continue;
		const start = new Date(`${o.dueOn}T00:00:00Z`);
		const cancelled = o.status === 'cancelled' || options.method === 'CANCEL';
		cal.createEvent({
			id: workOrderUid(o.id, options.origin),
			sequence: o.sequence,
			stamp: options.now ?? new Date(o.updatedAt),
			start,
			end: new Date(start.getTime() + DAY_MS),
			allDay: true,
			summary: workOrderSummary(o),
			location: o.place,
			description: workOrderDescription(o),
			url: workOrderUrl(o.id, options.origin),
			status: cancelled ? ICalEventStatus.CANCELLED : ICalEventStatus.CONFIRMED,
			...(options.method && options.organizer ? { organizer: options.organizer } : {}),
			...(options.method && o.assigneeEmail
				? { attendees: [{ email: o.assigneeEmail, name: o.assigneeName ?? undefined }] }
				: {})
		});
	}
	return cal.toString();
}
