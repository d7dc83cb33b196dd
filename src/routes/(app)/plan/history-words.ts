/** The words of a work order's history rows: what happened, and each change as before → after. */
import { ACTION_LABELS, STATUS_LABELS } from '$lib/schemas/plan';
import type { WorkOrderAction, WorkOrderStatus } from '$lib/schemas/work-orders';

const WHAT: Record<string, string> = {
	created: 'Created',
	changed: 'Changed',
	started: 'Started',
	done: 'Marked done',
	cancelled: 'Cancelled',
	'done-after-cancel': 'Work recorded after it was cancelled',
	'flag-linked': 'A flag was linked'
};

const FIELD: Record<string, string> = {
	dueOn: 'Due',
	assigneeEmail: 'Assignee',
	assignee: 'Assignee',
	status: 'Status',
	notes: 'Notes',
	parts: 'Parts',
	cancelReason: 'Reason for cancelling',
	action: 'Action',
	actionText: 'Work',
	fixtureCode: 'Fixture',
	flagId: 'Flag',
	flags: 'Flags'
};

/** What a history row's `what` says in words. */
export function whatWords(what: string): string {
	return WHAT[what] ?? what.charAt(0).toUpperCase() + what.slice(1).replace(/-/g, ' ');
}

/** A field's name in words. */
export function fieldWords(field: string): string {
	return FIELD[field] ?? field;
}

/** One value of a change, in words. */
export function valueWords(field: string, v: unknown): string {
	if (v === null || v === undefined || v === '') return 'none';
	if (field === 'status' && typeof v === 'string' && v in STATUS_LABELS)
		return STATUS_LABELS[v as WorkOrderStatus];
	if (field === 'action' && typeof v === 'string' && v in ACTION_LABELS)
		return ACTION_LABELS[v as WorkOrderAction];
	if (Array.isArray(v)) {
		if (field === 'parts')
			return v.length === 0
				? 'none'
				: v
						.map(
							(p: { description?: string; quantity?: number }) =>
								`${p.quantity ?? 1} × ${p.description ?? 'part'}`
						)
						.join('; ');
		return v.map(String).join(', ');
	}
	if (typeof v === 'object') return JSON.stringify(v);
	return String(v);
}
