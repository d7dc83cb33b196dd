import { customType } from 'drizzle-orm/mysql-core';

/**
 * A JSON column that round-trips on MariaDB. MariaDB's JSON is LONGTEXT with a validity check, so
 * mysql2 hands it back as a string, and drizzle's built-in `json()` does not parse it on read.
 */
export const json = <T>(name: string) =>
	customType<{ data: T; driverData: string }>({
		dataType: () => 'json',
		toDriver: (value) => JSON.stringify(value),
		fromDriver: (value) => (typeof value === 'string' ? JSON.parse(value) : value) as T
	})(name);
