import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
	FIXTURE_CODE_ALPHABET,
	checkCharacter,
	generateFixtureCode,
	isValidFixtureCode,
	luhnModNCheck,
	normaliseFixtureCode,
	passesCheck,
	seededRandom
} from './fixture-code';

const A = FIXTURE_CODE_ALPHABET;

/** Every body of four alphabet characters, as a fast-check arbitrary. */
const body = fc
	.array(fc.integer({ min: 0, max: A.length - 1 }), { minLength: 4, maxLength: 4 })
	.map((ix) => ix.map((i) => A[i]).join(''));

describe('Luhn mod N', () => {
	it('reproduces the decimal Luhn check digit', () => {
		// ISO/IEC 7812-1 Annex B (Luhn formula for payment-card numbers), from memory; the textbook
		// example 7992739871 → check digit 3, as in Luhn, US patent 2,950,048 (1960), from memory.
		expect(luhnModNCheck('7992739871', '0123456789')).toBe('3');
	});

	it('reproduces the worked example for the alphabet a–f', () => {
		// Luhn mod N worked example (alphabet "abcdef", input "abcdef" → "e") from the
		// encyclopaedia article on the algorithm, from memory; hand check: 5+4+1+2+2+0 = 14,
		// (6 − 14 mod 6) = 4 → e.
		expect(luhnModNCheck('abcdef', 'abcdef')).toBe('e');
	});

	it('uses an alphabet of 30 characters without 0, O, 1, I, L or U', () => {
		expect(A).toHaveLength(30);
		expect(new Set(A).size).toBe(30);
		for (const c of '0O1ILU') expect(A).not.toContain(c);
	});
});

describe('generateFixtureCode', () => {
	it('makes canonical, valid codes', () => {
		for (let i = 0; i < 200; i++) {
			const code = generateFixtureCode();
			expect(code).toMatch(/^NM-[23456789ABCDEFGHJKMNPQRSTVWXYZ]{5}$/);
			expect(isValidFixtureCode(code)).toBe(true);
		}
	});

	it('is reproducible with a seeded generator', () => {
		const a = seededRandom(42);
		const b = seededRandom(42);
		const first = [1, 2, 3].map(() => generateFixtureCode(a));
		expect([1, 2, 3].map(() => generateFixtureCode(b))).toEqual(first);
		expect(new Set(first).size).toBe(3);
	});

	it('never indexes past the alphabet, even for a generator that returns values near 1', () => {
		expect(generateFixtureCode(() => 0.999999999999)).toBe('NM-ZZZZ' + checkCharacter('ZZZZ'));
		expect(generateFixtureCode(() => 0)).toBe('NM-2222' + checkCharacter('2222'));
	});
});

describe('check character', () => {
	it('detects every single-character substitution', () => {
		fc.assert(
			fc.property(body, (b) => {
				const full = b + checkCharacter(b);
				for (let pos = 0; pos < full.length; pos++) {
					for (const c of A) {
						if (c === full[pos]) continue;
						const typo = full.slice(0, pos) + c + full.slice(pos + 1);
						if (passesCheck(typo)) return false;
					}
				}
				return true;
			}),
			{ numRuns: 300 }
		);
	});

	it('detects every adjacent transposition except 2↔Z, the known blind spot of Luhn mod N', () => {
		let detected = 0;
		let missed = 0;
		// Exhaustive over the pairs: the outcome depends only on the two characters and their parity.
		for (const x of A) {
			for (const y of A) {
				if (x === y) continue;
				for (const [b, pos] of [
					[`${x}${y}AB`, 0],
					[`A${x}${y}B`, 1],
					[`AB${x}${y}`, 2]
				] as const) {
					const full = b + checkCharacter(b);
					const swapped = full.slice(0, pos) + full[pos + 1] + full[pos] + full.slice(pos + 2);
					if (passesCheck(swapped)) {
						missed++;
						expect(new Set([x, y])).toEqual(new Set(['2', 'Z']));
					} else detected++;
				}
			}
		}
		expect(detected).toBe(30 * 29 * 3 - missed);
		expect(missed).toBeGreaterThan(0);
		expect(detected / (detected + missed)).toBeGreaterThan(0.99);
	});

	it('also catches a transposition of the body with the check character', () => {
		const b = '4K7Q';
		const full = b + checkCharacter(b);
		const swapped = full.slice(0, 3) + full[4] + full[3];
		expect(full[3]).not.toBe(full[4]);
		expect(passesCheck(swapped)).toBe(false);
	});
});

describe('normaliseFixtureCode', () => {
	const code = 'NM-4K7Q' + checkCharacter('4K7Q');

	it('accepts any case, spaces, missing or extra dashes, and a missing prefix', () => {
		const body = code.slice(3);
		for (const typed of [
			code,
			code.toLowerCase(),
			`  ${code}  `,
			`NM${body}`,
			`nm ${body.slice(0, 3)} ${body.slice(3)}`,
			body,
			body.toLowerCase(),
			`NM–${body}` // an en dash from a word processor
		]) {
			expect(normaliseFixtureCode(typed)).toEqual({ ok: true, code });
		}
	});

	it('rejects ambiguous characters with a message naming them, instead of guessing', () => {
		const r = normaliseFixtureCode('NM-4K7OX');
		expect(r.ok).toBe(false);
		if (!r.ok) expect(r.error).toMatch(/letter O/);
		const one = normaliseFixtureCode('NM-1K7QX');
		expect(one.ok).toBe(false);
		if (!one.ok) expect(one.error).toMatch(/one \("1"\)/);
		const u = normaliseFixtureCode('nm-uk7qx');
		if (!u.ok) expect(u.error).toMatch(/letter U/);
		else expect.unreachable();
	});

	it('rejects wrong lengths, foreign characters, empty input and a failed check', () => {
		expect(normaliseFixtureCode('').ok).toBe(false);
		expect(normaliseFixtureCode('NM-4K7').ok).toBe(false);
		expect(normaliseFixtureCode('NM-4K7QXZ').ok).toBe(false);
		expect(normaliseFixtureCode('NM-4K7Q?').ok).toBe(false);
		const wrongCheck = A[(A.indexOf(code[7]) + 1) % A.length];
		const r = normaliseFixtureCode(code.slice(0, 7) + wrongCheck);
		expect(r).toEqual({ ok: false, error: expect.stringMatching(/check character/) });
	});

	it('isValidFixtureCode accepts only the canonical form', () => {
		expect(isValidFixtureCode(code)).toBe(true);
		expect(isValidFixtureCode(code.toLowerCase())).toBe(false);
		expect(isValidFixtureCode(code.replace('-', ''))).toBe(false);
	});
});
