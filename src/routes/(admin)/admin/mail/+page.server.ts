import { error } from '@sveltejs/kit';
import { requireUser } from '$lib/server/guard';
import { listCapturedMail, mailCaptureDir, mailViewerEnabled } from '$lib/server/mailbox';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals }) => {
	requireUser(locals, 'mail.view');
	// A real installation sends real mail; there is nothing captured to show, so no page.
	if (!mailViewerEnabled()) error(404, { message: 'Not found' });
	return { folder: mailCaptureDir(), mails: await listCapturedMail(50) };
};
