import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { generateFixtureCode } from '$lib/domain/fixture-code';
import * as select from '$lib/server/labels/select';
import { closeDb, makeArea, makeFixture, makeLocation, makeSite, resetDb } from '../helpers/db';

// Which fixtures a label job prints, on the real test database.

let lab: { id: number };
let bay: { id: number };
const codes: Record<string, string> = {};

beforeAll(async () => {
	await resetDb();
	const site = await makeSite({ name: 'Larchmere test site' });
	bay = await makeArea({ siteId: site.id, name: 'Bay' });
	lab = await makeArea({ siteId: site.id, name: 'Lab' });
	await makeArea({ siteId: site.id, name: 'Empty room' });
	const lathe = await makeLocation({ areaId: bay.id, name: 'Lathe 2' });
	const bench = await makeLocation({ areaId: bay.id, name: 'Bench 1' });
	const rack = await makeLocation({ areaId: lab.id, name: 'Rack' });
	for (const [key, locationId, status] of [
		['latheA', lathe.id, 'in-service'],
		['latheB', lathe.id, 'breaking-in'],
		['bench', bench.id, 'on-hold'],
		['old', bench.id, 'retired'],
		['rack', rack.id, 'in-service']
	] as const) {
		const f = await makeFixture({ locationId, status, name: `Fixture ${key}` });
		codes[key] = f.code;
	}
});

afterAll(closeDb);

describe('labelsForCodes', () => {
	it('keeps the order asked for, repeats included, and names the codes it cannot find', async () => {
		const unknown = generateFixtureCode();
		const r = await select.labelsForCodes([codes.rack, codes.old, unknown, codes.rack]);
		expect(r.labels).toEqual([
			{ code: codes.rack, name: 'Fixture rack' },
			{ code: codes.old, name: 'Fixture old' },
			{ code: codes.rack, name: 'Fixture rack' }
		]);
		expect(r.missing).toEqual([unknown]);
	});

	it('returns nothing for an empty list', async () => {
		expect(await select.labelsForCodes([])).toEqual({ labels: [], missing: [] });
	});
});

describe('labelsFor an area or the register', () => {
	it('leaves retired fixtures out and walks location by location', async () => {
		const labels = await select.labelsFor({ areaId: bay.id });
		// Bench 1 before Lathe 2 (names in order), codes in order within a location.
		const lathe = [codes.latheA, codes.latheB].sort();
		expect(labels.map((l) => l.code)).toEqual([codes.bench, ...lathe]);
		expect(await select.countLabels({ areaId: bay.id })).toBe(3);
	});

	it('covers every area for the whole register, and honours a limit', async () => {
		const all = await select.labelsFor({ all: true });
		expect(all).toHaveLength(4);
		expect(all.map((l) => l.code)).not.toContain(codes.old);
		expect(await select.labelsFor({ all: true }, 2)).toEqual(all.slice(0, 2));
		expect(await select.countLabels({ all: true })).toBe(4);
	});

	it('lists every area with its count, empty ones too', async () => {
		expect(await select.labelAreas()).toEqual([
			{ id: bay.id, name: 'Bay', site: 'Larchmere test site', count: 3 },
			{ id: expect.any(Number), name: 'Empty room', site: 'Larchmere test site', count: 0 },
			{ id: lab.id, name: 'Lab', site: 'Larchmere test site', count: 1 }
		]);
	});
});
