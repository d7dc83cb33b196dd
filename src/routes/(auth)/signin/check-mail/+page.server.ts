import { config } from '$lib/server/config';
import { mailViewerEnabled } from '$lib/server/mailbox';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = () => {
	return { environment: config().environment, mailCaptured: mailViewerEnabled() };
};
