import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEFAULT_POLICY } from '$lib/domain/policy';
import type { Actor } from '$lib/server/guard';
import { actions, load } from '../../../src/routes/(app)/policies/+page.server';
import { closeDb, makeUser, resetDb } from '../helpers/db';

// The page's load and actions called as SvelteKit calls them, with the locals the hook sets.

beforeAll(resetDb);
afterAll(closeDb);

type Loader = (event: never) => Promise<unknown>;
const run = (fn: Loader, user: Actor | null, path: string, form?: Record<string, string>) => {
	const url = new URL(`http://127.0.0.1${path}`);
	const body = form ? new URLSearchParams(form) : undefined;
	const request = new Request(url, { method: form ? 'POST' : 'GET', body });
	return fn({ locals: { user }, url, request, params: {} } as never);
};
const caught = (p: Promise<unknown>) =>
	p.then(
		() => null,
		(e: unknown) => e as { status: number; location?: string }
	);

const formOf = (patch: Record<string, string>) => ({
	...Object.fromEntries(
		Object.entries(DEFAULT_POLICY).map(([k, v]) => [k, v === null ? '' : String(v)])
	),
	type: 'vise',
	...patch
});

describe('/policies', () => {
	let supervisor: Actor;
	let operator: Actor;
	beforeAll(async () => {
		supervisor = await makeUser({ roles: ['supervisor'] });
		operator = await makeUser({ roles: ['operator'] });
	});

	it('is refused to operators (403) and to people not signed in (401)', async () => {
		expect((await caught(run(load as Loader, operator, '/policies')))?.status).toBe(403);
		expect((await caught(run(load as Loader, null, '/policies')))?.status).toBe(401);
		const post = await caught(run(actions.saveType as Loader, operator, '/policies', formOf({})));
		expect(post?.status).toBe(403);
	});

	it('shows one policy per fixture type with the basis of every default', async () => {
		const data = (await run(load as Loader, supervisor, '/policies')) as {
			types: { type: string; fields: { field: string; basis: { basis: string } | null }[] }[];
		};
		expect(data.types.map((t) => t.type)).toEqual([
			'three-vee',
			'trihedral-vee-flat',
			'pallet',
			'vise',
			'plate',
			'other'
		]);
		for (const t of data.types) {
			expect(t.fields).toHaveLength(13);
			for (const f of t.fields)
				expect(['source', 'common practice', 'from memory']).toContain(f.basis?.basis);
		}
	});

	it('answers field messages on a bad value and redirects after a good save', async () => {
		const bad = (await run(
			actions.saveType as Loader,
			supervisor,
			'/policies',
			formOf({ settleWindow: '1' })
		)) as {
			status: number;
			data: { errors: Record<string, string[]> };
		};
		expect(bad.status).toBe(400);
		expect(bad.data.errors).toEqual({ settleWindow: ['Settling window must be at least 2.'] });

		const ok = await caught(
			run(actions.saveType as Loader, supervisor, '/policies', formOf({ cleaningIntervalDays: '' }))
		);
		expect(ok).toMatchObject({ status: 303, location: '/policies?saved=vise&changed=0#type-vise' });
		const data = (await run(load as Loader, supervisor, '/policies?saved=vise')) as {
			types: { type: string; saved: boolean; fields: { field: string; value: number | null }[] }[];
		};
		const vise = data.types.find((t) => t.type === 'vise')!;
		expect(vise.saved).toBe(true);
		expect(vise.fields.find((f) => f.field === 'cleaningIntervalDays')!.value).toBeNull();
	});
});
