/**
 * Outgoing mail as plain rules: which mails Nestmark sends and how long a failed one waits before
 * the next try. The queue itself (`mail_outbox`) lives in `$lib/server`.
 */

/** What a queued mail is about. */
export const MAIL_KINDS = [
	'work-order-assigned',
	'work-order-rescheduled',
	'work-order-cancelled',
	'digest',
	'other'
] as const;
export type MailKind = (typeof MAIL_KINDS)[number];

/** Where a queued mail stands: waiting (new or to be retried), or sent. Nothing is deleted. */
export const MAIL_STATUSES = ['queued', 'sent'] as const;
export type MailStatus = (typeof MAIL_STATUSES)[number];

/** How a person takes notices about their own assigned work: at once, or in the daily digest. */
export const NOTICE_DELIVERIES = ['mail', 'digest'] as const;
export type NoticeDelivery = (typeof NOTICE_DELIVERIES)[number];

/** iCalendar METHODs a notice's .ics attachment may carry (RFC 5546). */
export const ICS_METHODS = ['REQUEST', 'CANCEL'] as const;
export type IcsMethod = (typeof ICS_METHODS)[number];
