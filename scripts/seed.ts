/**
 * Seeds the demo scenario (scripts/demo-scenario.ts) into the database named by DATABASE_URL,
 * through the same service functions the app uses. Idempotent: everything is found by its natural
 * key (e-mail, fixture type, place names, fixture code) and only what is missing is added, so a
 * second run changes nothing and whatever people added or edited stays as it is.
 *
 *   npx tsx scripts/seed.ts        (npm run db:seed fills in the local DATABASE_URL)
 */
import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { inArray } from 'drizzle-orm';
import { generateFixtureCode, seededRandom } from '$lib/domain/fixture-code';
import { fixtureCreateSchema } from '$lib/schemas/fixture-form';
import { roleSchema, type Role } from '$lib/schemas/roles';
import { closeDb, db } from '$lib/server/db';
import { fixtures as fixturesTable } from '$lib/server/db/schema';
import * as fixtures from '$lib/server/fixtures';
import type { Actor } from '$lib/server/guard';
import * as places from '$lib/server/places';
import { ensureTypePolicies } from '$lib/server/policies';
import { createUser, getUserByEmail } from '$lib/server/users';
import {
	DEMO_FIXTURES,
	DEMO_PEOPLE,
	DEMO_PLACES,
	DEMO_SITE,
	type DemoFixture
} from './demo-scenario';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');

/** FNV-1a: a stable 32-bit number from a demo fixture's key, to seed its code. */
function fnv1a(s: string): number {
	let h = 0x811c9dc5;
	for (const ch of s) {
		h ^= ch.codePointAt(0)!;
		h = Math.imul(h, 0x01000193) >>> 0;
	}
	return h;
}

/**
 * Each demo fixture's code, made from its key alone, so a code never changes when the list does.
 * A clash between two keys (rare) is settled by salting the later key.
 */
export function demoCodes(list: DemoFixture[]): Map<string, string> {
	const codes = new Map<string, string>();
	const used = new Set<string>();
	for (const f of list) {
		let code = generateFixtureCode(seededRandom(fnv1a(f.key)));
		for (let salt = 1; used.has(code); salt++) {
			code = generateFixtureCode(seededRandom(fnv1a(`${f.key}#${salt}`)));
		}
		used.add(code);
		codes.set(f.key, code);
	}
	return codes;
}

/** The demo accounts, "role e-mail password" per line. */
function demoAccounts(): { role: Role; email: string; password: string }[] {
	return readFileSync(join(root, 'scripts/demo-accounts.txt'), 'utf8')
		.split('\n')
		.map((l) => l.trim())
		.filter((l) => l && !l.startsWith('#'))
		.map((l) => {
			const [role, email, password] = l.split(/\s+/);
			return { role: roleSchema.parse(role), email, password };
		});
}

async function seedUsers(): Promise<{ admin: Actor; added: number; total: number }> {
	let added = 0;
	let admin: Actor | undefined;
	const accounts = demoAccounts();
	for (const a of accounts) {
		let user = await getUserByEmail(a.email);
		if (!user) {
			user = await createUser({
				email: a.email,
				name: DEMO_PEOPLE[a.role],
				password: a.password,
				roles: [a.role]
			});
			added++;
		}
		if (a.role === 'admin') {
			admin = { id: user.id, email: user.email, name: user.name, roles: user.roles };
		}
	}
	if (!admin || !admin.roles.includes('admin')) {
		throw new Error(
			'scripts/demo-accounts.txt needs an admin account that still holds the admin role'
		);
	}
	return { admin, added, total: accounts.length };
}

async function seedPlaces(admin: Actor): Promise<Map<string, number>> {
	const siteId = await places.ensureSite(admin, DEMO_SITE);
	const ids = new Map<string, number>();
	for (const [area, locations] of Object.entries(DEMO_PLACES)) {
		const areaId = await places.ensureArea(admin, siteId, area);
		for (const location of locations) {
			ids.set(`${area}/${location}`, await places.ensureLocation(admin, areaId, location));
		}
	}
	return ids;
}

async function seedFixtures(admin: Actor, locationIds: Map<string, number>) {
	const codes = demoCodes(DEMO_FIXTURES);
	const existing = new Set(
		(
			await db
				.select({ code: fixturesTable.code })
				.from(fixturesTable)
				.where(inArray(fixturesTable.code, [...codes.values()]))
		).map((r) => r.code)
	);
	let added = 0;
	for (const f of DEMO_FIXTURES) {
		const code = codes.get(f.key)!;
		if (existing.has(code)) continue;
		const locationId = locationIds.get(`${f.area}/${f.location}`);
		if (locationId === undefined)
			throw new Error(`demo fixture ${f.key}: unknown place ${f.area}/${f.location}`);
		// The same schema as the add-fixture form, so demo data obeys the app's rules.
		const input = fixtureCreateSchema.parse({
			name: f.name,
			type: f.type,
			locationId,
			status: f.status ?? 'in-service',
			repeatabilitySpec_um: f.spec_um,
			ratedLifeCycles: f.ratedLife,
			ballMaterial: f.ball,
			seatMaterial: f.seat,
			ballDiameter_mm: f.ballDia_mm,
			preload_N: f.preload_N,
			mass_kg: f.mass_kg,
			commissionedOn: f.commissioned,
			notes: f.notes
		});
		await fixtures.create(admin, input, { code });
		added++;
	}
	return { added, total: DEMO_FIXTURES.length };
}

/** Seeds whatever of the demo scenario is missing; returns what was added. */
export async function seedDemo() {
	const users = await seedUsers();
	const policies = await ensureTypePolicies(users.admin);
	const locationIds = await seedPlaces(users.admin);
	const fx = await seedFixtures(users.admin, locationIds);
	return { users, policies, locations: locationIds.size, fixtures: fx };
}

async function main() {
	const r = await seedDemo();
	console.log(
		`seed: ${r.users.added} of ${r.users.total} demo accounts added, ${r.policies} type policies added, ` +
			`${r.locations} locations present, ${r.fixtures.added} of ${r.fixtures.total} demo fixtures added`
	);
}

// Only when run as a script: tests import demoCodes without seeding anything.
if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
	main()
		.catch((err: unknown) => {
			console.error('seed: failed:', err instanceof Error ? err.stack : err);
			process.exitCode = 1;
		})
		.finally(closeDb);
}
