/** Dates in words on the calendar, the same on the server and in the browser (UTC calendar). */

const long = new Intl.DateTimeFormat('en-GB', {
	weekday: 'long',
	day: 'numeric',
	month: 'long',
	year: 'numeric',
	timeZone: 'UTC'
});
const short = new Intl.DateTimeFormat('en-GB', {
	weekday: 'short',
	day: 'numeric',
	month: 'short',
	timeZone: 'UTC'
});
const month = new Intl.DateTimeFormat('en-GB', { month: 'long', year: 'numeric', timeZone: 'UTC' });

const at = (date: string) => new Date(`${date}T00:00:00Z`);

/** "Monday 7 December 2026". */
export const dayLong = (date: string) => long.format(at(date));
/** "Mon 7 Dec". */
export const dayShort = (date: string) => short.format(at(date));
/** "December 2026". */
export const monthTitle = (date: string) => month.format(at(date));
