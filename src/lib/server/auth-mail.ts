import { escapeHtml } from './mail';

/** A mail's subject and bodies. */
export interface MailContent {
	subject: string;
	text: string;
	html: string;
}

function hours(seconds: number): string {
	const h = Math.round(seconds / 3600);
	return h % 24 === 0 && h >= 48 ? `${h / 24} days` : `${h} hours`;
}

function page(paragraphs: string[], url: string, button: string): string {
	const body = paragraphs.map((p) => `<p style="margin:0 0 14px">${escapeHtml(p)}</p>`).join('');
	return `<!doctype html><html><body style="font-family:system-ui,sans-serif;color:#1d2430;max-width:34rem">
<p style="font-weight:600;font-size:18px;margin:0 0 16px">Nestmark</p>${body}
<p style="margin:20px 0"><a href="${escapeHtml(url)}" style="background:#1d2430;color:#fff;padding:10px 16px;border-radius:6px;text-decoration:none">${escapeHtml(button)}</a></p>
<p style="font-size:13px;color:#555">Or paste this address into your browser:<br>${escapeHtml(url)}</p>
</body></html>`;
}

/** The mail with a link someone asked for on the sign-in page. */
export function signInMail(url: string, maxAgeS: number): MailContent {
	const host = new URL(url).host;
	const lines = [
		`Someone asked to sign in to Nestmark at ${host} with this address. If that was you, use the link below.`,
		`It works once, for the next ${hours(maxAgeS)}. If you did not ask for it, ignore this mail: nothing changes.`
	];
	return {
		subject: 'Your Nestmark sign-in link',
		text: `${lines.join('\n\n')}\n\nSign in: ${url}\n`,
		html: page(lines, url, 'Sign in to Nestmark')
	};
}

/** The invitation an admin sends to a new person. */
export function inviteMail(opts: {
	url: string;
	name: string;
	inviter: string;
	roles: readonly string[];
	maxAgeS: number;
}): MailContent {
	const host = new URL(opts.url).host;
	const lines = [
		`Hello ${opts.name},`,
		`${opts.inviter} has given you access to Nestmark at ${host}, the register of the shop's kinematic couplings and precision fixtures. Your role${opts.roles.length === 1 ? '' : 's'}: ${opts.roles.join(', ')}.`,
		`The link below signs you in; it works once, for the next ${hours(opts.maxAgeS)}. Later you can ask for a fresh link on the sign-in page at any time.`
	];
	return {
		subject: 'You have been invited to Nestmark',
		text: `${lines.join('\n\n')}\n\nSign in: ${opts.url}\n`,
		html: page(lines, opts.url, 'Accept and sign in')
	};
}
