/**
 * Shared by the fold and flag-rule tests: a small policy and a builder of event histories.
 * Not a test file itself (no vitest imports), so it can be imported by both.
 */
import type { FixtureEvent } from './events';
import type { Flag } from './flag-rules';
import { DEFAULT_POLICY, type Policy } from './policy';

// Small windows keep the scenarios short; the rules are the same at any size.
export const policy: Policy = {
	...DEFAULT_POLICY,
	repeatabilitySpec_um: 1,
	repeatabilityWindow: 5,
	breakInMinCycles: 10,
	settleWindow: 5,
	settleTolerance_um: 0.1,
	cleaningIntervalCycles: 100,
	cleaningIntervalDays: 30,
	inspectionIntervalCycles: 400,
	inspectionIntervalDays: 90,
	ratedLifeCycles: null,
	wearLimitGrade: 3,
	forecastHorizonCycles: 200
};

export const T0 = Date.parse('2025-01-06T08:00:00.000Z');
const HOUR = 3_600_000;

/** A history builder: events an hour apart with ids in order. */
export function history() {
	const events: FixtureEvent[] = [];
	let n = 0;
	const at = () => new Date(T0 + n * HOUR).toISOString();
	const add = (e: Omit<FixtureEvent, 'id' | 'occurredAt'>) => {
		const full = { id: `ev-${String(n).padStart(6, '0')}`, occurredAt: at(), ...e } as FixtureEvent;
		n++;
		events.push(full);
		return full;
	};
	return {
		events,
		/** Time of the next event (ms). */
		now: () => T0 + n * HOUR,
		reseat: (cycles = 1, readings?: { dx?: number; dy?: number; dz?: number }) =>
			add({ kind: 'reseat', payload: readings ? { cycles, readings } : { cycles } }),
		breakIn: (cycles: number, readings: { dx?: number; dy?: number; dz?: number }[] = []) =>
			add({ kind: 'break-in', payload: { cycles, readings } }),
		cleaning: (relubricated = false) =>
			add({
				kind: 'cleaning',
				payload: relubricated
					? { method: 'solvent-wipe', relubricated, lubricant: 'instrument oil' }
					: { method: 'dry-wipe', relubricated }
			}),
		inspection: (grades: number[], verdict: 'serviceable' | 'watch' | 'replace' = 'serviceable') =>
			add({
				kind: 'inspection',
				payload: {
					contacts: grades.map((grade, i) => ({
						contact: `ball ${i + 1}`,
						grade,
						marks: grade >= 2 ? ['fretting'] : []
					})),
					verdict
				}
			}),
		partSwap: (replaced: ('balls' | 'seats' | 'preload' | 'whole-fixture')[]) =>
			add({ kind: 'part-swap', payload: { replaced } }),
		hold: (reason: string) => add({ kind: 'hold', payload: { reason } }),
		release: () => add({ kind: 'release', payload: {} }),
		move: () => add({ kind: 'move', payload: { locationId: 'bay-2' } }),
		note: (text: string) => add({ kind: 'note', payload: { text } })
	};
}

export const settled = [0, 0.2, 0.1, 0, 0.2]; // s = 0.1, R = 0.4 µm
export const xs = (values: number[]) => values.map((dx) => ({ dx }));
export const kinds = (flags: Flag[]) => flags.map((f) => f.kind);
export const flag = (flags: Flag[], kind: Flag['kind']) => flags.find((f) => f.kind === kind);

/** A history with a completed break-in (cycle 10, two settling windows of R 0.4 µm). */
export function brokenIn() {
	const h = history();
	h.breakIn(10, xs([...settled, ...settled]));
	return h;
}
