/**
 * The contacts an inspector grades, named from a coupling's saved geometry: its balls, then its
 * seats (a vee per ball, a trihedral socket, a flat). The geometry lists contact points (two per
 * vee, three per socket), and a person grades the part, not the point, so points on one part
 * become one contact. Labels of a table geometry are used as written.
 */

/** Longest contact name an inspection accepts (see inspectionContactSchema). */
const MAX_NAME = 40;
/** Most contacts one inspection accepts. */
const MAX_CONTACTS = 24;

const capital = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);

/** Contact names for an inspection from a geometry's contact labels, balls first; [] when none. */
export function inspectionContactNames(labels: readonly (string | undefined)[]): string[] {
	const balls = new Set<number>();
	const seats: string[] = [];
	const addSeat = (name: string) => {
		const n = name.trim().slice(0, MAX_NAME);
		if (n && !seats.some((s) => s.toLowerCase() === n.toLowerCase())) seats.push(n);
	};
	for (const raw of labels) {
		const label = (raw ?? '').trim();
		const m = /^ball\s+(\d+)\s+(vee|socket|flat)\b/i.exec(label);
		if (m) {
			balls.add(Number(m[1]));
			const part = m[2].toLowerCase();
			addSeat(part === 'vee' ? `Vee ${m[1]}` : part === 'socket' ? 'Trihedral socket' : 'Flat');
		} else if (label) {
			// A table row: the part it names, without the point on it ("flank A", "face 2").
			addSeat(capital(label.replace(/\s+(flank\s+\w+|face\s+\d+|point\s+\d+)$/i, '')));
		}
	}
	const ballNames = [...balls].sort((a, b) => a - b).map((n) => `Ball ${n}`);
	// A coupling with a single vee (trihedral–vee–flat) calls it just that.
	const vees = seats.filter((s) => /^Vee \d+$/.test(s));
	const named = vees.length === 1 ? seats.map((s) => (s === vees[0] ? 'Vee' : s)) : seats;
	return [...ballNames, ...named].slice(0, MAX_CONTACTS);
}
