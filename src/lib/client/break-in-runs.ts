/**
 * Break-in runs in progress on this device, one per fixture, in IndexedDB. The page saves the run
 * after every tap, so closing the app or losing the network loses nothing; finishing writes the
 * run's one event to the outbox and removes the run in the same transaction (see finishRun).
 */
import { runPayload, type RunCycle } from '$lib/domain/break-in-run';
import { clientDb, type BreakInRunRecord } from './db';
import { getDeviceId } from './device-id';
import type { AddResult, NewEvent, Replaces } from './outbox';

export type { BreakInRunRecord } from './db';

/** The run saved for `code` on this device, if any. */
export async function getRun(code: string): Promise<BreakInRunRecord | undefined> {
	const run = await (await clientDb()).get('breakInRuns', code);
	// A copied profile could carry another device's run; it is not this device's to continue.
	return run && run.deviceId === (await getDeviceId()) ? run : undefined;
}

/** A new, empty run on `code`, saved at once. */
export async function startRun(code: string, startedBy?: string): Promise<BreakInRunRecord> {
	const now = new Date().toISOString();
	const run: BreakInRunRecord = {
		fixtureCode: code,
		deviceId: await getDeviceId(),
		startedAt: now,
		updatedAt: now,
		cycles: [],
		note: '',
		...(startedBy ? { startedBy } : {})
	};
	await (await clientDb()).put('breakInRuns', run);
	return run;
}

/**
 * Saves the run with new cycles or note; returns what was saved, or null when the run is no longer
 * on the device (finished or discarded meanwhile, e.g. in another tab) — it is never brought back.
 */
export async function saveRun(
	run: BreakInRunRecord,
	change: { cycles?: RunCycle[]; note?: string }
): Promise<BreakInRunRecord | null> {
	const next: BreakInRunRecord = {
		...run,
		cycles: change.cycles ?? run.cycles,
		note: change.note ?? run.note,
		updatedAt: new Date().toISOString()
	};
	const tx = (await clientDb()).transaction('breakInRuns', 'readwrite');
	const still = await tx.store.get(run.fixtureCode);
	// Svelte state proxies cannot be stored: store plain copies.
	if (still) await tx.store.put(JSON.parse(JSON.stringify(next)));
	await tx.done;
	return still ? next : null;
}

/** Drops the run on `code` (the person confirmed). */
export async function discardRun(code: string): Promise<void> {
	await (await clientDb()).delete('breakInRuns', code);
}

/** How a finished run reaches the outbox: the sync engine's log, or the outbox's addEntry. */
export type LogWith = (event: NewEvent, replaces: Replaces) => Promise<AddResult>;

/**
 * Logs the run as one 'break-in' event (cycles, readings oldest first, note) and removes the run
 * in the same transaction: the event is in the outbox and the run gone, or neither.
 */
export function finishRun(run: BreakInRunRecord, log: LogWith): Promise<AddResult> {
	return log(
		{
			fixtureCode: run.fixtureCode,
			kind: 'break-in',
			payload: { ...runPayload(run.cycles, run.note) }
		},
		{ store: 'breakInRuns', key: run.fixtureCode }
	);
}
