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
import { count, inArray } from 'drizzle-orm';
import { generateFixtureCode, seededRandom } from '$lib/domain/fixture-code';
import { fixtureCreateSchema } from '$lib/schemas/fixture-form';
import { roleSchema, type Role } from '$lib/schemas/roles';
import { closeDb, db } from '$lib/server/db';
import { events as eventsTable, fixtures as fixturesTable } from '$lib/server/db/schema';
import * as fixtures from '$lib/server/fixtures';
import type { Actor } from '$lib/server/guard';
import { evaluateDueFlags } from '$lib/server/health';
import { ingestBatch, MAX_EVENTS_PER_SYNC } from '$lib/server/ingest';
import * as places from '$lib/server/places';
import { effectivePolicy, ensureTypePolicies } from '$lib/server/policies';
import type { Policy } from '$lib/domain/policy';
import { demoHistory, type DemoEvent, type DemoRole } from './demo-history';
import { seedWorkOrders } from './demo-work-orders';
import { renderDemoPhoto } from './demo-photos';
import { storePhoto } from '$lib/server/attachments';
import { resetStorageClient } from '$lib/server/storage';
import { createUser, getUserByEmail } from '$lib/server/users';
import {
	DEMO_FIXTURES,
	DEMO_PEOPLE,
	DEMO_PLACES,
	DEMO_SITE,
	DEMO_STORIES,
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

async function seedUsers(): Promise<{
	admin: Actor;
	byRole: Partial<Record<Role, Actor>>;
	added: number;
	total: number;
}> {
	let added = 0;
	let admin: Actor | undefined;
	const byRole: Partial<Record<Role, Actor>> = {};
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
		const actor = { id: user.id, email: user.email, name: user.name, roles: user.roles };
		byRole[a.role] = actor;
		if (a.role === 'admin') admin = actor;
	}
	if (!admin || !admin.roles.includes('admin')) {
		throw new Error(
			'scripts/demo-accounts.txt needs an admin account that still holds the admin role'
		);
	}
	return { admin, byRole, added, total: accounts.length };
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

/** The demo devices: the operator's phone at the machines, the technician's bench tablet. */
const DEMO_DEVICES: Record<DemoRole, string> = {
	operator: 'demo-phone-floor',
	technician: 'demo-tablet-bench'
};

/** A generated event on its way to ingest, with the code of its fixture. */
type Outgoing = DemoEvent & { fixtureCode: string };

/**
 * Longest stretch of one person's entries on one fixture that goes in one batch. Ingest costs
 * per batch, so the demo's devices sync seldom: a month at a time keeps the seed to seconds.
 */
const SYNC_SPAN_MS = 31 * 86_400_000;

/**
 * Sends the generated histories through ingest, the path /api/sync uses, fixture by fixture in
 * time order: a person's consecutive entries on a fixture within SYNC_SPAN_MS go as one batch,
 * received a few minutes after its last entry. One fixture per batch keeps the seed quick:
 * ingest's cost is per batch and per fixture in it.
 */
async function ingestHistories(
	actors: Record<DemoRole, Actor>,
	events: Outgoing[],
	seedTime: Date
): Promise<number> {
	let accepted = 0;
	for (let i = 0; i < events.length;) {
		const first = events[i];
		const start = Date.parse(first.occurredAt);
		let j = i + 1;
		while (
			j < events.length &&
			j - i < MAX_EVENTS_PER_SYNC &&
			events[j].fixtureCode === first.fixtureCode &&
			events[j].role === first.role &&
			Date.parse(events[j].occurredAt) - start < SYNC_SPAN_MS
		) {
			j++;
		}
		const batch = events.slice(i, j);
		const last = Date.parse(batch[batch.length - 1].occurredAt);
		const now = new Date(Math.min(last + 3 * 60_000, seedTime.getTime()));
		const results = await ingestBatch(
			actors[first.role],
			DEMO_DEVICES[first.role],
			batch.map(({ id, fixtureCode, kind, occurredAt, payload }) => ({
				id,
				fixtureCode,
				kind,
				occurredAt,
				payload
			})),
			{ now }
		);
		for (const r of results) {
			if (r.status === 'rejected') throw new Error(`demo event ${r.id} was rejected: ${r.error}`);
			if (r.status === 'accepted') accepted++;
		}
		i = j;
	}
	return accepted;
}

/**
 * Renders and uploads the photos the generated inspections name: a close-up of the worst contact
 * (a ball, or a seat's flank), marked by its grade, with a small thumbnail as a phone would send.
 * Through the same storage path as the app's uploads; a photo already stored is left as it is.
 */
async function attachDemoPhotos(technician: Actor, events: Outgoing[]): Promise<number> {
	let stored = 0;
	for (const e of events) {
		if (e.kind !== 'inspection') continue;
		const payload = e.payload as {
			contacts: { contact: string; grade: number }[];
			photoIds?: string[];
		};
		const worst = payload.contacts.reduce((a, b) => (b.grade > a.grade ? b : a));
		const subject = /ball/i.test(worst.contact) ? 'ball' : 'groove';
		for (const [i, id] of (payload.photoIds ?? []).entries()) {
			const seed = parseInt(id.slice(0, 8), 16) + i;
			const photo = { subject, grade: worst.grade, seed } as const;
			const r = await storePhoto(technician, {
				id,
				fixtureCode: e.fixtureCode,
				eventId: e.id,
				photo: renderDemoPhoto(photo, 640),
				thumb: renderDemoPhoto(photo, 240)
			});
			if (r.status === 'stored') stored++;
		}
	}
	return stored;
}

/**
 * A year of invented history for every demo fixture that has none yet (a fixture with any event
 * keeps its history as it is, so a second run adds nothing), then the calendar flags as of now.
 */
async function seedHistory(
	byRole: Partial<Record<Role, Actor>>,
	seedTime: Date
): Promise<{ fixtures: number; events: number; photos: number }> {
	const operator = byRole.operator;
	const technician = byRole.technician;
	if (!operator || !technician) {
		throw new Error('scripts/demo-accounts.txt needs an operator and a technician account');
	}
	const codes = demoCodes(DEMO_FIXTURES);
	const rows = await db
		.select()
		.from(fixturesTable)
		.where(inArray(fixturesTable.code, [...codes.values()]));
	const byCode = new Map(rows.map((r) => [r.code, r]));
	const counted = await db
		.select({ fixtureId: eventsTable.fixtureId, n: count() })
		.from(eventsTable)
		.where(
			inArray(
				eventsTable.fixtureId,
				rows.map((r) => r.id)
			)
		)
		.groupBy(eventsTable.fixtureId);
	const withEvents = new Set(counted.map((c) => c.fixtureId));

	const outgoing: Outgoing[] = [];
	const touched: number[] = [];
	for (const f of DEMO_FIXTURES) {
		const row = byCode.get(codes.get(f.key)!);
		if (!row || withEvents.has(row.id)) continue;
		const story = DEMO_STORIES[f.key] ?? { condition: 'healthy' };
		if (story.condition === 'no-history') continue;
		const entries = await effectivePolicy(row);
		const policy = Object.fromEntries(entries.map((e) => [e.field, e.value])) as unknown as Policy;
		const history = demoHistory(f, story, policy, seedTime, row.locationId);
		for (const e of history.events) outgoing.push({ ...e, fixtureCode: row.code });
		touched.push(row.id);
	}
	const events = await ingestHistories({ operator, technician }, outgoing, seedTime);
	const photos = await attachDemoPhotos(technician, outgoing);
	await evaluateDueFlags(seedTime, touched);
	return { fixtures: touched.length, events, photos };
}

/** Seeds whatever of the demo scenario is missing; returns what was added. */
export async function seedDemo(options: { now?: Date } = {}) {
	const seedTime = options.now ?? new Date();
	const users = await seedUsers();
	const policies = await ensureTypePolicies(users.admin);
	const locationIds = await seedPlaces(users.admin);
	const fx = await seedFixtures(users.admin, locationIds);
	const history = await seedHistory(users.byRole, seedTime);
	const workOrders = await seedWorkOrders(users.byRole, demoCodes(DEMO_FIXTURES), seedTime);
	return { users, policies, locations: locationIds.size, fixtures: fx, history, workOrders };
}

async function main() {
	const r = await seedDemo();
	console.log(
		`seed: ${r.users.added} of ${r.users.total} demo accounts added, ${r.policies} type policies added, ` +
			`${r.locations} locations present, ${r.fixtures.added} of ${r.fixtures.total} demo fixtures added, ` +
			`history for ${r.history.fixtures} fixtures (${r.history.events} events, ${r.history.photos} photos) added, ` +
			`${r.workOrders} work orders added`
	);
}

// Only when run as a script: tests import demoCodes without seeding anything.
if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
	main()
		.catch((err: unknown) => {
			console.error('seed: failed:', err instanceof Error ? err.stack : err);
			process.exitCode = 1;
		})
		.finally(() => {
			// Let go of the S3 client's sockets too, or the script would not end.
			resetStorageClient();
			return closeDb();
		});
}
