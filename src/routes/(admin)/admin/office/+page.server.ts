import { error, fail } from '@sveltejs/kit';
import { officeSettingsFormValues, officeSettingsSchema } from '$lib/schemas/office-settings';
import { ForbiddenError, requireUser } from '$lib/server/guard';
import {
	firstSiteTimeZone,
	getOfficeSettings,
	saveOfficeSettings
} from '$lib/server/office-settings';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals }) => {
	requireUser(locals, 'office.settings');
	const [settings, siteZone] = await Promise.all([getOfficeSettings(), firstSiteTimeZone()]);
	return {
		values: officeSettingsFormValues(settings),
		resolvedTimeZone: settings.resolvedTimeZone,
		siteZone
	};
};

export const actions: Actions = {
	save: async ({ locals, request }) => {
		const actor = requireUser(locals, 'office.settings');
		const form = await request.formData();
		const values = {
			capacityPerDay: String(form.get('capacityPerDay') ?? ''),
			digestTime: String(form.get('digestTime') ?? ''),
			timeZone: String(form.get('timeZone') ?? '')
		};
		const parsed = officeSettingsSchema.safeParse(values);
		if (!parsed.success) {
			const errors: Record<string, string[]> = {};
			for (const issue of parsed.error.issues)
				(errors[String(issue.path[0])] ??= []).push(issue.message);
			return fail(400, { values, errors, saved: false });
		}
		try {
			await saveOfficeSettings(actor, parsed.data);
		} catch (e) {
			if (e instanceof ForbiddenError) error(403, { message: e.message });
			throw e;
		}
		return { values: officeSettingsFormValues(parsed.data), errors: null, saved: true };
	}
};
