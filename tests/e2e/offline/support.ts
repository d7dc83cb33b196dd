import { randomUUID } from 'node:crypto';
import { expect, type APIRequestContext, type Page } from '@playwright/test';
import mysql from 'mysql2/promise';
import { generateFixtureCode } from '../../../src/lib/domain/fixture-code';

/** What the history API answers for one event. */
export interface ServerEvent {
	id: string;
	kind: string;
	payload: Record<string, unknown>;
	user: { name: string };
}

/**
 * A fixture of the test's own (fresh site, area, location and code), written straight into the
 * test database, so counts on it are not disturbed by other tests.
 */
export async function createFixture(
	name: string,
	options: { type?: string; mass_kg?: number | null } = {}
): Promise<string> {
	const conn = await mysql.createConnection({ uri: process.env.DATABASE_URL! });
	try {
		const tag = randomUUID().slice(0, 8);
		const [site] = await conn.query<mysql.ResultSetHeader>(
			'INSERT INTO sites (name, created_at) VALUES (?, NOW(3))',
			[`Offline test site ${tag}`]
		);
		const [area] = await conn.query<mysql.ResultSetHeader>(
			'INSERT INTO areas (site_id, name, created_at) VALUES (?, ?, NOW(3))',
			[site.insertId, 'Diamond-turning bay']
		);
		const [location] = await conn.query<mysql.ResultSetHeader>(
			'INSERT INTO locations (area_id, name, created_at) VALUES (?, ?, NOW(3))',
			[area.insertId, 'Lathe 3']
		);
		let code: string;
		for (;;) {
			code = generateFixtureCode();
			const [taken] = await conn.query<mysql.RowDataPacket[]>(
				'SELECT 1 FROM fixtures WHERE code = ?',
				[code]
			);
			if (!taken.length) break;
		}
		await conn.query(
			`INSERT INTO fixtures (code, name, type, status, location_id, mass_kg, created_at, updated_at)
			 VALUES (?, ?, ?, 'in-service', ?, ?, NOW(3), NOW(3))`,
			[code, name, options.type ?? 'three-vee', location.insertId, options.mass_kg ?? null]
		);
		return code;
	} finally {
		await conn.end();
	}
}

/** The fixture's events as the server lists them (newest first), through the API. */
export async function serverEvents(
	request: APIRequestContext,
	code: string
): Promise<ServerEvent[]> {
	const res = await request.get(`/api/fixtures/${code}/events?limit=200`);
	expect(res.status()).toBe(200);
	return ((await res.json()) as { events: ServerEvent[] }).events;
}

/** Waits until the service worker controls the page, then reloads so the page itself is cached. */
export async function cacheForOffline(page: Page): Promise<void> {
	await page.waitForFunction(() => navigator.serviceWorker?.controller != null, null, {
		timeout: 120_000
	});
	await page.reload();
	await page.waitForFunction(() => navigator.serviceWorker?.controller != null);
}

/** Ids of the card's entries shown as waiting to sync. */
export async function waitingIds(page: Page): Promise<string[]> {
	const rows = page.getByRole('listitem').filter({ hasText: 'Waiting to sync' });
	return rows.evaluateAll((els) => els.map((e) => e.getAttribute('data-event-id') ?? ''));
}

/** Gives a fixture another code straight in the database (as if it were relabelled elsewhere). */
export async function setFixtureCode(from: string, to: string): Promise<void> {
	const conn = await mysql.createConnection({ uri: process.env.DATABASE_URL! });
	try {
		await conn.query('UPDATE fixtures SET code = ? WHERE code = ?', [to, from]);
	} finally {
		await conn.end();
	}
}

/** A valid fixture code no fixture has. */
export async function freeCode(): Promise<string> {
	const conn = await mysql.createConnection({ uri: process.env.DATABASE_URL! });
	try {
		for (;;) {
			const code = generateFixtureCode();
			const [taken] = await conn.query<mysql.RowDataPacket[]>(
				'SELECT 1 FROM fixtures WHERE code = ?',
				[code]
			);
			if (!taken.length) return code;
		}
	} finally {
		await conn.end();
	}
}
