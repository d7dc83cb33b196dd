import { describe, expect, it } from 'vitest';
import {
	describeEvent,
	describeReading,
	mergeHistory,
	type DeviceEvent,
	type ServerEvent
} from './event-history';

const server = (id: string, at: string, kind = 'reseat'): ServerEvent => ({
	id,
	kind,
	occurredAt: at,
	payload: { cycles: 1 },
	user: { name: 'Olga' }
});
const device = (id: string, at: string, state: DeviceEvent['state'] = 'waiting'): DeviceEvent => ({
	id,
	kind: 'reseat',
	occurredAt: at,
	payload: { cycles: 1 },
	state
});

describe('mergeHistory', () => {
	it('interleaves outbox entries with the server history, newest first', () => {
		const rows = mergeHistory(
			[server('s1', '2026-03-01T08:00:00Z'), server('s2', '2026-03-01T10:00:00Z')],
			[device('d1', '2026-03-01T09:00:00Z'), device('d2', '2026-03-01T11:00:00Z', 'rejected')],
			10
		);
		expect(rows.map((r) => [r.id, r.origin])).toEqual([
			['d2', 'device'],
			['s2', 'server'],
			['d1', 'device'],
			['s1', 'server']
		]);
	});

	it('shows an event the server already has once, as the server’s', () => {
		const rows = mergeHistory(
			[server('same', '2026-03-01T08:00:00Z')],
			[device('same', '2026-03-01T08:00:00Z', 'sending')],
			10
		);
		expect(rows).toHaveLength(1);
		expect(rows[0].origin).toBe('server');
	});

	it('keeps every outbox entry but only the newest `limit` server events', () => {
		const many = Array.from({ length: 8 }, (_, i) =>
			server(`s${i}`, new Date(Date.UTC(2026, 0, 1, i)).toISOString())
		);
		const waiting = Array.from({ length: 4 }, (_, i) =>
			device(`d${i}`, new Date(Date.UTC(2025, 0, 1, i)).toISOString())
		);
		const rows = mergeHistory(many, waiting, 3);
		expect(rows.filter((r) => r.origin === 'server').map((r) => r.id)).toEqual(['s7', 's6', 's5']);
		expect(rows.filter((r) => r.origin === 'device')).toHaveLength(4);
	});

	it('orders events of the same instant by id, newest id first, as the server does', () => {
		const at = '2026-03-01T08:00:00.000Z';
		const rows = mergeHistory([server('a', at)], [device('b', at)], 10);
		expect(rows.map((r) => r.id)).toEqual(['b', 'a']);
	});
});

describe('describeEvent', () => {
	it('summarises a reseat with and without readings', () => {
		expect(describeEvent('reseat', { cycles: 1 })).toBe('1 cycle');
		expect(describeEvent('reseat', { cycles: 5, readings: { dx: 0.4, dz: -0.1 } })).toBe(
			'5 cycles · dx 0.4 µm, dz −0.1 µm'
		);
	});

	it('summarises a cleaning, a hold and a note', () => {
		expect(
			describeEvent('cleaning', { method: 'solvent-wipe', relubricated: true, lubricant: 'oil' })
		).toBe('solvent wipe · relubricated (oil)');
		expect(describeEvent('hold', { reason: 'Scored vee' })).toBe('Scored vee');
		expect(describeEvent('note', { text: 'Chip under ball 2' })).toBe('Chip under ball 2');
	});

	it('ignores fields of the wrong type instead of failing', () => {
		expect(describeEvent('reseat', { cycles: 'x', readings: 'y' })).toBe('1 cycle');
		expect(describeReading({ dx: 'a' })).toBeUndefined();
	});
});
