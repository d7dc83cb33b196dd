/**
 * A local SMTP server for development and tests: accepts every message on 127.0.0.1 and saves
 * it as an .eml file in MAIL_CAPTURE_DIR, where the dev/test mail viewer reads it. Nothing is
 * ever delivered anywhere.
 */
import { randomBytes } from 'node:crypto';
import { mkdirSync, renameSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { SMTPServer, type SMTPServerAddress } from 'smtp-server';

const LOOPBACK = new Set(['127.0.0.1', 'localhost', '::1']);
const MAX_MESSAGE_BYTES = 25 * 1024 * 1024;

const host = process.env.SMTP_HOST || '127.0.0.1';
const port = Number(process.env.SMTP_PORT || 2525);
const captureDir = resolve(process.env.MAIL_CAPTURE_DIR || '.data/mail');

if (!LOOPBACK.has(host)) {
	console.error(`mail-fake: SMTP_HOST must be a loopback address, not ${host}`);
	process.exit(1);
}
if (!Number.isInteger(port) || port < 1 || port > 65535) {
	console.error(`mail-fake: SMTP_PORT is not a port number: ${process.env.SMTP_PORT}`);
	process.exit(1);
}
mkdirSync(captureDir, { recursive: true });

/** A name that sorts by arrival time and never collides. */
function captureName(): string {
	const stamp = new Date().toISOString().replace(/:/g, '-');
	return `${stamp}-${randomBytes(4).toString('hex')}.eml`;
}

/** Decodes RFC 2047 encoded words (=?charset?Q|B?text?=) so the log shows readable subjects. */
function decodeWords(value: string): string {
	return value
		.replace(/(\?=)\s+(=\?)/g, '$1$2')
		.replace(
			/=\?([^?]+)\?([QqBb])\?([^?]*)\?=/g,
			(word, charset: string, enc: string, text: string) => {
				try {
					const bytes =
						enc.toUpperCase() === 'B'
							? Buffer.from(text, 'base64')
							: Buffer.from(
									text
										.replace(/_/g, ' ')
										.replace(/=([0-9A-Fa-f]{2})/g, (_m, hex: string) =>
											String.fromCharCode(parseInt(hex, 16))
										),
									'latin1'
								);
					return new TextDecoder(charset).decode(bytes);
				} catch {
					return word;
				}
			}
		);
}

/** The Subject header of a raw message, unfolded and decoded, for the log line. */
function subjectOf(raw: Buffer): string {
	const headerEnd = raw.indexOf('\r\n\r\n');
	const head = raw.subarray(0, headerEnd === -1 ? raw.length : headerEnd).toString('utf8');
	const match = /^subject:[ \t]*(.*(?:\r?\n[ \t].*)*)/im.exec(head);
	return match ? decodeWords(match[1].replace(/\r?\n[ \t]+/g, ' ').trim()) : '(no subject)';
}

function addresses(list: SMTPServerAddress[]): string {
	return list.map((a) => a.address).join(', ');
}

const server = new SMTPServer({
	disabledCommands: ['AUTH', 'STARTTLS'],
	authOptional: true,
	disableReverseLookup: true,
	banner: 'Nestmark mail capture (development and tests only)',
	size: MAX_MESSAGE_BYTES,
	logger: false,
	onData(stream, session, callback) {
		const chunks: Buffer[] = [];
		stream.on('data', (chunk: Buffer) => chunks.push(chunk));
		stream.on('error', (err) => callback(err));
		stream.on('end', () => {
			if (stream.sizeExceeded) {
				callback(Object.assign(new Error('Message too large'), { responseCode: 552 }));
				return;
			}
			const raw = Buffer.concat(chunks);
			const name = captureName();
			const file = join(captureDir, name);
			try {
				// Written aside and renamed, so a reader never sees half a message.
				writeFileSync(`${file}.part`, raw);
				renameSync(`${file}.part`, file);
			} catch (err) {
				console.error(`mail-fake: could not save a message: ${(err as Error).message}`);
				callback(err as Error);
				return;
			}
			const from = session.envelope.mailFrom ? session.envelope.mailFrom.address : '(none)';
			console.log(
				`mail-fake: ${name} from ${from} to ${addresses(session.envelope.rcptTo)}: ${subjectOf(raw)}`
			);
			callback(null, `Saved as ${name}`);
		});
	}
});

server.on('error', (err) => console.error(`mail-fake: ${err.message}`));

server.server.once('error', (err: NodeJS.ErrnoException) => {
	console.error(`mail-fake: cannot listen on ${host}:${port}: ${err.code ?? err.message}`);
	process.exit(1);
});

server.listen(port, host, () => {
	console.log(`mail-fake: listening on ${host}:${port}, saving messages in ${captureDir}`);
});

function shutdown(): void {
	server.close(() => process.exit(0));
	// Open client connections must not keep the process alive.
	setTimeout(() => process.exit(0), 2000).unref();
}
process.on('SIGTERM', shutdown);
process.on('SIGINT', shutdown);
