/**
 * The admin's office settings form (`/admin/office`), checked the same way in the browser and on
 * the server: capacity per technician per day, the digest's time, and its time zone.
 */
import { z } from 'zod';
import { OFFICE_DEFAULTS, OFFICE_LIMITS, type OfficeSettings } from '../domain/office-settings';

export { OFFICE_DEFAULTS, OFFICE_LIMITS, type OfficeSettings };

/** The IANA name `zone` stands for as the runtime spells it, or null when it knows no such zone. */
export function canonicalTimeZone(zone: string): string | null {
	try {
		// The constructor throws a RangeError for a zone the runtime's time-zone data lacks.
		return new Intl.DateTimeFormat('en', { timeZone: zone }).resolvedOptions().timeZone;
	} catch {
		return null;
	}
}

const { capacityPerDayMin: MIN, capacityPerDayMax: MAX } = OFFICE_LIMITS;

/** The form's fields as text (what a form post carries), checked and turned into the settings. */
export const officeSettingsSchema = z.object({
	capacityPerDay: z
		.string()
		.trim()
		.min(1, 'Give the number of work orders a technician can take on in a day.')
		.regex(/^\d+$/, `Capacity must be a whole number from ${MIN} to ${MAX}.`)
		.transform(Number)
		.pipe(
			z
				.number()
				.min(MIN, `Capacity must be at least ${MIN}.`)
				.max(MAX, `Capacity must be at most ${MAX}.`)
		),
	digestTime: z
		.string()
		.trim()
		.regex(/^([01]\d|2[0-3]):[0-5]\d$/, 'Give the time as HH:MM on the 24-hour clock, e.g. 06:30.'),
	timeZone: z
		.string()
		.trim()
		.max(64, 'A time zone name is at most 64 characters.')
		.transform((s, ctx) => {
			if (s === '') return null;
			const zone = canonicalTimeZone(s);
			if (!zone) {
				ctx.addIssue({
					code: 'custom',
					message: `"${s}" is not a time zone this server knows. Use an IANA name such as Europe/Berlin, or leave it empty.`
				});
				return z.NEVER;
			}
			return zone;
		})
}) satisfies z.ZodType<OfficeSettings, Record<keyof OfficeSettings, string>>;

/** The settings as the form shows them (text in every box). */
export function officeSettingsFormValues(s: OfficeSettings): Record<keyof OfficeSettings, string> {
	return {
		capacityPerDay: String(s.capacityPerDay),
		digestTime: s.digestTime,
		timeZone: s.timeZone ?? ''
	};
}
