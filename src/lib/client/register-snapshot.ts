/**
 * The device's copy of the register, so a scanned code resolves and the fixture card opens with
 * no network. Refreshed from `GET /api/register-snapshot` with an ETag, so an unchanged register
 * costs one 304.
 */
import { normaliseFixtureCode } from '$lib/domain/fixture-code';
import type { SnapshotFixture, SnapshotWorkOrder } from '$lib/schemas/register-snapshot';
import { clientDb, getMeta, setMeta } from './db';

export type { SnapshotFixture, SnapshotWorkOrder } from '$lib/schemas/register-snapshot';

/**
 * The stored register entry for `code` (any spelling a person or scanner gives: case, dashes,
 * with or without `NM-`), or undefined when the code is unknown on this device or malformed.
 */
export async function findFixture(code: string): Promise<SnapshotFixture | undefined> {
	const reading = normaliseFixtureCode(code);
	const key = reading.ok ? reading.code : code.trim().toUpperCase();
	return (await clientDb()).get('snapshot', key);
}

/** How many fixtures the device holds, and when the copy was last confirmed current. */
export async function snapshotInfo(): Promise<{ count: number; checkedAt: string | undefined }> {
	const db = await clientDb();
	const [count, checkedAt] = await Promise.all([
		db.count('snapshot'),
		getMeta('snapshotCheckedAt')
	]);
	return { count, checkedAt };
}

/** Outcome of a refresh: replaced, unchanged (304), or not possible right now. */
export type RefreshResult =
	| { status: 'updated'; count: number }
	| { status: 'unchanged' }
	| { status: 'signed-out' }
	| { status: 'offline' }
	| { status: 'failed'; error: string };

/** Fetches the register if it changed since the stored copy, and replaces the copy in one transaction. */
export async function refreshSnapshot(fetcher: typeof fetch = fetch): Promise<RefreshResult> {
	const etag = await getMeta('snapshotEtag');
	let res: Response;
	try {
		res = await fetcher('/api/register-snapshot', {
			headers: etag
				? { 'If-None-Match': etag, Accept: 'application/json' }
				: { Accept: 'application/json' },
			cache: 'no-cache'
		});
	} catch {
		return { status: 'offline' };
	}
	if (res.status === 304) {
		await setMeta('snapshotCheckedAt', new Date().toISOString());
		return { status: 'unchanged' };
	}
	if (res.status === 401) return { status: 'signed-out' };
	if (!res.ok) return { status: 'failed', error: `The server answered ${res.status}.` };
	// zod is loaded only here, so pages that merely look codes up (the scanner) stay small.
	const { registerSnapshotSchema } = await import('$lib/schemas/register-snapshot');
	const parsed = registerSnapshotSchema.safeParse(await res.json());
	if (!parsed.success) return { status: 'failed', error: 'The register copy was not readable.' };
	const { fixtures, workOrders, workOrdersFor } = parsed.data;
	await storeSnapshot(
		fixtures,
		res.headers.get('ETag') ?? parsed.data.version,
		workOrdersFor ? { userId: workOrdersFor, orders: workOrders ?? [] } : undefined
	);
	return { status: 'updated', count: parsed.data.fixtures.length };
}

/** The work orders a register copy carries, and whose they are. */
export interface StoredWorkOrders {
	userId: string;
	orders: SnapshotWorkOrder[];
}

/**
 * The open work orders stored with the register copy for `userId`: empty when the copy was made
 * for someone else (another person signed in on this phone) or before work orders existed.
 */
export async function myWorkOrders(userId: string): Promise<{
	orders: SnapshotWorkOrder[];
	checkedAt: string | undefined;
}> {
	const [raw, checkedAt] = await Promise.all([
		getMeta('myWorkOrders'),
		getMeta('snapshotCheckedAt')
	]);
	let stored: StoredWorkOrders | null;
	try {
		stored = raw ? (JSON.parse(raw) as StoredWorkOrders) : null;
	} catch {
		stored = null;
	}
	return {
		orders: stored && stored.userId === userId && Array.isArray(stored.orders) ? stored.orders : [],
		checkedAt
	};
}

/**
 * Replaces the stored register with `fixtures` (one transaction: never half old, half new), and
 * the work orders with `workOrders` (an answer without them leaves none stored).
 */
export async function storeSnapshot(
	fixtures: SnapshotFixture[],
	etag: string,
	workOrders?: StoredWorkOrders
): Promise<void> {
	const db = await clientDb();
	const tx = db.transaction(['snapshot', 'meta'], 'readwrite');
	const store = tx.objectStore('snapshot');
	await store.clear();
	await Promise.all(fixtures.map((f) => store.put(f)));
	const meta = tx.objectStore('meta');
	await meta.put(etag, 'snapshotEtag');
	await meta.put(new Date().toISOString(), 'snapshotCheckedAt');
	if (workOrders) await meta.put(JSON.stringify(workOrders), 'myWorkOrders');
	else await meta.delete('myWorkOrders');
	await tx.done;
}

/** Updates one fixture in the stored copy (the card saw fresher data from the server). */
export async function putSnapshotFixture(fixture: SnapshotFixture): Promise<void> {
	await (await clientDb()).put('snapshot', fixture);
}

/** Every fixture the device holds (for lists built on the phone, such as what is due). */
export async function allFixtures(): Promise<SnapshotFixture[]> {
	return (await clientDb()).getAll('snapshot');
}
