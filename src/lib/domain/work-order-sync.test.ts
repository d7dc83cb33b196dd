import { describe, expect, it } from 'vitest';
import { planOrderChanges, type OrderAtSync } from './work-order-sync';

// The rules under test are Nestmark's own (issue 12); values are computed by hand.
const order = (o: Partial<OrderAtSync> = {}): OrderAtSync => ({
	id: 7,
	fixtureId: 1,
	action: 'replace-balls',
	status: 'scheduled',
	startedAt: null,
	completedAt: null,
	...o
});
const orders = (...list: OrderAtSync[]) => new Map(list.map((o) => [o.id, o]));
const T1 = '2026-01-01T08:00:00.000Z';
const T2 = '2026-01-01T09:00:00.000Z';

describe('planOrderChanges', () => {
	it('completes with the completing kind and records the change', () => {
		const [c] = planOrderChanges(orders(order()), [
			{ id: 'a', kind: 'part-swap', occurredAt: T1, workOrderId: 7 }
		]);
		expect(c).toEqual({
			orderId: 7,
			eventId: 'a',
			what: 'done',
			status: 'done',
			startedAt: null,
			completedAt: T1,
			changes: { status: ['scheduled', 'done'], completedAt: [null, T1] }
		});
	});

	it('starts with any other kind, then completes, in the order the events happened', () => {
		const changes = planOrderChanges(orders(order()), [
			{ id: 'b', kind: 'part-swap', occurredAt: T2, workOrderId: 7 },
			{ id: 'a', kind: 'note', occurredAt: T1, workOrderId: 7 }
		]);
		expect(changes.map((c) => [c.what, c.eventId, c.status])).toEqual([
			['started', 'a', 'underway'],
			['done', 'b', 'done']
		]);
		expect(changes[1].startedAt).toBe(T1);
	});

	it('a second note on an order under way changes nothing', () => {
		const changes = planOrderChanges(orders(order({ status: 'underway', startedAt: T1 })), [
			{ id: 'c', kind: 'note', occurredAt: T2, workOrderId: 7 }
		]);
		expect(changes).toEqual([]);
	});

	it('records work on a cancelled order once, and leaves it cancelled', () => {
		const changes = planOrderChanges(orders(order({ status: 'cancelled' })), [
			{ id: 'a', kind: 'part-swap', occurredAt: T1, workOrderId: 7 },
			{ id: 'b', kind: 'part-swap', occurredAt: T2, workOrderId: 7 },
			{ id: 'c', kind: 'note', occurredAt: T2, workOrderId: 7 }
		]);
		expect(changes.map((c) => [c.what, c.eventId, c.status, c.completedAt])).toEqual([
			['done-after-cancel', 'a', 'cancelled', T1]
		]);
	});

	it('leaves a done order alone and skips orders it was not given', () => {
		expect(
			planOrderChanges(orders(order({ status: 'done', completedAt: T1 })), [
				{ id: 'a', kind: 'part-swap', occurredAt: T2, workOrderId: 7 },
				{ id: 'b', kind: 'part-swap', occurredAt: T2, workOrderId: 8 }
			])
		).toEqual([]);
	});
});
