import { createTransport, type Transporter } from 'nodemailer';
import { config } from './config';

/** One outgoing message; `text` is required so every mail reads well in a plain client. */
export interface OutgoingMail {
	to: string;
	subject: string;
	text: string;
	html?: string;
}

let transport: Transporter | undefined;

/**
 * The SMTP transport, from SMTP_HOST / SMTP_PORT (and SMTP_USER / SMTP_PASSWORD for a real relay).
 */
function getTransport(): Transporter {
	if (transport) return transport;
	const { host, port, secure, user, password } = config().smtp;
	transport = createTransport({
		host,
		port,
		secure,
		// The local fake offers neither STARTTLS nor AUTH; a real relay gets credentials.
		...(user ? { auth: { user, pass: password } } : { ignoreTLS: !secure })
	});
	return transport;
}

/** The From address of every mail Nestmark sends. */
export function mailFrom(): string {
	return config().mailFrom;
}

/** The mail server could not be reached or refused the message. */
export class MailNotSentError extends Error {
	constructor(message: string, options?: ErrorOptions) {
		super(message, options);
		this.name = 'MailNotSentError';
	}
}

/** Sends one message; throws MailNotSentError when it did not go out, so nothing fails silently. */
export async function sendMail(mail: OutgoingMail): Promise<void> {
	let result;
	try {
		result = await getTransport().sendMail({ from: mailFrom(), ...mail });
	} catch (e) {
		throw new MailNotSentError(`Mail to ${mail.to} could not be sent: ${(e as Error).message}`, {
			cause: e
		});
	}
	const failed = [...(result.rejected ?? []), ...(result.pending ?? [])].filter(Boolean);
	if (failed.length) throw new MailNotSentError(`Mail to ${failed.join(', ')} was refused`);
}

/** Escapes text for an HTML mail body. */
export function escapeHtml(s: string): string {
	return s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
}

/** Closes the SMTP connection pool (scripts and tests call this; the next send reopens it). */
export function closeMail(): void {
	transport?.close();
	transport = undefined;
}
