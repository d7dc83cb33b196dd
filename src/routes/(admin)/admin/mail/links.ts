/** A run of mail text: plain, or a web address to show as a link. */
export interface TextPart {
	text: string;
	href?: string;
}

// Stops before whitespace, angle brackets and quotes; trailing sentence punctuation is trimmed.
const URL_RE = /https?:\/\/[^\s<>"']+/g;

/** Splits plain text into text and http(s) links, so links render as anchors without raw HTML. */
export function splitLinks(text: string): TextPart[] {
	const parts: TextPart[] = [];
	let last = 0;
	for (const m of text.matchAll(URL_RE)) {
		let url = m[0];
		const trail = /[.,;:!?)\]]+$/.exec(url);
		if (trail) url = url.slice(0, -trail[0].length);
		const start = m.index;
		if (start > last) parts.push({ text: text.slice(last, start) });
		parts.push({ text: url, href: url });
		last = start + url.length;
	}
	if (last < text.length) parts.push({ text: text.slice(last) });
	return parts;
}
