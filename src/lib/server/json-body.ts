/** The body could not be read as JSON within the limit; `message` is safe to show the client. */
export class BodyError extends Error {
	constructor(message: string) {
		super(message);
		this.name = 'BodyError';
	}
}

/**
 * Reads a request body as JSON, refusing more than `limit` bytes. Both the declared
 * Content-Length and the bytes actually received are checked, since a client may send a body
 * without a length (chunked) or with a wrong one.
 */
export async function readJsonBody(request: Request, limit: number): Promise<unknown> {
	const tooLarge = () =>
		new BodyError(`The request body is larger than the limit of ${formatBytes(limit)}.`);

	const declared = request.headers.get('content-length');
	if (declared !== null && Number(declared) > limit) throw tooLarge();
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
			throw new BodyError('The request body could not be read to the end.');
		}
		const { done, value } = chunk;
		if (done) break;
		received += value.byteLength;
		if (received > limit) {
			await reader.cancel();
			throw tooLarge();
		}
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

function formatBytes(n: number): string {
	if (n >= 1024 * 1024 && n % (1024 * 1024) === 0) return `${n / (1024 * 1024)} MB`;
	if (n >= 1024 && n % 1024 === 0) return `${n / 1024} KB`;
	return `${n} bytes`;
}
