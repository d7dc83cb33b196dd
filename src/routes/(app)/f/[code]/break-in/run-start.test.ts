import { describe, expect, it } from 'vitest';
import type { OutboxEntry } from '$lib/client/outbox';
import { DEFAULT_POLICY } from '$lib/domain/policy';
import type { SnapshotFixture } from '$lib/schemas/register-snapshot';
import { runStart } from './run-start';

const rule = { ...DEFAULT_POLICY, breakInMinCycles: 25 };
const fixture = (over: Partial<SnapshotFixture> = {}): SnapshotFixture => ({
	code: 'NM-TEST',
	name: 'Test pallet',
	type: 'pallet',
	status: 'breaking-in',
	location: { site: 'S', area: 'A', name: 'L' },
	flags: [],
	mass_kg: null,
	policy: {
		...rule,
		cleaningIntervalCycles: null,
		cleaningIntervalDays: null,
		inspectionIntervalCycles: null,
		inspectionIntervalDays: null
	},
	state: {
		totalCycles: 0,
		cyclesSinceCleaning: 0,
		cyclesSinceInspection: 0,
		repeatability_um: null,
		lastEventAt: null,
		lastCleaningAt: null,
		lastInspectionAt: null
	},
	breakIn: {
		required: true,
		reason: 'new',
		cycles: 4,
		acc: [0, 0, 0, 0, 0, 0, 0, 0, 0, 0],
		windows: [],
		rule: {
			repeatabilitySpec_um: rule.repeatabilitySpec_um,
			breakInMinCycles: 25,
			settleWindow: rule.settleWindow,
			settleTolerance_um: rule.settleTolerance_um
		}
	},
	updatedAt: '2025-01-01T00:00:00.000Z',
	...over
});
const entry = (kind: string, payload: Record<string, unknown>, state = 'waiting'): OutboxEntry =>
	({
		id: `${kind}-${state}`,
		fixtureCode: 'NM-TEST',
		kind,
		occurredAt: '2025-01-02T00:00:00.000Z',
		payload,
		state,
		createdAt: '2025-01-02T00:00:00.000Z',
		attempts: 0
	}) as OutboxEntry;

describe('runStart', () => {
	it('continues the server’s progress with the device’s unsent entries, not rejected ones', () => {
		const s = runStart(fixture(), [
			entry('break-in', { cycles: 6, readings: [] }),
			entry('reseat', { cycles: 100 }, 'rejected')
		]);
		expect(s.known).toBe(true);
		expect(s.rule.breakInMinCycles).toBe(25);
		expect(s.progress).toMatchObject({ required: true, cycles: 10 });
	});

	it('falls back to the policy figures and a fresh count with an older register copy', () => {
		const s = runStart(fixture({ breakIn: undefined }), []);
		expect(s.known).toBe(false);
		expect(s.rule).toEqual({
			repeatabilitySpec_um: 1,
			breakInMinCycles: 25,
			settleWindow: DEFAULT_POLICY.settleWindow,
			settleTolerance_um: DEFAULT_POLICY.settleTolerance_um
		});
		expect(s.progress).toMatchObject({ required: true, cycles: 0 });
		const inService = runStart(fixture({ breakIn: undefined, status: 'in-service' }), []);
		expect(inService.progress.required).toBe(false);
	});

	it('judges without an entry the fold cannot read', () => {
		const s = runStart(fixture(), [entry('break-in', { cycles: 0 })]);
		expect(s.progress.cycles).toBe(4);
	});
});
