/**
 * Text that can be stored. A JSON body can carry a lone UTF-16 surrogate ("\ud800"), which is
 * not Unicode: MariaDB refuses it inside a JSON column and would silently turn it into U+FFFD in a
 * text column. Schemas refuse such text at the boundary, with a message that says why, so the
 * phone's forms and the server judge it alike and nothing reaches the database half-valid.
 */
import { z } from 'zod';

/** A high surrogate not followed by a low one, or a low one not preceded by a high one. */
const LONE_SURROGATE = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

/** Whether `s` is well-formed Unicode (no lone surrogates). */
export function isWellFormedText(s: string): boolean {
	return !LONE_SURROGATE.test(s);
}

/** The message for text that is not valid Unicode, naming the field. */
export const notUnicodeMessage = (field: string) =>
	`${field} contains text that is not valid Unicode (a lone surrogate); retype it.`;

/** A zod string that refuses text which is not valid Unicode. */
export function unicodeString(field: string, error?: string) {
	return z
		.string(error ? { error } : undefined)
		.refine(isWellFormedText, { message: notUnicodeMessage(field) });
}

/**
 * A short, safe rendering of a value someone sent, for messages: text and numbers as they are
 * (text cut at 40 characters), anything else by its kind. String() of a deeply nested array
 * overflows the stack, and a message must never fail.
 */
export function shownInput(v: unknown): string {
	if (typeof v === 'string') return v.length > 40 ? `${v.slice(0, 40)}…` : v;
	if (typeof v === 'number' || typeof v === 'boolean' || typeof v === 'bigint') return String(v);
	if (v === null) return 'null';
	if (Array.isArray(v)) return 'a list';
	return typeof v === 'object' ? 'an object' : typeof v;
}
