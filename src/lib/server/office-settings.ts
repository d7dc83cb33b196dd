/**
 * The office settings (one row, id 1): technician capacity per day for the calendar, and the time
 * and zone of the daily digest. A missing row or zone falls back to the defaults and the first
 * site's zone, so a fresh installation works before an admin has looked at the page.
 */
import { asc, eq } from 'drizzle-orm';
import { OFFICE_DEFAULTS, type OfficeSettings } from '../domain/office-settings';
import { db, type Db } from './db';
import { officeSettings, sites } from './db/schema';
import { assertCan, type Actor } from './guard';

/** The settings as stored, plus the zone they resolve to. */
export type ResolvedOfficeSettings = OfficeSettings & { resolvedTimeZone: string };

/** The settings and the zone the digest runs in (two small statements). */
export async function getOfficeSettings(q: Db = db): Promise<ResolvedOfficeSettings> {
	const [row] = await q.select().from(officeSettings).where(eq(officeSettings.id, 1)).limit(1);
	const stored: OfficeSettings = row
		? { capacityPerDay: row.capacityPerDay, digestTime: row.digestTime, timeZone: row.timeZone }
		: OFFICE_DEFAULTS;
	let zone = stored.timeZone;
	if (!zone) {
		const [site] = await q
			.select({ timezone: sites.timezone })
			.from(sites)
			.orderBy(asc(sites.id))
			.limit(1);
		zone = site?.timezone ?? 'UTC';
	}
	return { ...stored, resolvedTimeZone: zone };
}

/** Saves the settings (admin); the caller has checked the shape with the shared schema. */
export async function saveOfficeSettings(
	actor: Actor,
	values: OfficeSettings,
	q: Db = db
): Promise<void> {
	assertCan(actor, 'office.settings');
	const set = { ...values, updatedAt: new Date(), updatedBy: actor.id };
	await q
		.insert(officeSettings)
		.values({ id: 1, ...set })
		.onDuplicateKeyUpdate({ set });
}

/** The first site's zone ('UTC' without sites): what an empty zone setting stands for. */
export async function firstSiteTimeZone(q: Db = db): Promise<string> {
	const [site] = await q
		.select({ timezone: sites.timezone })
		.from(sites)
		.orderBy(asc(sites.id))
		.limit(1);
	return site?.timezone ?? 'UTC';
}
