import { apiError } from './api-answers';

/**
 * The body could not be read as JSON within the limit; `message` is safe to show the client.
 * `drained` says whether the rest of the body was read off the connection: when it was not, the
 * answer must close the connection (`Connection: close`), or the unread bytes would be taken for
 * the next request on a kept-alive connection.
 */
export class BodyError extends Error {
	constructor(
		message: string,
		readonly drained = true
	) {
		super(message);
		this.name = 'BodyError';
	}
}

/** Headers for an answer to a BodyError: close the connection when the body is still on it. */
export function bodyErrorHeaders(err: BodyError): Record<string, string> {
	return err.drained ? {} : { connection: 'close' };
}

/** At most this much of a refused body is read and thrown away to keep the connection usable. */
export const DRAIN_LIMIT_BYTES = 16 * 1024 * 1024;

/**
 * Reads what is left of a body and throws it away, up to `max` bytes; true when the body was read
 * to its end (or the platform refused it and discards the rest itself). Cancelling the stream
 * instead would destroy the socket, and the client would see a reset rather than our answer.
 */
export async function discardBody(
	reader: ReadableStreamDefaultReader<Uint8Array>,
	max = DRAIN_LIMIT_BYTES
): Promise<boolean> {
	let read = 0;
	try {
		for (;;) {
			const { done, value } = await reader.read();
			if (done) return true;
			read += value.byteLength;
			if (read > max) return false;
		}
	} catch (err) {
		// adapter-node's BODY_SIZE_LIMIT: it stops passing data on, and Node discards the rest.
		return (err as { status?: number }).status === 413;
	}
}

/** Throws the rest of a request's body away (see discardBody); true when the connection stays usable. */
export async function discardRequestBody(request: Request): Promise<boolean> {
	if (!request.body || request.bodyUsed) return true;
	return discardBody(request.body.getReader());
}

/**
 * Reads a request body as JSON, refusing more than `limit` bytes. Both the declared
 * Content-Length and the bytes actually received are checked, since a client may send a body
 * without a length (chunked) or with a wrong one.
 */
export async function readJsonBody(request: Request, limit: number): Promise<unknown> {
	const tooLarge = (drained: boolean) =>
		new BodyError(`The request body is larger than the limit of ${formatBytes(limit)}.`, drained);

	const declared = request.headers.get('content-length');
	if (declared !== null && Number(declared) > limit) {
		throw tooLarge(await discardRequestBody(request));
	}
	if (!request.body) throw new BodyError('The request has no body; send a JSON object.');

	const reader = request.body.getReader();
	const chunks: Uint8Array[] = [];
	let received = 0;
	for (;;) {
		let chunk: ReadableStreamReadResult<Uint8Array>;
		try {
			chunk = await reader.read();
		} catch (err) {
			// The platform's own limit (adapter-node's BODY_SIZE_LIMIT) or a dropped connection.
			const status = (err as { status?: number }).status;
			if (status === 413)
				throw new BodyError('The request body is larger than the server accepts.');
			throw new BodyError('The request body could not be read to the end.', false);
		}
		const { done, value } = chunk;
		if (done) break;
		received += value.byteLength;
		if (received > limit) throw tooLarge(await discardBody(reader));
		chunks.push(value);
	}

	const bytes = new Uint8Array(received);
	let at = 0;
	for (const chunk of chunks) {
		bytes.set(chunk, at);
		at += chunk.byteLength;
	}

	let text: string;
	try {
		text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
	} catch {
		throw new BodyError('The request body is not valid UTF-8 text.');
	}
	if (text.trim() === '') throw new BodyError('The request body is empty; send a JSON object.');
	try {
		return JSON.parse(text);
	} catch (err) {
		const detail = err instanceof SyntaxError ? ` (${err.message})` : '';
		throw new BodyError(`The request body is not valid JSON${detail}.`);
	}
}

/**
 * An API route's body reader: the parsed JSON, or the 400 answer to return as it is (the body
 * too large, unreadable, not UTF-8, not JSON). Closes the connection when the refused body is
 * still on it.
 */
export async function readApiJson(request: Request, limit: number): Promise<unknown> {
	try {
		return await readJsonBody(request, limit);
	} catch (err) {
		if (err instanceof BodyError) {
			return apiError(400, err.message, undefined, { headers: bodyErrorHeaders(err) });
		}
		throw err;
	}
}

/**
 * Reads a JSON object whose keys must all be among `known`, or the 400 answer to return. A key
 * the API does not know is refused by name (a misspelt field would otherwise be dropped without a
 * word). Own keys only: "constructor" or "__proto__" are not fields just because every object
 * inherits them. `noun` names what the body describes ("a fixture").
 */
export async function readApiJsonObject(
	request: Request,
	limit: number,
	known: Record<string, unknown>,
	noun: string
): Promise<Record<string, unknown> | Response> {
	const body = await readApiJson(request, limit);
	if (body instanceof Response) return body;
	if (body === null || typeof body !== 'object' || Array.isArray(body)) {
		return apiError(400, 'The body must be a JSON object.');
	}
	const unknown = Object.keys(body).filter((k) => !Object.hasOwn(known, k));
	if (unknown.length) {
		return apiError(
			400,
			'Unknown fields.',
			Object.fromEntries(unknown.map((k) => [k, `"${k}" is not a field of ${noun}.`]))
		);
	}
	return body as Record<string, unknown>;
}

function formatBytes(n: number): string {
	if (n >= 1024 * 1024 && n % (1024 * 1024) === 0) return `${n / (1024 * 1024)} MB`;
	if (n >= 1024 && n % 1024 === 0) return `${n / 1024} KB`;
	return `${n} bytes`;
}
