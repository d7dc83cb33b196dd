import mysql from 'mysql2/promise';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

// Guards for the integration suite itself: every integration test writes to the database named by
// DATABASE_URL, so it has to be the throw-away test database on the project's own MariaDB.
describe('integration test database', () => {
	let conn: mysql.Connection;

	beforeAll(async () => {
		const url = process.env.DATABASE_URL;
		if (!url) throw new Error('DATABASE_URL is not set: run the suite through `npm test`');
		conn = await mysql.createConnection({ uri: url });
	});

	afterAll(async () => {
		await conn?.end();
	});

	it('is the nestmark_test database, never the development one', async () => {
		const [rows] = await conn.query<mysql.RowDataPacket[]>('SELECT DATABASE() AS db');
		expect(rows[0].db).toBe('nestmark_test');
	});

	it('runs on MariaDB with utf8mb4 and UTC, as the app expects', async () => {
		const [rows] = await conn.query<mysql.RowDataPacket[]>(
			'SELECT VERSION() AS version, @@character_set_database AS charset, @@time_zone AS tz'
		);
		expect(rows[0].version).toMatch(/MariaDB/);
		expect(rows[0].charset).toBe('utf8mb4');
		expect(rows[0].tz).toBe('+00:00');
	});

	it('stores and returns non-Latin text unchanged', async () => {
		await conn.query('CREATE TEMPORARY TABLE harness_text (t VARCHAR(64))');
		const text = 'Vee groove ⌀12 mm — Ölwanne ✓';
		await conn.query('INSERT INTO harness_text (t) VALUES (?)', [text]);
		const [rows] = await conn.query<mysql.RowDataPacket[]>('SELECT t FROM harness_text');
		expect(rows[0].t).toBe(text);
	});
});
