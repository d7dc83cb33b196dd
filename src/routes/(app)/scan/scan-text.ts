/**
 * Reading what a QR scan (camera or photo) or a person's typing produced: a Nestmark label URL
 * from any origin (`https://host/f/NM-4K7QX`, because labels printed on a test server or before
 * a move must keep working), or a bare fixture code in any case and spacing.
 */
import {
	FIXTURE_CODE_ALPHABET,
	FIXTURE_CODE_BODY_LENGTH,
	normaliseFixtureCode
} from '$lib/domain/fixture-code';

/** Where the text came from: a decoder gives exact text, a person may add slips of the hand. */
export type ScanSource = 'camera' | 'photo' | 'typed';

export type ScanProblem = 'empty' | 'check' | 'format' | 'not-nestmark';

export type ScanReading =
	| { ok: true; code: string; from: 'url' | 'code' }
	| { ok: false; problem: ScanProblem; message: string };

export const CHECK_MESSAGE = "The last character doesn't match — check the code.";

const URL_LIKE = /^[a-z][a-z0-9+.-]*:\/\//i;
// The card path may sit under a base path (a reverse proxy), so only its end is fixed.
const CARD_PATH = /\/f\/([^/?#]+)\/?$/;

/** Nothing but code characters (and the separators people type), so it is meant to be a code. */
function looksLikeCode(compact: string): boolean {
	return /^[A-Z0-9]+$/.test(compact) && compact.length <= FIXTURE_CODE_BODY_LENGTH + 4;
}

function readCode(raw: string, from: 'url' | 'code', source: ScanSource): ScanReading {
	// With the prefix written out ("NM-4K7"), what follows is the whole body, so a short code is
	// reported as short rather than read as a prefix-less code with a wrong check character.
	const prefixed = /^NM[\s\-‐‑–—]+(.*)$/i.exec(raw.trim());
	const body = prefixed ? prefixed[1] : raw;
	const r = normaliseFixtureCode(body);
	if (r.ok) return { ok: true, code: r.code, from };
	let compact = body.toUpperCase().replace(/[\s\-‐‑–—]+/g, '');
	if (compact === '') return { ok: false, problem: 'empty', message: r.error };
	if (!prefixed && compact.startsWith('NM') && compact.length > FIXTURE_CODE_BODY_LENGTH + 1) {
		compact = compact.slice(2);
	}
	// Right length, right alphabet, yet rejected: only the check character can have failed.
	if (
		compact.length === FIXTURE_CODE_BODY_LENGTH + 1 &&
		[...compact].every((c) => FIXTURE_CODE_ALPHABET.includes(c))
	) {
		return { ok: false, problem: 'check', message: CHECK_MESSAGE };
	}
	// A decoder read the symbol exactly, so arbitrary text means someone else's QR code.
	if (source !== 'typed' && from === 'code' && !looksLikeCode(compact)) {
		return notNestmark();
	}
	return { ok: false, problem: 'format', message: r.error };
}

function notNestmark(host?: string): ScanReading {
	return {
		ok: false,
		problem: 'not-nestmark',
		message: host
			? `This QR code is not a Nestmark label: it opens a page on ${host}.`
			: 'This QR code is not a Nestmark label.'
	};
}

/** Turns scanned or typed text into a canonical fixture code, or a message a person can act on. */
export function readScannedText(text: string, source: ScanSource = 'typed'): ScanReading {
	const trimmed = text.trim();
	if (!URL_LIKE.test(trimmed)) return readCode(trimmed, 'code', source);
	let url: URL;
	try {
		url = new URL(trimmed);
	} catch {
		return notNestmark();
	}
	const match = CARD_PATH.exec(url.pathname);
	if (!match) return notNestmark(url.host || undefined);
	let segment: string;
	try {
		segment = decodeURIComponent(match[1]);
	} catch {
		return notNestmark(url.host || undefined);
	}
	return readCode(segment, 'url', source);
}
