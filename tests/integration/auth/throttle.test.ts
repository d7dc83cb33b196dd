import { eq } from 'drizzle-orm';
import { afterAll, beforeEach, describe, expect, it } from 'vitest';
import {
	accountKey,
	ACCOUNT_LIMIT,
	ADDRESS_LIMIT,
	countLinkRequest,
	LINK_ACCOUNT_LIMIT,
	LINK_ADDRESS_LIMIT,
	minutesLocked,
	recordFailure,
	recordSuccess
} from '$lib/server/throttle';
import { closeDb, db, resetDb, schema } from '../helpers/db';

beforeEach(resetDb);
afterAll(closeDb);

// Near the real clock: a successful sign-in also prunes rows older than the window.
const t0 = new Date();
const at = (minutes: number) => new Date(t0.getTime() + minutes * 60_000);
const attempt = (email: string, address = '10.0.0.7') => ({ email, address });

async function fail(times: number, a: { email: string; address: string }, when = t0) {
	let lock = 0;
	for (let i = 0; i < times; i++) lock = await recordFailure(a, when);
	return lock;
}

describe('per account', () => {
	it(`locks after ${ACCOUNT_LIMIT.failures} failures for ${ACCOUNT_LIMIT.lockMs / 60_000} minutes`, async () => {
		const a = attempt('ola@example.test');
		expect(await fail(ACCOUNT_LIMIT.failures - 1, a)).toBe(0);
		expect(await minutesLocked(a, t0)).toBe(0);
		expect(await recordFailure(a, t0)).toBe(15);
		expect(await minutesLocked(a, t0)).toBe(15);
		expect(await minutesLocked(a, at(14.5))).toBe(1);
		expect(await minutesLocked(a, at(15))).toBe(0);
		// The same account from another address is locked too: the limit is per account.
		expect(await minutesLocked(attempt('ola@example.test', '10.9.9.9'), at(1))).toBe(14);
	});

	it('forgets failures once the window has passed', async () => {
		const a = attempt('window@example.test');
		await fail(ACCOUNT_LIMIT.failures - 1, a, t0);
		expect(await recordFailure(a, at(16))).toBe(0);
		const [row] = await db
			.select()
			.from(schema.signInThrottle)
			.where(eq(schema.signInThrottle.key, accountKey(a.email)));
		expect(row.failures).toBe(1);
	});

	it('a success clears the account count but not the address count', async () => {
		const a = attempt('fine@example.test', '10.1.1.1');
		await fail(ACCOUNT_LIMIT.failures - 1, a);
		await recordSuccess(a);
		expect(await recordFailure(a, t0)).toBe(0); // a fresh count of 1
		const rows = await db.select().from(schema.signInThrottle);
		const byKey = Object.fromEntries(rows.map((r) => [r.key, r.failures]));
		expect(byKey['acct:fine@example.test']).toBe(1);
		expect(byKey['addr:10.1.1.1']).toBe(ACCOUNT_LIMIT.failures);
	});

	it('counts concurrent failures without losing any', async () => {
		const a = attempt('burst@example.test');
		await Promise.all(Array.from({ length: ACCOUNT_LIMIT.failures }, () => recordFailure(a, t0)));
		expect(await minutesLocked(a, t0)).toBe(15);
	});
});

describe('per address', () => {
	it(`locks an address after ${ADDRESS_LIMIT.failures} failures spread over many accounts`, async () => {
		for (let i = 0; i < ADDRESS_LIMIT.failures - 1; i++) {
			expect(await recordFailure(attempt(`guess${i}@example.test`, '192.0.2.5'), t0)).toBe(0);
		}
		expect(await recordFailure(attempt('guess-last@example.test', '192.0.2.5'), t0)).toBe(15);
		// Any account from that address waits; the same account elsewhere does not.
		expect(await minutesLocked(attempt('innocent@example.test', '192.0.2.5'), t0)).toBe(15);
		expect(await minutesLocked(attempt('innocent@example.test', '192.0.2.6'), t0)).toBe(0);
	});
});

describe('sign-in link requests', () => {
	it(`send ${LINK_ACCOUNT_LIMIT.failures} links per address typed, then ask to wait`, async () => {
		const a = attempt('inbox@example.test', '10.2.2.2');
		for (let i = 0; i < LINK_ACCOUNT_LIMIT.failures; i++) {
			expect(await countLinkRequest(a, t0)).toBe(0);
		}
		expect(await countLinkRequest(a, at(1))).toBe(14);
		// Another address typed from the same place is counted on its own.
		expect(await countLinkRequest(attempt('other@example.test', '10.2.2.2'), at(1))).toBe(0);
		// Once the lock is over, links may be asked for again.
		expect(await countLinkRequest(a, at(16))).toBe(0);
	});

	it(`stop one network address after ${LINK_ADDRESS_LIMIT.failures} requests, whatever the addresses typed`, async () => {
		for (let i = 0; i < LINK_ADDRESS_LIMIT.failures; i++) {
			expect(await countLinkRequest(attempt(`n${i}@example.test`, '10.3.3.3'), t0)).toBe(0);
		}
		expect(await countLinkRequest(attempt('next@example.test', '10.3.3.3'), t0)).toBe(15);
		expect(await countLinkRequest(attempt('next@example.test', '10.4.4.4'), t0)).toBe(0);
	});

	it('are counted apart from password failures', async () => {
		const a = attempt('both@example.test', '10.5.5.5');
		for (let i = 0; i < LINK_ACCOUNT_LIMIT.failures; i++) await countLinkRequest(a, t0);
		expect(await minutesLocked(a, t0)).toBe(0);
	});
});
