/**
 * Fixture codes, as printed on QR labels and typed by hand: `NM-` then four random characters and
 * one check character, e.g. `NM-4K7QX`.
 *
 * The alphabet leaves out characters people confuse when reading a worn label or typing with
 * gloves on: 0/O, 1/I/L, and U (read as V). Thirty characters remain.
 *
 * The check character uses the Luhn mod N algorithm (Luhn's mod 10 scheme generalised to an
 * alphabet of N characters), a member of the family of check-character systems that ISO/IEC 7064
 * standardises. With N = 30 it detects every single-character substitution and every adjacent
 * transposition except the swap of the first and last alphabet characters ('2' and 'Z'), the same
 * blind spot as 0↔9 in the decimal Luhn check.
 */

export const FIXTURE_CODE_ALPHABET = '23456789ABCDEFGHJKMNPQRSTVWXYZ';
export const FIXTURE_CODE_PREFIX = 'NM-';
/** Random characters in a code, before the check character. */
export const FIXTURE_CODE_BODY_LENGTH = 4;

const N = FIXTURE_CODE_ALPHABET.length;
const AMBIGUOUS: Record<string, string> = {
	'0': 'zero',
	O: 'the letter O',
	'1': 'one',
	I: 'the letter I',
	L: 'the letter L',
	U: 'the letter U'
};

/**
 * Luhn mod N check character for `body` over any `alphabet` (N = its length): working from the
 * right, every second code point starting with the rightmost is doubled and its base-N digits
 * summed; the check character brings the total to a multiple of N.
 */
export function luhnModNCheck(body: string, alphabet: string): string {
	const n = alphabet.length;
	let sum = 0;
	let double = true;
	for (let i = body.length - 1; i >= 0; i--) {
		let addend = alphabet.indexOf(body[i]);
		if (addend < 0) throw new RangeError(`"${body[i]}" is not in the alphabet`);
		if (double) {
			addend *= 2;
			addend = Math.floor(addend / n) + (addend % n);
		}
		sum += addend;
		double = !double;
	}
	return alphabet[(n - (sum % n)) % n];
}

/** The check character of a code body (fixture-code alphabet only). */
export function checkCharacter(body: string): string {
	return luhnModNCheck(body, FIXTURE_CODE_ALPHABET);
}

/** True when `bodyWithCheck` (alphabet characters, check character last) passes Luhn mod N. */
export function passesCheck(bodyWithCheck: string): boolean {
	if (bodyWithCheck.length < 2) return false;
	if ([...bodyWithCheck].some((c) => !FIXTURE_CODE_ALPHABET.includes(c))) return false;
	return checkCharacter(bodyWithCheck.slice(0, -1)) === bodyWithCheck.slice(-1);
}

/** Result of reading a code someone typed or scanned. */
export type CodeReading = { ok: true; code: string } | { ok: false; error: string };

/**
 * Turns what a person typed or a scanner read into the canonical `NM-XXXXX` form: any case,
 * spaces or dashes anywhere, with or without the prefix. Characters that are never used are
 * rejected with a message rather than guessed at, because a wrong guess could name another fixture.
 */
export function normaliseFixtureCode(input: string): CodeReading {
	let s = input.toUpperCase().replace(/[\s\-‐‑–—]+/g, '');
	if (s === '') return { ok: false, error: 'Enter a fixture code, like NM-4K7QX.' };
	if (s.startsWith('NM') && s.length > FIXTURE_CODE_BODY_LENGTH + 1) s = s.slice(2);
	const length = FIXTURE_CODE_BODY_LENGTH + 1;
	const bad = [...s].find((c) => c in AMBIGUOUS);
	if (bad) {
		return {
			ok: false,
			error: `Fixture codes never contain ${AMBIGUOUS[bad]} ("${bad}"), nor 0, O, 1, I, L or U. Check the label again.`
		};
	}
	const foreign = [...s].find((c) => !FIXTURE_CODE_ALPHABET.includes(c));
	if (foreign) {
		return { ok: false, error: `"${foreign}" cannot appear in a fixture code.` };
	}
	if (s.length !== length) {
		return {
			ok: false,
			error: `A fixture code has ${length} characters after "NM-" (this one has ${s.length}).`
		};
	}
	if (!passesCheck(s)) {
		return {
			ok: false,
			error: 'This code fails its check character, so one character is probably mistyped.'
		};
	}
	return { ok: true, code: FIXTURE_CODE_PREFIX + s };
}

/** True when `code` is a fixture code in canonical form (`NM-` + five characters, check passes). */
export function isValidFixtureCode(code: string): boolean {
	const r = normaliseFixtureCode(code);
	return r.ok && r.code === code;
}

/** Uniform random number in [0, 1) from the platform's cryptographic generator. */
function cryptoRandom(): number {
	return crypto.getRandomValues(new Uint32Array(1))[0] / 2 ** 32;
}

/**
 * A new code from `random` (a [0, 1) generator; pass a seeded one for reproducible codes).
 * Uniqueness is the caller's job: the register retries on a collision.
 */
export function generateFixtureCode(random: () => number = cryptoRandom): string {
	let body = '';
	for (let i = 0; i < FIXTURE_CODE_BODY_LENGTH; i++) {
		body += FIXTURE_CODE_ALPHABET[Math.min(N - 1, Math.floor(random() * N))];
	}
	return FIXTURE_CODE_PREFIX + body + checkCharacter(body);
}

/** A small seeded generator (mulberry32) for reproducible codes in demo data and tests. */
export function seededRandom(seed: number): () => number {
	let a = seed >>> 0;
	return () => {
		a = (a + 0x6d2b79f5) >>> 0;
		let t = a;
		t = Math.imul(t ^ (t >>> 15), t | 1);
		t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
		return ((t ^ (t >>> 14)) >>> 0) / 2 ** 32;
	};
}
