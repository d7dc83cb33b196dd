import { error, redirect } from '@sveltejs/kit';
import { normaliseFixtureCode } from '$lib/domain/fixture-code';
import type { PageLoad } from './$types';

/**
 * The guided break-in run. Everything it shows comes from the device (register copy, saved run,
 * outbox) once in the browser, so it opens and works with no network; the load only checks the code.
 */
export const load: PageLoad = ({ params }) => {
	const reading = normaliseFixtureCode(params.code);
	if (!reading.ok) error(404, { message: reading.error });
	if (reading.code !== params.code) redirect(308, `/f/${reading.code}/break-in`);
	return { code: reading.code };
};
