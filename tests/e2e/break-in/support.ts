import { randomUUID } from 'node:crypto';
import { expect, type APIRequestContext } from '@playwright/test';
import mysql from 'mysql2/promise';
import { createFixture } from '../offline/support';

/**
 * A fixture of the test's own, due for break-in: created, given per-fixture policy overrides,
 * and commissioned with a note synced through the API (the first event starts its state, and a
 * new fixture's break-in requirement raises the flag).
 */
export async function breakInFixture(
	request: APIRequestContext,
	name: string,
	overrides: Record<string, number>,
	options: { mass_kg?: number | null } = {}
): Promise<string> {
	const code = await createFixture(name, { type: 'pallet', ...options });
	const conn = await mysql.createConnection({ uri: process.env.DATABASE_URL! });
	try {
		await conn.query('UPDATE fixtures SET policy_overrides = ? WHERE code = ?', [
			JSON.stringify(overrides),
			code
		]);
	} finally {
		await conn.end();
	}
	const res = await request.post('/api/sync', {
		data: {
			deviceId: 'break-in-test-setup',
			events: [
				{
					id: randomUUID(),
					fixtureCode: code,
					kind: 'note',
					occurredAt: new Date(Date.now() - 60_000).toISOString(),
					payload: { text: 'Commissioned; break-in to follow.' }
				}
			]
		}
	});
	expect(res.status()).toBe(200);
	expect((await res.json()).results[0].status).toBe('accepted');
	return code;
}

/** The fixture's open flag kinds, from GET /api/fixtures/[code]/health. */
export async function openFlagKinds(request: APIRequestContext, code: string): Promise<string[]> {
	const res = await request.get(`/api/fixtures/${code}/health`);
	expect(res.status()).toBe(200);
	const body = (await res.json()) as { flags: { open: { kind: string }[] } };
	return body.flags.open.map((f) => f.kind).sort();
}
