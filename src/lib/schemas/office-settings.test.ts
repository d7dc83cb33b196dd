import { describe, expect, it } from 'vitest';
import { canonicalTimeZone, officeSettingsSchema } from './office-settings';

const parse = (v: Partial<Record<'capacityPerDay' | 'digestTime' | 'timeZone', string>>) =>
	officeSettingsSchema.safeParse({ capacityPerDay: '4', digestTime: '06:30', timeZone: '', ...v });

describe('office settings form', () => {
	it('takes the defaults, an empty zone as "the first site’s"', () => {
		expect(parse({})).toEqual({
			success: true,
			data: { capacityPerDay: 4, digestTime: '06:30', timeZone: null }
		});
	});

	it('keeps capacity within 1–50, whole numbers only', () => {
		expect(parse({ capacityPerDay: '1' }).success).toBe(true);
		expect(parse({ capacityPerDay: '50' }).success).toBe(true);
		for (const bad of ['0', '51', '2.5', '-1', 'four', ''])
			expect(parse({ capacityPerDay: bad }).success, bad).toBe(false);
	});

	it('reads the digest time on the 24-hour clock', () => {
		expect(parse({ digestTime: '00:00' }).success).toBe(true);
		expect(parse({ digestTime: '23:59' }).success).toBe(true);
		for (const bad of ['24:00', '6:30', '06:60', '06.30', ''])
			expect(parse({ digestTime: bad }).success, bad).toBe(false);
	});

	it('accepts IANA zones the runtime knows and refuses others', () => {
		// Zone names of the IANA tz database (from memory), which Node's ICU carries.
		const ok = parse({ timeZone: 'Europe/Berlin' });
		expect(ok.success && ok.data.timeZone).toBe('Europe/Berlin');
		expect(parse({ timeZone: 'America/New_York' }).success).toBe(true);
		expect(parse({ timeZone: 'UTC' }).success).toBe(true);
		const bad = parse({ timeZone: 'Mars/Olympus_Mons' });
		expect(bad.success).toBe(false);
		expect(bad.error?.issues[0].message).toContain('not a time zone');
		expect(canonicalTimeZone('Atlantis/Lost')).toBeNull();
	});
});
