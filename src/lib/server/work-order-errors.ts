/**
 * What the work-order services refuse, with the HTTP status the API answers: 400 with field
 * messages (bad input), 404 (no such fixture, flag or order), 409 (the order or flag is not in a
 * state that allows it). The routes and form actions turn it into their answer as it is.
 */
export class WorkOrderError extends Error {
	constructor(
		readonly status: 400 | 404 | 409,
		message: string,
		readonly fields?: Record<string, string[]>
	) {
		super(message);
		this.name = 'WorkOrderError';
	}
}

/** A 400 about one field. */
export const fieldError = (field: string, message: string) =>
	new WorkOrderError(400, message, { [field]: [message] });
