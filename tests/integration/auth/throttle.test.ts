import { eq } from 'drizzle-orm';
import { afterAll, beforeEach, describe, expect, it } from 'vitest';
import { checkPasswordSignIn } from '$lib/server/password-sign-in';
import {
	ACCOUNT_DELAY,
	accountKey,
	ADDRESS_LIMIT,
	admission,
	countLinkRequest,
	LINK_ACCOUNT_LIMIT,
	LINK_ADDRESS_LIMIT,
	minutesLocked,
	PAIR_LIMIT,
	pairKey,
	recordFailure,
	recordSuccess
} from '$lib/server/throttle';
import { hashPassword } from '$lib/server/users';
import { closeDb, db, makeUser, resetDb, schema } from '../helpers/db';

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

// Until issue 9 the lock was per account from any address, so anyone could lock anyone out by
// typing their address five times. The lock is now per (account, address) pair; the account as
// a whole only gets a delay (below).
describe('per account and address', () => {
	it(`locks the pair after ${PAIR_LIMIT.failures} failures for ${PAIR_LIMIT.lockMs / 60_000} minutes`, async () => {
		const a = attempt('ola@example.test');
		expect(await fail(PAIR_LIMIT.failures - 1, a)).toBe(0);
		expect(await minutesLocked(a, t0)).toBe(0);
		expect(await recordFailure(a, t0)).toBe(15);
		expect(await minutesLocked(a, t0)).toBe(15);
		expect(await minutesLocked(a, at(14.5))).toBe(1);
		expect(await minutesLocked(a, at(15))).toBe(0);
		// The same account from another address is not locked: nobody locks out its owner.
		expect(await minutesLocked(attempt('ola@example.test', '10.9.9.9'), at(1))).toBe(0);
	});

	it('forgets failures once the window has passed', async () => {
		const a = attempt('window@example.test');
		await fail(PAIR_LIMIT.failures - 1, a, t0);
		expect(await recordFailure(a, at(16))).toBe(0);
		const [row] = await db
			.select()
			.from(schema.signInThrottle)
			.where(eq(schema.signInThrottle.key, pairKey(a)));
		expect(row.failures).toBe(1);
	});

	it('a success clears the pair count but not the address or account counts', async () => {
		const a = attempt('fine@example.test', '10.1.1.1');
		await fail(PAIR_LIMIT.failures - 1, a);
		await recordSuccess(a);
		expect(await recordFailure(a, t0)).toBe(0); // a fresh count of 1
		const rows = await db.select().from(schema.signInThrottle);
		const byKey = Object.fromEntries(rows.map((r) => [r.key, r.failures]));
		expect(byKey[pairKey(a)]).toBe(1);
		expect(byKey['addr:10.1.1.1']).toBe(PAIR_LIMIT.failures);
		expect(byKey[accountKey(a.email)]).toBe(PAIR_LIMIT.failures);
	});

	it('counts concurrent failures without losing any', async () => {
		const a = attempt('burst@example.test');
		await Promise.all(Array.from({ length: PAIR_LIMIT.failures }, () => recordFailure(a, t0)));
		expect(await minutesLocked(a, t0)).toBe(15);
	});
});

describe('per account from everywhere', () => {
	const spread = (email: string, i: number) => attempt(email, `198.51.100.${i}`);

	it(`delays rather than locks after ${ACCOUNT_DELAY.freeFailures} failures from many addresses`, async () => {
		const email = 'spread@example.test';
		for (let i = 0; i < ACCOUNT_DELAY.freeFailures - 1; i++) {
			await recordFailure(spread(email, i), t0);
			expect(await admission(spread(email, 200), t0)).toEqual({ kind: 'open' });
		}
		await recordFailure(spread(email, 99), t0);
		// One second after the last failure, from anywhere — then open again.
		expect(await admission(spread(email, 200), t0)).toEqual({ kind: 'wait', seconds: 1 });
		expect(await admission(spread(email, 200), new Date(t0.getTime() + 1000))).toEqual({
			kind: 'open'
		});
		// Each further failure doubles the wait, up to the cap.
		const t1 = new Date(t0.getTime() + 1000);
		await recordFailure(spread(email, 98), t1);
		expect(await admission(spread(email, 200), t1)).toEqual({ kind: 'wait', seconds: 2 });
		for (let i = 0; i < 10; i++) await recordFailure(spread(email, 50 + i), t1);
		expect(await admission(spread(email, 200), t1)).toEqual({
			kind: 'wait',
			seconds: ACCOUNT_DELAY.maxDelayMs / 1000
		});
		// Never a lock: a minute later the owner may try again.
		expect(await minutesLocked(spread(email, 200), t1)).toBe(0);
		expect(await admission(spread(email, 200), new Date(t1.getTime() + 60_000))).toEqual({
			kind: 'open'
		});
	});
});

describe('password sign-in', () => {
	async function person(password: string) {
		const u = await makeUser({ roles: ['technician'] });
		await db
			.update(schema.users)
			.set({ passwordHash: await hashPassword(password) })
			.where(eq(schema.users.id, u.id));
		return u;
	}

	it('locks the pair, while the owner elsewhere still signs in with the right password', async () => {
		const u = await person('right-password-1');
		const guesser = '203.0.113.9';
		for (let i = 0; i < PAIR_LIMIT.failures - 1; i++) {
			expect(
				await checkPasswordSignIn({ email: u.email, password: `guess-${i}` }, guesser)
			).toEqual({ ok: false, code: 'wrong' });
		}
		expect(await checkPasswordSignIn({ email: u.email, password: 'guess-x' }, guesser)).toEqual({
			ok: false,
			code: 'locked-15'
		});
		// Even the right password waits out the lock from the guesser's address ...
		expect(
			await checkPasswordSignIn({ email: u.email, password: 'right-password-1' }, guesser)
		).toEqual({ ok: false, code: 'locked-15' });
		// ... but its owner, somewhere else, is let in.
		const owner = await checkPasswordSignIn(
			{ email: u.email, password: 'right-password-1' },
			'192.0.2.44'
		);
		expect(owner).toMatchObject({ ok: true, user: { id: u.id } });
	});

	it('the account-wide delay says how long to wait, then lets the right password in', async () => {
		const u = await person('right-password-2');
		const now = new Date();
		for (let i = 0; i < ACCOUNT_DELAY.freeFailures; i++) {
			const r = await checkPasswordSignIn(
				{ email: u.email, password: `guess-${i}` },
				`198.51.100.${i}`,
				now
			);
			expect(r).toEqual({ ok: false, code: 'wrong' });
		}
		const right = { email: u.email, password: 'right-password-2' };
		expect(await checkPasswordSignIn(right, '192.0.2.45', now)).toEqual({
			ok: false,
			code: 'wait-1'
		});
		const later = new Date(now.getTime() + ACCOUNT_DELAY.firstDelayMs);
		expect(await checkPasswordSignIn(right, '192.0.2.45', later)).toMatchObject({ ok: true });
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
