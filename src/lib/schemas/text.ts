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
