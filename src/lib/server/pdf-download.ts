/** A generated PDF as a download: sent in pieces so a browser can show progress on a slow network. */

const CHUNK = 64 * 1024;

/** The PDF's bytes as an attachment named `fileName`, with any extra headers. */
export function pdfDownload(
	bytes: Uint8Array,
	fileName: string,
	headers: Record<string, string> = {}
): Response {
	let offset = 0;
	const body = new ReadableStream<Uint8Array>({
		pull(controller) {
			if (offset >= bytes.length) return controller.close();
			controller.enqueue(bytes.subarray(offset, offset + CHUNK));
			offset += CHUNK;
		}
	});
	return new Response(body, {
		headers: {
			'Content-Type': 'application/pdf',
			'Content-Length': String(bytes.length),
			'Content-Disposition': `attachment; filename="${fileName}"`,
			'Cache-Control': 'private, no-store',
			...headers
		}
	});
}
