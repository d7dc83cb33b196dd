import { randomUUID } from 'node:crypto';
import {
	expect,
	test,
	type APIRequestContext,
	type APIResponse,
	type Browser
} from '@playwright/test';
import type { Role } from '../../../src/lib/schemas/roles';
import { signInAs } from '../helpers/auth';
import { unusedCode } from '../helpers/register-rows';

// Every API refusal has one body: { error, fields? }, `fields` being lists of messages by field.
// Asked over HTTP from the built app, for 400 with fields, 401, 403 and 404 from several routes.

/** Checks `res` answers `status` with exactly { error } or { error, fields } and returns the body. */
async function refusal(res: APIResponse, status: number, withFields: boolean) {
	expect(res.status(), `${res.url()}: ${await res.text()}`).toBe(status);
	expect(res.headers()['content-type']).toMatch(/^application\/json/);
	const body = (await res.json()) as Record<string, unknown>;
	expect(Object.keys(body).sort()).toEqual(withFields ? ['error', 'fields'] : ['error']);
	expect(typeof body.error).toBe('string');
	expect((body.error as string).length).toBeGreaterThan(0);
	if (withFields) {
		const fields = body.fields as Record<string, unknown>;
		expect(Object.keys(fields).length).toBeGreaterThan(0);
		for (const [field, messages] of Object.entries(fields)) {
			expect(Array.isArray(messages), `fields.${field} is a list`).toBe(true);
			for (const m of messages as unknown[]) {
				expect(typeof m).toBe('string');
				expect((m as string).length).toBeGreaterThan(0);
			}
		}
	}
	return body as { error: string; fields?: Record<string, string[]> };
}

async function signedIn(browser: Browser, role: Role): Promise<APIRequestContext> {
	const context = await browser.newContext();
	const page = await context.newPage();
	await signInAs(page, role);
	return page.request;
}

test('401: signed out, every API route answers { error }', async ({ playwright, baseURL }) => {
	const anonymous = await playwright.request.newContext({ baseURL });
	await refusal(await anonymous.get('/api/fixtures'), 401, false);
	await refusal(await anonymous.get('/api/flags'), 401, false);
	await refusal(
		await anonymous.post('/api/sync', { data: { deviceId: 'd', events: [] } }),
		401,
		false
	);
	await refusal(await anonymous.get('/api/labels.pdf?all=1'), 401, false);
	await refusal(await anonymous.get(`/api/attachments/${randomUUID()}`), 401, false);
	await anonymous.dispose();
});

test('403: a role that may not answers { error }', async ({ browser }) => {
	const operator = await signedIn(browser, 'operator');
	await refusal(await operator.post('/api/fixtures', { data: { name: 'x' } }), 403, false);
	await refusal(await operator.get('/api/labels.pdf?all=1'), 403, false);
	await refusal(await operator.patch('/api/fixtures/NM-0001', { data: { name: 'x' } }), 403, false);
});

test('404: nothing there answers { error }', async ({ browser }) => {
	const supervisor = await signedIn(browser, 'supervisor');
	const nowhere = await unusedCode();
	await refusal(await supervisor.get(`/api/fixtures/${nowhere}`), 404, false);
	await refusal(await supervisor.get(`/api/fixtures/${nowhere}/health`), 404, false);
	await refusal(await supervisor.get(`/api/fixtures/${nowhere}/events`), 404, false);
	await refusal(await supervisor.get(`/api/register-snapshot?code=${nowhere}`), 404, false);
	await refusal(await supervisor.get(`/api/attachments/${randomUUID()}/thumb`), 404, false);
	await refusal(await supervisor.get('/api/no-such-endpoint'), 404, false);
	// A named code that is not in the register is listed by field, as a list like every field.
	const labels = await refusal(await supervisor.get(`/api/labels.pdf?codes=${nowhere}`), 404, true);
	expect(labels.fields).toEqual({ codes: [`${nowhere} is not in the register.`] });
});

test('400: bad input answers { error, fields } with a list of messages per field', async ({
	browser,
	baseURL
}) => {
	const appUrl = baseURL!;
	const supervisor = await signedIn(browser, 'supervisor');
	const nowhere = await unusedCode();

	const flags = await refusal(await supervisor.get('/api/flags?kind=rusty&area=north'), 400, true);
	expect(Object.keys(flags.fields!).sort()).toEqual(['area', 'kind']);

	const events = await refusal(
		await supervisor.get(`/api/fixtures/${nowhere}/events?limit=0`),
		400,
		true
	);
	expect(events.fields!.limit).toEqual(['limit must be at least 1.']);

	const fixture = await refusal(
		await supervisor.post('/api/fixtures', { data: { name: '', type: 'three-vee' } }),
		400,
		true
	);
	expect(fixture.fields!.name).toEqual(['Give the fixture a name.']);

	const unknown = await refusal(
		await supervisor.post('/api/fixtures', { data: { nmae: 'typo' } }),
		400,
		true
	);
	expect(unknown.fields).toEqual({ nmae: ['"nmae" is not a field of a fixture.'] });

	await refusal(await supervisor.get('/api/register-snapshot?code=0'), 400, true);
	await refusal(await supervisor.get('/api/labels.pdf?all=1&layout=huge&startAt=0'), 400, true);
	await refusal(await supervisor.post('/api/sync', { data: { events: 'none' } }), 400, true);
	await refusal(
		// A form post must name the app's own origin (SvelteKit refuses cross-site forms with 403).
		await supervisor.put('/api/attachments/not-a-uuid', {
			headers: { origin: new URL(appUrl).origin },
			multipart: { fixtureCode: 'x' }
		}),
		400,
		true
	);

	// A body that is not JSON at all has nothing to say about fields.
	await refusal(
		await supervisor.post('/api/sync', {
			headers: { 'content-type': 'application/json' },
			data: '{"deviceId":'
		}),
		400,
		false
	);
});
