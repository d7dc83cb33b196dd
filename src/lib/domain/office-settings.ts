/**
 * The office's settings that the admin sets once for the whole installation: how many work orders
 * one technician can take on in a day, and when the daily digest goes out.
 */

export interface OfficeSettings {
	/** Work orders per technician per day before the calendar marks the day over capacity. */
	capacityPerDay: number;
	/** Local time of the daily digest, HH:MM (24 h). */
	digestTime: string;
	/** IANA time zone of digestTime; null means the first site's zone. */
	timeZone: string | null;
}

/** Defaults: 4 orders a day (common practice for a technician's day of fixture work), 06:30. */
export const OFFICE_DEFAULTS: OfficeSettings = {
	capacityPerDay: 4,
	digestTime: '06:30',
	timeZone: null
};

export const OFFICE_LIMITS = { capacityPerDayMin: 1, capacityPerDayMax: 50 } as const;
